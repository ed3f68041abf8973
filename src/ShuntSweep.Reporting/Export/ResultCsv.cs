using System.Globalization;
using CsvHelper;
using CsvHelper.Configuration;
using CsvHelper.Configuration.Attributes;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Analysis.Results;

namespace ShuntSweep.Reporting.Export;

/// <summary>One measured point of a range as exported: the units are in the column names.</summary>
public sealed class PointRow
{
    /// <summary>The range.</summary>
    [Name("range")] public string Range { get; init; } = string.Empty;

    /// <summary>The jack.</summary>
    [Name("jack")] public string Jack { get; init; } = string.Empty;

    /// <summary>The plan step of the point.</summary>
    [Name("step")] public int Step { get; init; }

    /// <summary>The samples averaged.</summary>
    [Name("samples")] public int Samples { get; init; }

    /// <summary>The load setpoint.</summary>
    [Name("setpoint_A")] public double SetpointA { get; init; }

    /// <summary>The mean reference current.</summary>
    [Name("current_A")] public double CurrentA { get; init; }

    /// <summary>The mean drop.</summary>
    [Name("drop_V")] public double DropVolts { get; init; }

    /// <summary>The standard deviation of the drop samples.</summary>
    [Name("drop_sd_V")] public double DropStdDevVolts { get; init; }

    /// <summary>The standard uncertainty of the mean drop (k = 1).</summary>
    [Name("drop_u_V")] public double DropUncertaintyVolts { get; init; }

    /// <summary>The mean UUT reading (NaN when not read).</summary>
    [Name("reading_A")] public double ReadingA { get; init; }

    /// <summary>The measured minus the fitted drop.</summary>
    [Name("residual_V")] public double ResidualVolts { get; init; }

    /// <summary>The externally studentised residual.</summary>
    [Name("studentised_residual")] public double StudentisedResidual { get; init; }

    /// <summary>Whether the point was flagged as an outlier (kept in the fit).</summary>
    [Name("outlier")] public bool Outlier { get; init; }
}

/// <summary>One point of a range's fitted curve as exported.</summary>
public sealed class CurveRow
{
    /// <summary>The range.</summary>
    [Name("range")] public string Range { get; init; } = string.Empty;

    /// <summary>The model the curve belongs to.</summary>
    [Name("model")] public string Model { get; init; } = string.Empty;

    /// <summary>The current.</summary>
    [Name("current_A")] public double CurrentA { get; init; }

    /// <summary>The fitted drop.</summary>
    [Name("drop_V")] public double DropVolts { get; init; }

    /// <summary>The standard uncertainty of the fitted drop (k = 1), from the parameter covariance.</summary>
    [Name("drop_u_V")] public double DropUncertaintyVolts { get; init; }

    /// <summary>The chord resistance V/I.</summary>
    [Name("chord_resistance_ohm")] public double ChordOhms { get; init; }

    /// <summary>The incremental resistance dV/dI.</summary>
    [Name("incremental_resistance_ohm")] public double IncrementalOhms { get; init; }
}

/// <summary>Exports a result's measured points and fitted curves as CSV (CsvHelper, invariant culture, round-trip number format, units in the
/// headers) for a spreadsheet or a script, and reads them back.</summary>
public static class ResultCsv
{
    /// <summary>The file of the points inside an export folder.</summary>
    public const string PointsFile = "points.csv";

    /// <summary>The file of the fitted curves inside an export folder.</summary>
    public const string CurveFile = "curve.csv";

    /// <summary>Points per range on the exported curve.</summary>
    public const int CurvePoints = 201;

    /// <summary>Writes <c>points.csv</c> and <c>curve.csv</c> of <paramref name="result"/> into <paramref name="folder"/> and returns both paths.</summary>
    public static (string Points, string Curve) Write(CharacterisationResult result, string folder)
    {
        ArgumentNullException.ThrowIfNull(result);
        Directory.CreateDirectory(folder);
        var points = Path.Combine(folder, PointsFile);
        var curve = Path.Combine(folder, CurveFile);
        WriteRows(points, Points(result));
        WriteRows(curve, Curves(result));
        return (points, curve);
    }

    /// <summary>Each measured point of every range, in the result's order.</summary>
    public static IEnumerable<PointRow> Points(CharacterisationResult result)
    {
        ArgumentNullException.ThrowIfNull(result);
        return result.Ranges.SelectMany(r => r.Points.Select(p => new PointRow
        {
            Range = r.Name, Jack = r.Jack, Step = p.Step, Samples = p.Samples, SetpointA = p.SetpointA, CurrentA = p.CurrentA, DropVolts = p.DropVolts,
            DropStdDevVolts = p.DropStdDevVolts, DropUncertaintyVolts = p.DropUncertaintyVolts, ReadingA = p.ReadingA, ResidualVolts = p.ResidualVolts,
            StudentisedResidual = p.StudentisedResidual, Outlier = p.Outlier,
        }));
    }

    /// <summary>Each range's fitted curve as the analysis evaluates it (<see cref="DropCurve"/>), on <see cref="CurvePoints"/> currents spread
    /// logarithmically over the measured currents (linearly when a current is not positive); a range whose curve cannot be rebuilt is left out.</summary>
    public static IEnumerable<CurveRow> Curves(CharacterisationResult result)
    {
        ArgumentNullException.ThrowIfNull(result);
        foreach (var r in result.Ranges.Where(r => r.Points.Count > 1))
        {
            DropCurve curve;
            try
            {
                curve = DropCurve.For(r, result.DiodeTemperatureK);
            }
            catch (InvalidDataException)
            {
                continue;
            }

            var lo = r.Points.Min(p => p.CurrentA);
            var hi = r.Points.Max(p => p.CurrentA);
            for (var k = 0; k < CurvePoints; k++)
            {
                var t = (double)k / (CurvePoints - 1);
                var i = lo > 0 ? Math.Pow(10, Math.Log10(lo) + (t * (Math.Log10(hi) - Math.Log10(lo)))) : lo + (t * (hi - lo));
                var v = curve.Drop(i);
                yield return new CurveRow
                {
                    Range = r.Name, Model = r.Model, CurrentA = i, DropVolts = v, DropUncertaintyVolts = curve.DropUncertainty(i),
                    ChordOhms = i != 0 ? v / i : double.NaN, IncrementalOhms = curve.Slope(i),
                };
            }
        }
    }

    /// <summary>Reads a <c>points.csv</c> written by <see cref="Write"/>.</summary>
    /// <exception cref="InvalidDataException">When a row is malformed (the message gives the file and row).</exception>
    public static IReadOnlyList<PointRow> ReadPoints(string path) => ReadRows<PointRow>(path);

    /// <summary>Reads a <c>curve.csv</c> written by <see cref="Write"/>.</summary>
    /// <exception cref="InvalidDataException">When a row is malformed (the message gives the file and row).</exception>
    public static IReadOnlyList<CurveRow> ReadCurve(string path) => ReadRows<CurveRow>(path);

    private static CsvConfiguration Configuration => new(CultureInfo.InvariantCulture) { NewLine = "\n" };

    private static void WriteRows<T>(string path, IEnumerable<T> rows)
    {
        using var writer = new StreamWriter(path + ".tmp");
        using (var csv = new CsvWriter(writer, Configuration))
        {
            // "R" writes the shortest text that parses back to the same double, so the file reads back into the same numbers.
            csv.Context.TypeConverterOptionsCache.GetOptions<double>().Formats = ["R"];
            csv.WriteRecords(rows);
        }

        writer.Close();
        File.Move(path + ".tmp", path, overwrite: true);
    }

    private static List<T> ReadRows<T>(string path)
    {
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, Configuration);
        try
        {
            return csv.GetRecords<T>().ToList();
        }
        catch (CsvHelperException e)
        {
            throw new InvalidDataException($"{path}: row {e.Context?.Parser?.Row}: {e.Message.Split('\n')[0]}", e);
        }
    }
}
