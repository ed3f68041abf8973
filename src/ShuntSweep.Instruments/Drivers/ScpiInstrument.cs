using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>What every SCPI role driver shares: the session, the profile, identity, the error queue and checked configuration.</summary>
internal abstract class ScpiInstrument(MessageSession session, InstrumentProfile profile) : IInstrument
{
    public string Resource => Session.Resource;

    public MessageSession Session { get; } = session;

    public InstrumentProfile Profile { get; } = profile;

    public async Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default)
    {
        var answer = await Session.QueryAsync(Profile.Query("common.identify"), null, cancellationToken);
        try
        {
            return ScpiResponse.ParseIdentity(answer);
        }
        catch (FormatException ex)
        {
            throw new InstrumentProtocolException(Resource, ex.Message, ex);
        }
    }

    public async Task<IReadOnlyList<InstrumentError>> ReadErrorsAsync(CancellationToken cancellationToken = default) =>
        await Session.DrainErrorsAsync(cancellationToken);

    /// <summary>Sends <paramref name="commands"/>, then drains the error queue and throws when the instrument rejected any of them.</summary>
    protected async Task SendCheckedAsync(IEnumerable<string> commands, string what, CancellationToken cancellationToken)
    {
        var sent = new List<string>();
        foreach (var c in commands)
        {
            await Session.WriteAsync(c, cancellationToken);
            sent.Add(c);
        }

        var errors = await Session.DrainErrorsAsync(cancellationToken);
        if (errors.Count > 0)
        {
            throw new InstrumentErrorException(Resource, $"{what} ({string.Join("; ", sent)})", errors);
        }
    }

    /// <summary>Sends <paramref name="commands"/> without reading the error queue (for the time-critical arm).</summary>
    protected async Task SendAsync(IReadOnlyList<string> commands, CancellationToken cancellationToken)
    {
        foreach (var c in commands)
        {
            await Session.WriteAsync(c, cancellationToken);
        }
    }

    protected async Task<double> QueryNumberAsync(string operation, TimeSpan? timeout, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        var answer = await Session.QueryAsync(query, timeout, cancellationToken);
        return Parse(query, answer, static a => ScpiResponse.ParseNumber(a));
    }

    protected async Task<bool> QueryBooleanAsync(string operation, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        var answer = await Session.QueryAsync(query, null, cancellationToken);
        return Parse(query, answer, static a => ScpiResponse.ParseBoolean(a));
    }

    protected async Task<int> QueryIntegerAsync(string operation, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        var answer = await Session.QueryAsync(query, null, cancellationToken);
        return Parse(query, answer, static a => ScpiResponse.ParseInteger(a));
    }

    protected T Parse<T>(string query, string answer, Func<string, T> parse)
    {
        try
        {
            return parse(answer);
        }
        catch (FormatException ex)
        {
            throw new InstrumentProtocolException(Resource, $"the answer to '{query}' is not understood: {ex.Message}", ex);
        }
    }

    /// <summary>A finite reading; a supply or load reporting overload or NaN is a fault, not a value.</summary>
    protected double Finite(double value, string what) =>
        double.IsFinite(value) ? value : throw new InstrumentProtocolException(Resource, $"{what} answered {value} (SCPI overload or not-a-number).");
}
