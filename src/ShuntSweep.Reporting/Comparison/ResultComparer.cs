using System.Globalization;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Reporting.Comparison;

/// <summary>How far a result may move from its golden copy before the CI gate fails.</summary>
/// <param name="Fraction">The allowed relative change of resistance and burden at full scale (0.01 = 1 %).</param>
/// <param name="OffsetVolts">The allowed absolute change of the offset, which sits near zero where a relative limit means nothing.</param>
public sealed record CompareTolerance(double Fraction, double OffsetVolts)
{
    /// <summary>The default tolerance: 1 % on resistance and burden, 100 µV on the offset.</summary>
    public static CompareTolerance Default { get; } = new(0.01, 100e-6);

    /// <summary>Parses a relative tolerance with its unit: <c>0.5 %</c> or <c>500 ppm</c>; a bare number is refused as ambiguous.</summary>
    /// <exception cref="FormatException">When the text is not a positive percentage or ppm value.</exception>
    public static double ParseFraction(string text) => RelativeParser.ParsePositiveFraction(text, "Tolerance");
}

/// <summary>One check of a result against its golden copy.</summary>
/// <param name="Range">The range checked.</param>
/// <param name="Quantity">What was compared (resistance, offset, burden at full scale, model, conformity, presence).</param>
/// <param name="Passed">Whether the check passed.</param>
/// <param name="Message">What was found, in words, with both values and the allowance.</param>
public sealed record CompareCheck(string Range, string Quantity, bool Passed, string Message);

/// <summary>Every check of one comparison.</summary>
/// <param name="Checks">The checks, range by range in the golden result's order.</param>
public sealed record ComparisonReport(IReadOnlyList<CompareCheck> Checks)
{
    /// <summary>Whether every check passed.</summary>
    public bool Passed => Checks.All(c => c.Passed);

    /// <summary>How many checks failed.</summary>
    public int Failures => Checks.Count(c => !c.Passed);
}

/// <summary>Compares a result with a golden result range by range: same ranges, same models, values within tolerance, same verdicts.</summary>
public static class ResultComparer
{
    /// <summary>Compares <paramref name="actual"/> with <paramref name="golden"/>.</summary>
    public static ComparisonReport Compare(CharacterisationResult actual, CharacterisationResult golden, CompareTolerance tolerance)
    {
        ArgumentNullException.ThrowIfNull(actual);
        ArgumentNullException.ThrowIfNull(golden);
        ArgumentNullException.ThrowIfNull(tolerance);
        var checks = new List<CompareCheck>
        {
            Completeness("result", actual),
            Completeness("golden result", golden),
        };
        foreach (var g in golden.Ranges)
        {
            var a = actual.Ranges.FirstOrDefault(r => r.Name == g.Name);
            if (a is null)
            {
                checks.Add(new CompareCheck(g.Name, "present", false, $"range {g.Name} is in the golden result but not in the result."));
                continue;
            }

            var sameModel = Analysis.Models.ModelHypotheses.Equivalent(a.Model, g.Model);
            checks.Add(new CompareCheck(g.Name, "model", sameModel, a.Model == g.Model ? $"model {a.Model} as in the golden result."
                : sameModel ? $"model {a.Model}, golden {g.Model}: the same hypothesis." : $"model {a.Model}, golden {g.Model}."));
            checks.Add(Relative(g.Name, "resistance", a.ResistanceOhms.Value, g.ResistanceOhms.Value, tolerance.Fraction, SiUnit.Ohm));
            checks.Add(Relative(g.Name, "burden at full scale", a.BurdenAtFullScaleVolts, g.BurdenAtFullScaleVolts, tolerance.Fraction, SiUnit.Volt));
            checks.Add(Absolute(g.Name, "offset", a.OffsetVolts.Value, g.OffsetVolts.Value, tolerance.OffsetVolts, SiUnit.Volt));
            if (g.Conformity is { } gc)
            {
                var same = a.Conformity?.SimpleAcceptance == gc.SimpleAcceptance;
                checks.Add(new CompareCheck(g.Name, "conformity", same, same
                    ? $"simple-acceptance verdict {gc.SimpleAcceptance} as in the golden result."
                    : $"simple-acceptance verdict {a.Conformity?.SimpleAcceptance.ToString() ?? "none"}, golden {gc.SimpleAcceptance}."));
            }
        }

        foreach (var a in actual.Ranges.Where(a => golden.Ranges.All(g => g.Name != a.Name)))
        {
            checks.Add(new CompareCheck(a.Name, "present", false, $"range {a.Name} is in the result but not in the golden result."));
        }

        return new ComparisonReport(checks);
    }

    /// <summary>An incomplete result (a stopped run, a range left out) fails the gate whatever its numbers: it never passes as if it were complete.</summary>
    private static CompareCheck Completeness(string which, CharacterisationResult result)
    {
        if (!Verdicts.IsIncomplete(result))
        {
            return new CompareCheck("(run)", "complete", true, $"the {which} comes from a completed run.");
        }

        var why = result.RunEnd is { } end && end != Verdicts.Completed
            ? $"its run {RunEndWords.Describe(end)} before its last step"
            : $"the analysis left out: {string.Join(" ", result.LeftOut ?? [])}";
        return new CompareCheck("(run)", "complete", false, $"the {which} is incomplete ({why}); an incomplete result cannot pass a comparison.");
    }

    private static CompareCheck Relative(string range, string quantity, double actual, double golden, double fraction, SiUnit unit)
    {
        var allowed = fraction * Math.Abs(golden);
        var delta = actual - golden;
        var passed = Math.Abs(delta) <= allowed || (double.IsNaN(actual) && double.IsNaN(golden));
        var percent = golden != 0 ? QuantityFormatter.FormatPercent(delta / golden, 3, showSign: true) : "—";
        return new CompareCheck(range, quantity, passed,
            $"{quantity} {F(actual, unit)}, golden {F(golden, unit)}: change {percent}, allowed ±{QuantityFormatter.FormatPercent(fraction)}.");
    }

    private static CompareCheck Absolute(string range, string quantity, double actual, double golden, double allowed, SiUnit unit)
    {
        var delta = actual - golden;
        var passed = Math.Abs(delta) <= allowed || (double.IsNaN(actual) && double.IsNaN(golden));
        return new CompareCheck(range, quantity, passed, $"{quantity} {F(actual, unit)}, golden {F(golden, unit)}: change {F(delta, unit)}, allowed ±{F(allowed, unit)}.");
    }

    private static string F(double v, SiUnit unit) => QuantityFormatter.Format(v, unit, 6);
}
