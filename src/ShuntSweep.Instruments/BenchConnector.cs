using System.Net.Sockets;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
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
    /// <param name="readings">Where the operator types the UUT's reading, for a UUT of kind <c>operator</c>.</param>
    /// <exception cref="DocumentException">An instrument's settings or resource string are wrong.</exception>
    /// <exception cref="InstrumentException">An instrument could not be reached or did not answer properly.</exception>
    public static async Task<InstrumentBench> ConnectAsync(
        BenchDescription bench,
        IBenchClock clock,
        Func<string, Stream>? simulated,
        TrafficLog? traffic,
        CancellationToken cancellationToken,
        IVisaLibrary? visa = null,
        IReadingEntry? readings = null)
    {
        ArgumentNullException.ThrowIfNull(bench);
        ArgumentNullException.ThrowIfNull(clock);
        var context = new Context(simulated, visa, readings, clock.Time is VirtualTimeProvider ? TimeProvider.System : clock.Time, traffic);
        var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));

        // Read every instrument's settings first, so that a typo is reported before anything is opened.
        var plans = bench.Instruments.Values.Select(entry => Prepare(entry, baseDirectory, readings, bench.Uut.Ranges)).ToList();

        var connecting = plans.Select(p => ConnectOneAsync(p, context, cancellationToken)).ToList();
        try
        {
            await Task.WhenAll(connecting);
        }
        catch
        {
            foreach (var t in connecting.Where(t => t.IsCompletedSuccessfully))
            {
                await t.Result.Connection.DisposeAsync();
            }

            var failures = connecting.Where(t => t.IsFaulted).SelectMany(t => t.Exception!.InnerExceptions).ToList();
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
            connected.Values.Select(c => c.Connection).ToList(),
            connected.Values.Select(c => c.Info).OrderBy(i => i.Role).ToList(),
            Driver<IVoltmeter>(InstrumentRole.ShuntTap),
            context.IoTime);
    }

    /// <summary>Opens a message session to <paramref name="address"/> with <paramref name="settings"/> (also used by <c>shuntsweep probe</c>).</summary>
    public static async Task<MessageSession> OpenSessionAsync(
        ResourceAddress address,
        DriverSettings settings,
        InstrumentProfile profile,
        Func<string, Stream>? simulated,
        TimeProvider ioTime,
        TrafficTap? traffic,
        IVisaLibrary? visa,
        CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(address);
        ArgumentNullException.ThrowIfNull(settings);
        ArgumentNullException.ThrowIfNull(profile);
        var (transport, opener) = await OpenTransportAsync(address, settings, simulated, visa, ioTime, cancellationToken);
        var options = settings.Session with
        {
            ClearCommands = profile.Commands("common.afterResync"),
            Errors = profile.Errors,
            Pacing = profile.Pacing,
        };
        return new MessageSession(transport, options, opener, ioTime, traffic);
    }

    private static async Task<(ITransport Transport, TransportOpener Opener)> OpenTransportAsync(
        ResourceAddress address,
        DriverSettings settings,
        Func<string, Stream>? simulated,
        IVisaLibrary? visa,
        TimeProvider ioTime,
        CancellationToken cancellationToken)
    {
        var timeoutLimit = settings.Session.Timeout;
        try
        {
            var opener = TransportFactory.For(address, settings, simulated, visa);
            using var timeout = new CancellationTokenSource(timeoutLimit, ioTime);
            using var linked = CancellationTokenSource.CreateLinkedTokenSource(timeout.Token, cancellationToken);
            try
            {
                return (await opener(linked.Token), opener);
            }
            catch (OperationCanceledException) when (timeout.IsCancellationRequested && !cancellationToken.IsCancellationRequested)
            {
                throw new InstrumentConnectionException(address.Text, $"no connection within {QuantityFormatter.Format(timeoutLimit.TotalSeconds, SiUnit.Second)}.");
            }
        }
        catch (Exception ex) when (ex is SocketException or IOException or UnauthorizedAccessException or ArgumentException)
        {
            throw new InstrumentConnectionException(address.Text, $"cannot connect: {ex.Message}", ex);
        }
    }

    /// <summary>Reads every instrument's settings and profile and checks that each profile has what its role needs (every required operation,
    /// a code for every UUT range), without opening anything; the first problem is thrown with its file, line and column.</summary>
    /// <exception cref="DocumentException">A setting, resource string or profile is wrong or incomplete.</exception>
    public static void Validate(BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));
        foreach (var entry in bench.Instruments.Values)
        {
            Prepare(entry, baseDirectory, OperatorCheck.Instance, bench.Uut.Ranges);
        }
    }

    private static Plan Prepare(InstrumentEntry entry, string? baseDirectory, IReadingEntry? readings, IReadOnlyList<Core.Uut.RangeSpec> ranges)
    {
        var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
        if (settings.TypedByOperator)
        {
            return readings is null
                ? throw entry.Settings.Error($"{entry.Settings.What}: the UUT is read by the operator (kind: operator), which needs an interactive session.")
                : new Plan(entry, null, settings, InstrumentProfile.Default);
        }

        ResourceAddress address;
        try
        {
            address = ResourceAddress.Parse(entry.Resource);
        }
        catch (FormatException ex)
        {
            throw entry.Settings.Required("resource").Error($"{entry.Settings.What}.resource: {ex.Message}");
        }

        InstrumentProfile profile;
        try
        {
            profile = InstrumentProfile.Load(settings.Profile, settings.BaseDirectory);
        }
        catch (FileNotFoundException ex)
        {
            throw entry.Settings.Required("profile").Error($"{entry.Settings.What}.profile: {ex.Message}");
        }

        if (settings.StreamedReading is null)
        {
            var section = ProfileRequirements.SectionOf(entry.Role, settings.Shunt is not null);
            var problems = ProfileRequirements.Check(profile, section, entry.Role == InstrumentRole.UutMeter ? ranges : null);
            if (problems.Count > 0)
            {
                throw problems[0];
            }
        }

        return new Plan(entry, address, settings, profile);
    }

    private static async Task<Connected> ConnectOneAsync(Plan plan, Context context, CancellationToken cancellationToken)
    {
        var (entry, address, settings, profile) = plan;
        if (address is null)
        {
            var typed = new OperatorUutMeter(entry.Resource, context.Readings!);
            var info = new ConnectedInstrument(entry.Role, entry.Resource, await typed.IdentifyAsync(cancellationToken), "operator", []);
            return new Connected(info, typed, NoConnection.Instance);
        }

        if (settings.StreamedReading is { } streamed)
        {
            var (transport, _) = await OpenTransportAsync(address, settings, context.Simulated, context.Visa, context.IoTime, cancellationToken);
            var meter = new StreamedUutMeter(transport, streamed, settings.Session.Timeout, context.IoTime);
            var info = new ConnectedInstrument(entry.Role, address.Text, await meter.IdentifyAsync(cancellationToken), "display stream", []);
            return new Connected(info, meter, meter);
        }

        var tap = context.Traffic?.For(BenchReader.KeyOf(entry.Role), address.Text);
        var session = await OpenSessionAsync(address, settings, profile, context.Simulated, context.IoTime, tap, context.Visa, cancellationToken);
        try
        {
            var resilience = InstrumentResilience.Create(address.Text, settings.Resilience, context.IoTime);
            IInstrument driver = entry.Role switch
            {
                InstrumentRole.Supply => new ScpiSupply(session, profile, resilience),
                InstrumentRole.Load => new ScpiLoad(session, profile, resilience),
                InstrumentRole.DropMeter or InstrumentRole.ShuntTap => new ScpiVoltmeter(session, profile, settings.Timing, resilience),
                InstrumentRole.UutMeter => new ScpiUutMeter(session, profile, settings.Timing, settings.Nplc, resilience),
                InstrumentRole.Reference when settings.Shunt is { } shunt => new ShuntReferenceAmmeter(new ScpiVoltmeter(session, profile, settings.Timing, resilience), shunt),
                InstrumentRole.Reference => new ScpiReferenceAmmeter(session, profile, settings.Timing, resilience),
                _ => throw new ArgumentOutOfRangeException(nameof(plan), entry.Role, "unknown role"),
            };
            var identity = await driver.IdentifyAsync(cancellationToken);
            var errors = await driver.ReadErrorsAsync(cancellationToken);
            if (errors.Count > 0)
            {
                tap?.Note($"errors left in the queue on connection: {string.Join("; ", errors)}");
            }

            if (driver is ScpiUutMeter uut)
            {
                await uut.ApplyNplcAsync(cancellationToken);
            }

            return new Connected(new ConnectedInstrument(entry.Role, address.Text, identity, profile.Name, errors), driver, session);
        }
        catch
        {
            await session.DisposeAsync();
            throw;
        }
    }

    private sealed record Plan(InstrumentEntry Entry, ResourceAddress? Address, DriverSettings Settings, InstrumentProfile Profile);

    private sealed record Context(Func<string, Stream>? Simulated, IVisaLibrary? Visa, IReadingEntry? Readings, TimeProvider IoTime, TrafficLog? Traffic);

    private sealed record Connected(ConnectedInstrument Info, IInstrument Driver, IAsyncDisposable Connection);

    /// <summary>Stands in for the operator when a bench is only checked, so that a UUT of kind operator passes.</summary>
    private sealed class OperatorCheck : IReadingEntry
    {
        public static readonly OperatorCheck Instance = new();

        public Task<double> AskReadingAsync(string prompt, CancellationToken cancellationToken) =>
            throw new InvalidOperationException("a bench that is only checked reads nothing.");
    }

    private sealed class NoConnection : IAsyncDisposable
    {
        public static readonly NoConnection Instance = new();

        public ValueTask DisposeAsync() => ValueTask.CompletedTask;
    }
}
