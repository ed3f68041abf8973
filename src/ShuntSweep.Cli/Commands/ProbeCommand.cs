using System.CommandLine;
using System.Globalization;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Simulation;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep probe</c>: who answers at each resource, what is in its error queue, and how long a round trip takes.</summary>
internal static class ProbeCommand
{
    public static Command Create()
    {
        var resourcesArg = new Argument<string[]>("resource")
        {
            Description = "Resource strings to probe, e.g. TCPIP::192.0.2.10::5025::SOCKET or ASRL/dev/ttyUSB0::INSTR.",
            Arity = ArgumentArity.ZeroOrMore,
        };
        var benchOpt = new Option<string?>("--bench") { Description = "Probe every instrument of this bench file, with its settings." };
        var countOpt = new Option<int>("--count") { Description = "Identity queries per instrument; the round trip is reported as median and 95th percentile.", DefaultValueFactory = _ => 1 };
        var timeoutOpt = new Option<double>("--timeout") { Description = "Seconds to wait for each answer (resources given on the command line).", DefaultValueFactory = _ => 2 };
        var trafficOpt = new Option<string?>("--traffic") { Description = "Write every command and response to this JSON-lines file." };
        var command = new Command("probe", "Ask instruments who they are, read their error queues and time the round trip.")
        {
            resourcesArg, benchOpt, countOpt, timeoutOpt, trafficOpt,
        };
        command.SetAction((parse, ct) => Terminal.GuardAsync(() => RunAsync(
            parse.GetValue(resourcesArg) ?? [],
            parse.GetValue(benchOpt),
            parse.GetValue(countOpt),
            parse.GetValue(timeoutOpt),
            parse.GetValue(trafficOpt),
            ct)));
        return command;
    }

    private static async Task<int> RunAsync(string[] resources, string? benchPath, int count, double timeout, string? trafficPath, CancellationToken ct)
    {
        if (count < 1)
        {
            return Terminal.Fail($"--count must be at least 1, not {count}.", ExitCodes.InvalidInput);
        }

        if (timeout is <= 0 or > 3600)
        {
            return Terminal.Fail($"--timeout must be between 0 and 3600 s, not {timeout}.", ExitCodes.InvalidInput);
        }

        var targets = new List<Target>();
        foreach (var text in resources)
        {
            var address = ResourceAddress.Parse(text);
            if (address is SimulatedAddress)
            {
                return Terminal.Fail($"{text}: simulated instruments live inside a bench; probe them with --bench BENCH.", ExitCodes.InvalidInput);
            }

            targets.Add(new Target(text, address, DriverSettings.Default with { Session = new SessionOptions { Timeout = TimeSpan.FromSeconds(timeout) } }, InstrumentProfile.Default));
        }

        SimulatedBench? simulator = null;
        if (benchPath is not null)
        {
            var bench = BenchReader.Load(BenchHost.Locate(benchPath));
            var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));
            foreach (var entry in bench.Instruments.Values.OrderBy(e => e.Role))
            {
                var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
                if (settings.TypedByOperator || settings.StreamedReading is not null)
                {
                    AnsiConsole.MarkupLineInterpolated($"{BenchReader.KeyOf(entry.Role)}: not probed (its reading is typed by the operator or sent as a display stream; it has no *IDN?).");
                    continue;
                }

                targets.Add(new Target($"{BenchReader.KeyOf(entry.Role)} {entry.Resource}", ResourceAddress.Parse(entry.Resource), settings, InstrumentProfile.Load(settings.Profile, baseDirectory)));
            }

            if (bench.Instruments.Values.Any(i => i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase)))
            {
                simulator = SimulatedBench.Create(bench, BenchHost.ClockFor(bench), seed: 1);
            }
        }

        if (targets.Count == 0)
        {
            return Terminal.Fail("nothing to probe: give resource strings or --bench BENCH.", ExitCodes.InvalidInput);
        }

        using var traffic = trafficPath is null ? null : TrafficLog.Create(trafficPath, TimeProvider.System, TimeProvider.System.GetUtcNow());
        try
        {
            var results = await Task.WhenAll(targets.Select(t => ProbeAsync(t, count, simulator is null ? null : simulator.Connect, traffic, ct)));
            Show(results, count);
            var answered = results.Count(r => r.Identity is not null);
            if (answered == 0)
            {
                return Terminal.Fail($"nothing answered ({results.Length} resource(s) probed); check the cabling, the address and the termination.", ExitCodes.InstrumentFailure);
            }

            return answered == results.Length ? ExitCodes.Success : ExitCodes.InstrumentFailure;
        }
        finally
        {
            if (simulator is not null)
            {
                await simulator.DisposeAsync();
            }
        }
    }

    private static async Task<Result> ProbeAsync(Target target, int count, Func<string, Stream>? simulated, TrafficLog? traffic, CancellationToken ct)
    {
        var time = TimeProvider.System;
        try
        {
            await using var session = await BenchConnector.OpenSessionAsync(target.Address, target.Settings, target.Profile, simulated, time, traffic?.For("probe", target.Address.Text), null, ct);
            var identify = target.Profile.Query("common.identify");
            var trips = new double[count];
            string answer = string.Empty;
            for (var i = 0; i < count; i++)
            {
                var started = time.GetTimestamp();
                answer = await session.QueryAsync(identify, null, ct);
                trips[i] = time.GetElapsedTime(started).TotalMilliseconds;
            }

            var identity = ScpiResponse.ParseIdentity(answer);
            var errors = await session.DrainErrorsAsync(ct);
            return new Result(target.Label, identity.ToString(), errors, trips, null);
        }
        catch (InstrumentException ex)
        {
            return new Result(target.Label, null, [], [], ex.Problem);
        }
        catch (FormatException ex)
        {
            return new Result(target.Label, null, [], [], ex.Message);
        }
    }

    private static void Show(IReadOnlyList<Result> results, int count)
    {
        var table = new Table().AddColumns("resource", "identity", "error queue", count > 1 ? $"round trip, median / 95th pct of {count}" : "round trip");
        foreach (var r in results)
        {
            var trip = r.RoundTrips.Length == 0
                ? "-"
                : count > 1
                    ? $"{Median(r.RoundTrips):0.000} ms / {Percentile95(r.RoundTrips):0.000} ms"
                    : $"{r.RoundTrips[0]:0.000} ms";
            table.AddRow(
                Markup.Escape(r.Label),
                r.Identity is null ? $"[red]{Markup.Escape(r.Failure ?? "no answer")}[/]" : Markup.Escape(r.Identity),
                r.Identity is null ? "-" : r.Errors.Count == 0 ? "empty" : Markup.Escape(string.Join("; ", r.Errors)),
                trip);
        }

        AnsiConsole.Write(table);
    }

    /// <summary>The median (mean of the middle two for an even count).</summary>
    internal static double Median(IReadOnlyList<double> values)
    {
        var sorted = values.Order().ToArray();
        var mid = sorted.Length / 2;
        return sorted.Length % 2 == 1 ? sorted[mid] : (sorted[mid - 1] + sorted[mid]) / 2;
    }

    /// <summary>The 95th percentile by the nearest-rank method (the smallest value with at least 95 % of the values at or below it).</summary>
    internal static double Percentile95(IReadOnlyList<double> values)
    {
        var sorted = values.Order().ToArray();
        var rank = (int)Math.Ceiling(0.95 * sorted.Length);
        return sorted[Math.Clamp(rank, 1, sorted.Length) - 1];
    }

    private sealed record Target(string Label, ResourceAddress Address, DriverSettings Settings, InstrumentProfile Profile);

    private sealed record Result(string Label, string? Identity, IReadOnlyList<InstrumentError> Errors, double[] RoundTrips, string? Failure)
    {
        public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{Label}: {Identity ?? Failure}");
    }
}
