using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>What every SCPI role driver shares: the session, the profile, identity, the error queue, checked and re-verifiable settings, and re-initialisation after a reconnect.</summary>
/// <remarks>
/// Every setting the driver applied is remembered; when the session had to reconnect (the instrument restarted or the link dropped),
/// the settings are sent again before the next operation. Output and input states are not restored: an output that went off stays off.
/// </remarks>
internal abstract class ScpiInstrument(MessageSession session, InstrumentProfile profile, InstrumentResilience? resilience) : IInstrument
{
    /// <summary>How many times an off command is sent before an output that still reads on counts as not switched off.</summary>
    private const int OffAttempts = 3;

    private readonly InstrumentResilience _resilience = resilience ?? InstrumentResilience.Direct(session.Resource);
    private readonly List<(string Key, IReadOnlyList<string> Commands)> _configuration = [];
    private int _generation = session.Generation;

    public string Resource => Session.Resource;

    public MessageSession Session { get; } = session;

    public InstrumentProfile Profile { get; } = profile;

    public Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default)
    {
        if (!Profile.HasIdentity)
        {
            return Task.FromResult(Profile.UnknownIdentity());
        }

        var query = Profile.Query("common.identify");
        return QueryAsync(async ct => Parse(query, await Session.QueryAsync(query, null, ct), Profile.ParseIdentity), cancellationToken);
    }

    public Task<IReadOnlyList<InstrumentError>> ReadErrorsAsync(CancellationToken cancellationToken = default) =>
        QueryAsync(async ct => await Session.DrainErrorsAsync(ct), cancellationToken);

    /// <summary>Runs a query that is safe to repeat, with retries and reconnects.</summary>
    protected Task<T> QueryAsync<T>(Func<CancellationToken, Task<T>> query, CancellationToken cancellationToken) =>
        _resilience.RunAsync(
            Repetition.Repeatable,
            async (_, ct) =>
            {
                await RestoreAsync(ct);
                return await query(ct);
            },
            cancellationToken);

    /// <summary>Runs an operation that must not be repeated (arm, fetch).</summary>
    protected Task<T> OnceAsync<T>(Func<CancellationToken, Task<T>> operation, CancellationToken cancellationToken) =>
        _resilience.RunAsync(
            Repetition.Once,
            async (_, ct) =>
            {
                await RestoreAsync(ct);
                return await operation(ct);
            },
            cancellationToken);

    /// <summary>Applies a setting and checks the error queue; after a failure on the way it is re-verified by <paramref name="verify"/> and sent again only when it did not take.</summary>
    /// <param name="key">What the setting is, so that a later value replaces it in the remembered configuration; null to not remember it (output states).</param>
    /// <param name="commands">The commands of the setting.</param>
    /// <param name="what">What is being done, for messages.</param>
    /// <param name="verify">A query that says whether the setting is in force; null when there is none, in which case the setting is never repeated.</param>
    /// <param name="safeOff">True for switching an output off, which must get through even when the circuit breaker is open.</param>
    /// <param name="cancellationToken">Cancels the operation.</param>
    protected async Task ApplyAsync(string? key, IReadOnlyList<string> commands, string what, Func<CancellationToken, Task<bool>>? verify, bool safeOff, CancellationToken cancellationToken)
    {
        var repetition = safeOff ? Repetition.SafeOff : verify is null ? Repetition.Once : Repetition.Repeatable;
        await _resilience.RunAsync(
            repetition,
            async (attempt, ct) =>
            {
                if (safeOff)
                {
                    await SwitchOffAsync(commands, what, verify, ct);
                    return true;
                }

                await RestoreAsync(ct);
                if (attempt > 0 && verify is not null && await verify(ct))
                {
                    return true; // The setting arrived before the failure: sending it again is not needed.
                }

                await SendCheckedAsync(commands, what, ct);
                if ((attempt > 0 || !Profile.Errors.CanAsk) && verify is not null && !await verify(ct))
                {
                    // Without an error queue a rejected setting is found only by reading it back.
                    throw new InstrumentProtocolException(
                        Resource,
                        attempt > 0 ? $"{what}: the setting is not in force after sending it again." : $"{what}: the instrument did not take the setting (read back after {string.Join("; ", commands)}).");
                }

                return true;
            },
            cancellationToken);

        if (key is not null)
        {
            _configuration.RemoveAll(c => c.Key == key);
            _configuration.Add((key, commands));
        }
    }

    /// <summary>Switches an output off without first restoring configuration, and judges success by reading the state back, so that neither a failed restore nor an old error in the queue can stop it.</summary>
    /// <remarks>An off command the instrument lost (it came while the instrument was still busy, or line noise ate it) is sent again, up to
    /// <see cref="OffAttempts"/> times in all, before the output counts as still on.</remarks>
    private async Task SwitchOffAsync(IReadOnlyList<string> commands, string what, Func<CancellationToken, Task<bool>>? verify, CancellationToken cancellationToken)
    {
        for (var attempt = 1; ; attempt++)
        {
            foreach (var c in commands)
            {
                await Session.WriteUrgentAsync(c, cancellationToken);
            }

            var errors = await Session.DrainErrorsAsync(cancellationToken);
            if (verify is null)
            {
                if (errors.Count > 0)
                {
                    throw new InstrumentErrorException(Resource, $"{what} ({string.Join("; ", commands)})", errors);
                }

                return;
            }

            if (await verify(cancellationToken))
            {
                return;
            }

            if (attempt == OffAttempts)
            {
                throw errors.Count > 0
                    ? new InstrumentErrorException(Resource, $"{what} ({string.Join("; ", commands)}): still on after {OffAttempts} attempts", errors)
                    : new InstrumentProtocolException(Resource, $"{what}: the instrument still reports the output on after {OffAttempts} attempts.");
            }
        }
    }

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

    protected async Task<double> QueryNumberAsync(string operation, TimeSpan? timeout, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        return await QueryAsync(async ct => Parse(query, await Session.QueryAsync(query, timeout, ct), a => Profile.ParseNumber(operation, a)), cancellationToken);
    }

    protected async Task<bool> QueryBooleanAsync(string operation, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        return await QueryAsync(async ct => Parse(query, await Session.QueryAsync(query, null, ct), a => Profile.ParseBoolean(operation, a)), cancellationToken);
    }

    protected async Task<int> QueryIntegerAsync(string operation, CancellationToken cancellationToken)
    {
        var query = Profile.Query(operation);
        return await QueryAsync(async ct => Parse(query, await Session.QueryAsync(query, null, ct), a => Profile.ParseInteger(operation, a)), cancellationToken);
    }

    /// <summary>A verifier that reads <paramref name="operation"/> back and compares it with <paramref name="expected"/> (to 0.01 %, as instruments round settings to their resolution).</summary>
    /// <param name="operation">The query that reads the setting back.</param>
    /// <param name="expected">The value that was set, in SI units.</param>
    /// <param name="sentBy">The operation that sent it, whose number format may have rounded it; null when not rounded.</param>
    protected Func<CancellationToken, Task<bool>>? VerifyNumber(string operation, double expected, string? sentBy = null)
    {
        if (!Profile.Supports(operation))
        {
            return null;
        }

        var sent = expected;
        if (sentBy is not null && Profile.Supports(sentBy))
        {
            var op = Profile.Operation(sentBy);
            sent = op.ReadValue(op.FormatValue(expected, 50), 50);
        }

        return async ct =>
        {
            var query = Profile.Query(operation);
            var actual = Parse(query, await Session.QueryAsync(query, null, ct), a => Profile.ParseNumber(operation, a));
            return Math.Abs(actual - sent) <= 1e-12 + (1e-4 * Math.Abs(sent));
        };
    }

    /// <summary>A verifier that reads the boolean <paramref name="operation"/> back.</summary>
    protected Func<CancellationToken, Task<bool>>? VerifyBoolean(string operation, bool expected) =>
        Profile.Supports(operation)
            ? async ct =>
            {
                var query = Profile.Query(operation);
                return Parse(query, await Session.QueryAsync(query, null, ct), a => Profile.ParseBoolean(operation, a)) == expected;
            }
            : null;

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

    /// <summary>Re-sends the remembered configuration when the session reconnected since the last operation.</summary>
    private async Task RestoreAsync(CancellationToken cancellationToken)
    {
        await Session.EnsureReadyAsync(cancellationToken);
        if (Session.Generation == _generation)
        {
            return;
        }

        var generation = Session.Generation;
        foreach (var (key, commands) in _configuration.ToList())
        {
            try
            {
                await SendCheckedAsync(commands, $"restoring '{key}' after reconnecting", cancellationToken);
            }
            catch (InstrumentTimeoutException ex)
            {
                throw new InstrumentUnresponsiveException(Resource, $"it did not answer after reconnecting either ({ex.Problem.TrimEnd('.')}); it is taken as hung and not tried again.", ex);
            }
        }

        _generation = generation;
    }
}
