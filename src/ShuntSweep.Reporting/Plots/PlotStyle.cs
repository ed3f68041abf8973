using ScottPlot;
using ScottPlot.TickGenerators;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Reporting.Plots;

/// <summary>The look shared by every ShuntSweep plot: our palette, SI-prefixed tick labels, fixed axis widths so stacked panels line up.</summary>
internal static class PlotStyle
{
    /// <summary>The series colours, in order: teal, amber, plum, olive, slate, brick.</summary>
    public static readonly Color[] Series =
    [
        Color.FromHex("#0F6E7A"), Color.FromHex("#D9822B"), Color.FromHex("#7A3E65"),
        Color.FromHex("#5E7D2B"), Color.FromHex("#44546A"), Color.FromHex("#B5443B"),
    ];

    /// <summary>The colour of fitted curves.</summary>
    public static readonly Color Fit = Color.FromHex("#1B2B34");

    /// <summary>The colour that marks outliers and limits.</summary>
    public static readonly Color Alert = Color.FromHex("#C0392B");

    /// <summary>The colour of a series by index.</summary>
    public static Color Of(int index) => Series[index % Series.Length];

    /// <summary>A new plot with our frame, labels and SI tick formatting on both axes.</summary>
    public static Plot Create(string title, string xLabel, SiUnit xUnit, string yLabel, SiUnit yUnit)
    {
        var plot = new Plot();
        plot.Title(title, 15);
        plot.XLabel(xLabel, 13);
        plot.YLabel(yLabel, 13);
        plot.Axes.Bottom.TickGenerator = new NumericAutomatic { LabelFormatter = v => Tick(v, xUnit) };
        plot.Axes.Left.TickGenerator = new NumericAutomatic { LabelFormatter = v => Tick(v, yUnit) };
        plot.Axes.Left.MinimumSize = 90;
        plot.Axes.Left.MaximumSize = 90;
        plot.Axes.Right.MinimumSize = 20;
        plot.Axes.Right.MaximumSize = 20;
        plot.Grid.MajorLineColor = Color.FromHex("#E3E8EC");
        plot.DataBackground.Color = Color.FromHex("#FBFCFD");
        return plot;
    }

    /// <summary>Turns an axis into a decade (log10) axis: the data are plotted as log10 of the value, the labels show the value.</summary>
    public static void Decades(IAxis axis, SiUnit unit)
    {
        ArgumentNullException.ThrowIfNull(axis);
        axis.TickGenerator = new NumericAutomatic
        {
            LabelFormatter = v => QuantityFormatter.Format(Math.Pow(10, v), unit, 3),
            MinorTickGenerator = new LogMinorTickGenerator(),
            IntegerTicksOnly = true,
        };
    }

    /// <summary>Labels an axis whose data are percentages through the formatter, as every other number the tool prints.</summary>
    public static void Percent(IAxis axis)
    {
        ArgumentNullException.ThrowIfNull(axis);
        axis.TickGenerator = new NumericAutomatic { LabelFormatter = v => Math.Abs(v) < 1e-12 ? "0 %" : QuantityFormatter.FormatPercent(v / 100, 6) };
    }

    /// <summary>Turns the bottom axis into a UTC date axis labelled in ISO 8601 (2026-12-04, or 2026-12-04 04:47 when the tick is not at midnight).</summary>
    public static void IsoDates(Plot plot)
    {
        ArgumentNullException.ThrowIfNull(plot);
        var axis = plot.Axes.DateTimeTicksBottom();
        if (axis.TickGenerator is DateTimeAutomatic automatic)
        {
            automatic.LabelFormatter = Iso;
        }
    }

    /// <summary>The ISO 8601 text of a tick's date, with as much of the time of day as it has (none, minutes, seconds, milliseconds).</summary>
    public static string Iso(DateTime t)
    {
        var format = t.TimeOfDay == TimeSpan.Zero ? "yyyy-MM-dd"
            : t.Second == 0 && t.Millisecond == 0 ? "yyyy-MM-dd HH:mm"
            : t.Millisecond == 0 ? "yyyy-MM-dd HH:mm:ss"
            : "yyyy-MM-dd HH:mm:ss.fff";
        return t.ToString(format, System.Globalization.CultureInfo.InvariantCulture);
    }

    private static string Tick(double v, SiUnit unit) => Math.Abs(v) < 1e-15 ? "0" : QuantityFormatter.Format(v, unit, 6);
}
