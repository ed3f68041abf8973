using System.Runtime.ExceptionServices;
using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>Turns the samples of a run into a per-range characterisation: the drop model that explains each range, with
/// uncertainties, the per-jack decomposition into fuse and shunt, thermal holds, and the UUT's reading error and conformity.</summary>
public static class Characteriser
{
    /// <summary>Analyses every range found in <paramref name="samples"/>.</summary>
    /// <param name="samples">The journal rows; points are the samples of one range sharing one step index.</param>
    /// <param name="uut">The UUT description, or null to take ranges, jacks and full scales from the samples alone.</param>
    /// <param name="options">Analysis settings; null for the defaults.</param>
    /// <exception cref="ArgumentException">When there are no samples or a range has too few points to fit.</exception>
    public static CharacterisationResult Analyse(IReadOnlyList<Sample> samples, UutDescription? uut, AnalysisOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(samples);
        options ??= new AnalysisOptions();
        if (samples.Count == 0)
        {
            throw new ArgumentException("There are no samples to analyse.", nameof(samples));
        }

        // Ranges are independent: analyse them in parallel, keep their order, and report the first failing range's own exception.
        var groups = samples.GroupBy(s => s.Range).Select(g => g.ToList()).ToList();
        var analysed = new (RangeAnalysis Analysis, TapFit? Tap)[groups.Count];
        var failures = new Exception?[groups.Count];
        Parallel.For(0, groups.Count, k =>
        {
            try
            {
                var rangeSamples = groups[k];
                var name = rangeSamples[0].Range;
                var spec = uut?.Ranges.FirstOrDefault(r => r.Name == name);
                var jack = spec?.Jack ?? rangeSamples[0].Jack;
                var fullScale = spec?.FullScale.Amperes ?? rangeSamples.Max(s => Math.Abs(s.Setpoint.Amperes));
                analysed[k] = (RangeAnalysis.Run(name, jack, fullScale, spec, rangeSamples, options), TapSeparation.Fit(name, rangeSamples, options));
            }
            catch (Exception e) when (e is ArgumentException or FitFailedException or InvalidDataException)
            {
                failures[k] = e;
            }
        });
        if (failures.FirstOrDefault(f => f is not null) is { } failure)
        {
            ExceptionDispatchInfo.Capture(failure).Throw();
        }

        var analyses = analysed.Select(a => a.Analysis).ToList();
        var taps = analysed.Where(a => a.Tap is not null).Select(a => a.Tap!).ToList();

        var ranges = analyses.Select(a => a.Result).ToList();
        var decomposition = JackDecomposer.Decompose(analyses, taps, uut, options);
        var statements = ranges.Where(r => r.ReadingError is not null).SelectMany(r => r.ReadingError!).Select(p => p.Statement).ToList();
        return new CharacterisationResult(
            ranges,
            decomposition,
            RangeAnalysis.Summarise(statements),
            options.DiodeKelvin,
            options.CoverageProbability);
    }
}
