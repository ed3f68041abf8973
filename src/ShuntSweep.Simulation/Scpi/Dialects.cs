using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>Chooses how a simulated instrument speaks: in the dialect of the profile its bench entry names, with the entry's terminators.</summary>
/// <remarks>The simulator reads the same <c>profile</c>, <c>termination</c> and <c>lineFrequency</c> keys the tool's driver reads, so one bench file
/// serves an instrument in a dialect and drives it in the same dialect.</remarks>
internal static class Dialects
{
    /// <summary>The front, input terminator and reply terminator of the simulated instrument <paramref name="name"/> of <paramref name="bench"/>.</summary>
    /// <exception cref="DocumentException">The entry's settings or profile are wrong.</exception>
    public static (IInstrumentFront? Front, string LineEnd, string ReplyEnd) FrontFor(BenchDescription bench, string name, ScpiInstrument scpi)
    {
        var entry = bench.Instruments.Values.FirstOrDefault(i => string.Equals(i.Resource, "SIM::" + name, StringComparison.OrdinalIgnoreCase));
        if (entry is null)
        {
            return (null, "\n", "\n");
        }

        var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));
        var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
        var (lineEnd, replyEnd) = (settings.Session.WriteTermination, settings.Session.ReadTermination);
        if (settings.TypedByOperator || settings.StreamedReading is not null || string.Equals(settings.Profile, InstrumentProfile.DefaultName, StringComparison.OrdinalIgnoreCase))
        {
            return (null, lineEnd, replyEnd);
        }

        InstrumentProfile profile;
        try
        {
            profile = InstrumentProfile.Load(settings.Profile, baseDirectory);
        }
        catch (FileNotFoundException ex)
        {
            throw entry.Settings.Required("profile").Error($"{entry.Settings.What}.profile: {ex.Message}");
        }

        var section = ProfileRequirements.SectionOf(entry.Role, settings.Shunt is not null);
        var fullScales = bench.Uut.Ranges.ToDictionary(r => r.Name, r => r.FullScale.Amperes, StringComparer.OrdinalIgnoreCase);
        return (new DialectFront(profile, section, scpi, settings.Timing.LineFrequency, fullScales, TimeProvider.System), lineEnd, replyEnd);
    }
}
