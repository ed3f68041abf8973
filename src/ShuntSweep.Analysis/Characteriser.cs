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

        var analyses = new List<RangeAnalysis>();
        var taps = new List<TapFit>();
        foreach (var group in samples.GroupBy(s => s.Range))
        {
            var rangeSamples = group.ToList();
            var spec = uut?.Ranges.FirstOrDefault(r => r.Name == group.Key);
            var jack = spec?.Jack ?? rangeSamples[0].Jack;
            var fullScale = spec?.FullScale.Amperes ?? rangeSamples.Max(s => Math.Abs(s.Setpoint.Amperes));
            analyses.Add(RangeAnalysis.Run(group.Key, jack, fullScale, spec, rangeSamples, options));
            if (TapSeparation.Fit(group.Key, rangeSamples, options) is { } tap)
            {
                taps.Add(tap);
            }
        }

        var ranges = analyses.Select(a => a.Result).ToList();
        var decomposition = JackDecomposer.Decompose(analyses, taps, uut, options);
        var statements = ranges.Where(r => r.ReadingError is not null).SelectMany(r => r.ReadingError!).Select(p => p.Statement).ToList();
        return new CharacterisationResult(
            ranges,
            decomposition,
            RangeAnalysis.Summarise(statements),
            options.DiodeTemperatureKelvin,
            options.CoverageProbability);
    }
}
