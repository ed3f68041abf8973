using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>What one read-only query of a profile did against the live instrument.</summary>
/// <param name="Operation">The operation, for example <c>supply.measureVoltage</c>.</param>
/// <param name="Command">The query sent.</param>
/// <param name="Answer">The answer as received; null when none came.</param>
/// <param name="Reading">How the answer was read (a value with its unit, a state); null when it could not be.</param>
/// <param name="Problem">Why the query failed or its answer was not understood; null when it worked.</param>
public sealed record ProbedQuery(string Operation, string Command, string? Answer, string? Reading, string? Problem);

/// <summary>What a probe found at one instrument: identity, errors, round trips, and every read-only query of its profile.</summary>
/// <param name="Identity">The identity read through the profile; null when it could not be read.</param>
/// <param name="IdentityProblem">Why the identity could not be read; null when it could.</param>
/// <param name="Errors">What the instrument reported as errors after the queries (nothing in error mode none).</param>
/// <param name="RoundTrips">Round-trip times of the identity query, ms (empty without one).</param>
/// <param name="Queries">Each read-only query and its outcome.</param>
public sealed record ProbeReport(InstrumentIdentity? Identity, string? IdentityProblem, IReadOnlyList<InstrumentError> Errors, double[] RoundTrips, IReadOnlyList<ProbedQuery> Queries)
{
    /// <summary>True when the identity (where there is a query) and every query were understood.</summary>
    public bool AllUnderstood => IdentityProblem is null && Queries.All(q => q.Problem is null);
}

/// <summary>Exercises the read-only queries of a profile against a live instrument, so that a new profile is proven before a run:
/// identity, error reporting, and each state and measurement query of the role. It never sends a setting, so it never turns an output on.</summary>
public static class ProfileProbe
{
    /// <summary>The read-only queries of each section: safe to send at any time, they change nothing.</summary>
    public static IReadOnlyList<string> ReadOnlyQueries(string? section) => section switch
    {
        "supply" => ["supply.queryVoltage", "supply.queryCurrentLimit", "supply.queryOverVoltage", "supply.queryOutput", "supply.measureVoltage", "supply.measureCurrent"],
        "load" => ["load.queryCurrent", "load.queryInput", "load.measureVoltage", "load.measureCurrent", "load.queryRegulation"],
        _ => [],
    };

    /// <summary>Probes the instrument on <paramref name="session"/> with <paramref name="profile"/>; <paramref name="section"/> chooses the role's queries (null: identity and errors only).</summary>
    /// <param name="session">The open session (made with the profile's error mode and pacing).</param>
    /// <param name="profile">The profile to prove.</param>
    /// <param name="section">The profile section of the instrument's role; null when the role is not known.</param>
    /// <param name="count">How many identity queries to time.</param>
    /// <param name="time">The clock of the round-trip times.</param>
    /// <param name="cancellationToken">Cancels the probe.</param>
    public static async Task<ProbeReport> RunAsync(MessageSession session, InstrumentProfile profile, string? section, int count, TimeProvider time, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(session);
        ArgumentNullException.ThrowIfNull(profile);
        ArgumentNullException.ThrowIfNull(time);
        InstrumentIdentity? identity = null;
        string? identityProblem = null;
        var trips = new List<double>();
        if (profile.HasIdentity)
        {
            var query = profile.Query("common.identify");
            var answer = string.Empty;
            for (var i = 0; i < count; i++)
            {
                var started = time.GetTimestamp();
                answer = await session.QueryAsync(query, null, cancellationToken);
                trips.Add(time.GetElapsedTime(started).TotalMilliseconds);
            }

            try
            {
                identity = profile.ParseIdentity(answer);
            }
            catch (FormatException ex)
            {
                identityProblem = $"'{query}' answered, but not as the profile says: {ex.Message}";
            }
        }
        else
        {
            identity = profile.UnknownIdentity();
        }

        var queries = new List<ProbedQuery>();
        foreach (var operation in ReadOnlyQueries(section).Where(profile.Supports))
        {
            queries.Add(await QueryOneAsync(session, profile, operation, cancellationToken));
        }

        var errors = await session.DrainErrorsAsync(cancellationToken);
        return new ProbeReport(identity, identityProblem, errors, [.. trips], queries);
    }

    private static async Task<ProbedQuery> QueryOneAsync(MessageSession session, InstrumentProfile profile, string operation, CancellationToken cancellationToken)
    {
        string command;
        try
        {
            command = profile.Query(operation);
        }
        catch (NotSupportedException ex)
        {
            return new ProbedQuery(operation, string.Join("; ", profile.Commands(operation)), null, null, ex.Message);
        }

        string answer;
        try
        {
            answer = await session.QueryAsync(command, null, cancellationToken);
        }
        catch (InstrumentException ex)
        {
            return new ProbedQuery(operation, command, null, null, ex.Problem);
        }

        try
        {
            var reading = operation switch
            {
                "supply.queryOutput" or "load.queryInput" => profile.ParseBoolean(operation, answer) ? "on" : "off",
                "load.queryRegulation" => RegulationReading(profile, answer),
                _ => Quantity(operation, profile.ParseNumber(operation, answer)),
            };
            return new ProbedQuery(operation, command, answer, reading, null);
        }
        catch (FormatException ex)
        {
            return new ProbedQuery(operation, command, answer, null, ex.Message);
        }
    }

    private static string RegulationReading(InstrumentProfile profile, string answer)
    {
        var word = profile.ParseInteger("load.queryRegulation", answer);
        var mask = profile.Supports("load.regulationLostMask")
            ? int.Parse(profile.Commands("load.regulationLostMask")[0], System.Globalization.CultureInfo.InvariantCulture)
            : 0;
        return (word & mask) == 0 ? $"regulating (word {word}, lost-regulation bit {mask} clear)" : $"not regulating (word {word}, bit {mask} set)";
    }

    private static string Quantity(string operation, double si)
    {
        var unit = InstrumentProfile.Sections[InstrumentProfile.Section(operation)].First(o => operation.EndsWith("." + o.Op, StringComparison.Ordinal)).Unit;
        return double.IsPositiveInfinity(si) ? "over range" : double.IsNegativeInfinity(si) ? "over range (negative)" : double.IsNaN(si) ? "no data"
            : Core.Quantities.QuantityFormatter.Format(si, unit switch { "V" => Core.Quantities.SiUnit.Volt, "A" => Core.Quantities.SiUnit.Ampere, _ => Core.Quantities.SiUnit.None }, 6);
    }
}
