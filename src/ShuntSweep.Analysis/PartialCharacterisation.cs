using ShuntSweep.Analysis.Fitting;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Uut;

namespace ShuntSweep.Analysis;

/// <summary>Characterises whatever a run measured, also when it stopped early: ranges that cannot be fitted (too few points) are left out with the reason instead of failing the whole analysis.</summary>
public static class PartialCharacterisation
{
    /// <summary>Analyses every range of <paramref name="samples"/> that can be (a result without ranges when none can, so that what was measured is still
    /// reported) and adds to <paramref name="notes"/> why each left-out range was.</summary>
    public static CharacterisationResult Analyse(IReadOnlyList<Sample> samples, UutDescription? uut, ICollection<string> notes, AnalysisOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(samples);
        ArgumentNullException.ThrowIfNull(notes);
        if (samples.Count == 0)
        {
            notes.Add("no sample was measured.");
            return Nothing;
        }

        try
        {
            return Characteriser.Analyse(samples, uut, options);
        }
        catch (Exception e) when (IsDataProblem(e))
        {
            var usable = new HashSet<string>(StringComparer.Ordinal);
            foreach (var range in samples.GroupBy(s => s.Range))
            {
                try
                {
                    Characteriser.Analyse(range.ToList(), uut, options);
                    usable.Add(range.Key);
                }
                catch (Exception r) when (IsDataProblem(r))
                {
                    notes.Add($"range {range.Key} ({range.Select(s => s.Step).Distinct().Count()} points measured) is not analysed: {r.Message}");
                }
            }

            if (usable.Count == 0)
            {
                return Nothing;
            }

            try
            {
                return Characteriser.Analyse(samples.Where(s => usable.Contains(s.Range)).ToList(), uut, options);
            }
            catch (Exception together) when (IsDataProblem(together))
            {
                notes.Add($"the ranges could not be analysed together: {together.Message}");
                return Nothing;
            }
        }
    }

    private static CharacterisationResult Nothing => new([]);

    private static bool IsDataProblem(Exception e) => e is ArgumentException or FitFailedException or InvalidDataException;
}
