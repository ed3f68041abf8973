using System.Net.Sockets;
using Serilog;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resilience;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Instruments.Transports;

namespace ShuntSweep.Instruments;

/// <summary>Connects every instrument of a bench description, checks who answers, and hands back the bench of role drivers.</summary>
public static class BenchConnector
{
    /// <summary>Opens every instrument of <paramref name="bench"/> (concurrently), asks <c>*IDN?</c>, drains <c>SYST:ERR?</c> and returns the connected bench.</summary>
    /// <param name="bench">The bench description; each instrument's driver settings are read strictly here.</param>
    /// <param name="clock">The bench clock; I/O timeouts run on it when it is real, and on the wall clock when it is virtual.</param>
    /// <param name="simulated">Opens the in-process stream of a simulated instrument by name (for <c>SIM::name</c> resources).</param>
    /// <param name="traffic">Receives every command and response; null to record nothing.</param>
    /// <param name="cancellationToken">Cancels connecting.</param>
    /// <param name="visa">Opens resources that need a VISA library (GPIB, VXI-11, HiSLIP); untested, see docs/instruments.md.</param>
    /// <exception cref="Core.Documents.DocumentException">An instrument's settings or resource string are wrong.</exception>
    /// <exception cref="InstrumentException">An instrument could not be reached or did not answer properly.</exception>
    public static async Task<InstrumentBench> ConnectAsync(
        BenchDescription bench,
        IBenchClock clock,
        Func<string, Stream>? simulated,
        ILogger? traffic,
        CancellationToken cancellationToken,
        IVisaLibrary? visa = null)
    {
        ArgumentNullException.ThrowIfNull(bench);
        ArgumentNullException.ThrowIfNull(clock);
        var ioTime = clock.Time is VirtualTimeProvider ? TimeProvider.System : clock.Time;
        var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));

        // Read every instrument's settings first, so that a typo is reported before anything is opened.
        var plans = bench.Instruments.Values
            .Select(entry => (Entry: entry, Address: ParseResource(entry), Settings: DriverSettings.Read(entry.Settings, baseDirectory)))
            .Select(p => (p.Entry, p.Address, p.Settings, Profile: LoadProfile(p.Entry, p.Settings)))
            .ToList();

        var connecting = plans.Select(p => ConnectOneAsync(p.Entry.Role, p.Address, p.Settings, p.Profile, simulated, visa, ioTime, traffic, cancellationToken)).ToList();
        try
        {
            await Task.WhenAll(connecting);
        }
        catch
        {
            foreach (var t in connecting.Where(t => t.IsCompletedSuccessfully))
            {
                await t.Result.Session.DisposeAsync();
            }

            var failures = connecting.Where(t => t.IsFaulted).SelectMany(t => t.Exception!.InnerExceptions).ToList();
            if (failures.Count == 1)
            {
                throw failures[0] is InstrumentException or Core.Documents.DocumentException
                    ? failures[0]
                    : new InstrumentConnectionException(failures[0].Message, "connecting failed.", failures[0]);
            }

            if (failures.Count > 1)
            {
                throw new AggregateException($"{failures.Count} instruments could not be connected: {string.Join(" | ", failures.Select(f => f.Message))}", failures);
            }

            throw;
        }

        var connected = connecting.Select(t => t.Result).ToDictionary(c => c.Info.Role);
        T? Driver<T>(InstrumentRole role)
            where T : class => connected.TryGetValue(role, out var c) ? c.Driver as T : null;

        return new InstrumentBench(
            clock,
            Driver<ISupply>(InstrumentRole.Supply) ?? throw new InvalidOperationException("the bench has no supply."),
            Driver<IElectronicLoad>(InstrumentRole.Load) ?? throw new InvalidOperationException("the bench has no load."),
            Driver<IVoltmeter>(InstrumentRole.DropMeter) ?? throw new InvalidOperationException("the bench has no drop meter."),
            Driver<IUutMeter>(InstrumentRole.UutMeter),
            Driver<IReferenceAmmeter>(InstrumentRole.Reference),
            connected.Values.Select(c => (IAsyncDisposable)c.Session).ToList(),
            connected.Values.Select(c => c.Info).OrderBy(i => i.Role).ToList());
    }

    /// <summary>Opens a message session to <paramref name="address"/> with <paramref name="settings"/> (also used by <c>shuntsweep probe</c>).</summary>
    public static async Task<MessageSession> OpenSessionAsync(
        ResourceAddress address,
        DriverSettings settings,
        InstrumentProfile profile,
        Func<string, Stream>? simulated,
        TimeProvider ioTime,
        ILogger? traffic,
        IVisaLibrary? visa,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(address);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(profile);
        var opener = TransportFactory.For(address, settings, simulated, visa);
        var options = settings.Session with
        {
            ClearCommands = profile.Commands("common.afterResync"),
            ErrorQuery = profile.Query("common.nextError"),
        };
        using var timeout = new CancellationTokenSource(options.Timeout, ioTime);
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(timeout.Token, cancellationToken);
        ITransport transport;
        try
        {
            transport = await opener(linked.Token);
        }
        catch (OperationCanceledException) when (timeout.IsCancellationRequested && !cancellationToken.IsCancellationRequested)
        {
            throw new InstrumentConnectionException(address.Text, $"no connection within {options.Timeout.TotalSeconds:0.###} s.");
        }
        catch (Exception ex) when (ex is SocketException or IOException or UnauthorizedAccessException or ArgumentException)
        {
            throw new InstrumentConnectionException(address.Text, $"cannot connect: {ex.Message}", ex);
        }

        return new MessageSession(transport, options, opener, ioTime, traffic);
    }

    private static async Task<Connected> ConnectOneAsync(
        InstrumentRole role,
        ResourceAddress address,
        DriverSettings settings,
        InstrumentProfile profile,
        Func<string, Stream>? simulated,
        IVisaLibrary? visa,
        TimeProvider ioTime,
        ILogger? traffic,
        CancellationToken cancellationToken)
    {
        var session = await OpenSessionAsync(address, settings, profile, simulated, ioTime, traffic, visa, cancellationToken);
        try
        {
            var resilience = InstrumentResilience.Create(address.Text, settings.Resilience, ioTime);
            ScpiInstrument driver = role switch
            {
                InstrumentRole.Supply => new ScpiSupply(session, profile, resilience),
                InstrumentRole.Load => new ScpiLoad(session, profile, resilience),
                InstrumentRole.DropMeter => new ScpiVoltmeter(session, profile, settings.Timing, resilience),
                InstrumentRole.UutMeter => new ScpiUutMeter(session, profile, settings.Timing, settings.Nplc, resilience),
                InstrumentRole.Reference => new ScpiReferenceAmmeter(session, profile, settings.Timing, resilience),
                _ => throw new ArgumentOutOfRangeException(nameof(role), role, "unknown role"),
            };
            var identity = await driver.IdentifyAsync(cancellationToken);
            var errors = await driver.ReadErrorsAsync(cancellationToken);
            if (driver is ScpiUutMeter uut)
            {
                await uut.ApplyNplcAsync(cancellationToken);
            }

            if (errors.Count > 0)
            {
                traffic?.ForContext("Resource", session.Resource).Warning("errors left in the queue on connection: {Errors}", string.Join("; ", errors));
            }

            return new Connected(new ConnectedInstrument(role, address.Text, identity, profile.Name, errors), driver, session);
        }
        catch
        {
            await session.DisposeAsync();
            throw;
        }
    }

    private static ResourceAddress ParseResource(InstrumentEntry entry)
    {
        try
        {
            return ResourceAddress.Parse(entry.Resource);
        }
        catch (FormatException ex)
        {
            throw entry.Settings.Required("resource").Error($"{entry.Settings.What}.resource: {ex.Message}");
        }
    }

    private static InstrumentProfile LoadProfile(InstrumentEntry entry, DriverSettings settings)
    {
        try
        {
            return InstrumentProfile.Load(settings.Profile, settings.BaseDirectory);
        }
        catch (FileNotFoundException ex)
        {
            throw entry.Settings.Required("profile").Error($"{entry.Settings.What}.profile: {ex.Message}");
        }
    }

    private sealed record Connected(ConnectedInstrument Info, ScpiInstrument Driver, MessageSession Session);
}
