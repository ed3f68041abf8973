using System.CommandLine;
using System.Globalization;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Instruments;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Simulation;
using Spectre.Console;

namespace ShuntSweep.Cli.Commands;

/// <summary><c>shuntsweep probe</c>: who answers at each resource, whether every read-only query of its profile is understood, what it reports as errors, and how long a round trip takes.</summary>
internal static class ProbeCommand
{
    public static Command Create()
    {
        var resourcesArg = new Argument<string[]>("resource")
        {
            Description = "Resource strings to probe, e.g. TCPIP::192.0.2.10::5025::SOCKET or ASRL/dev/ttyUSB0::INSTR.",
            Arity = ArgumentArity.ZeroOrMore,
        };
        var benchOpt = new Option<string?>("--bench") { Description = "Probe every instrument of this bench file, with its settings and profile." };
        var profileOpt = new Option<string?>("--profile") { Description = "Probe the resources given on the command line with this profile (a file, or scpi-99)." };
        var roleOpt = new Option<string?>("--role") { Description = "The profile section whose read-only queries to try on those resources: supply, load, voltmeter, uut or reference." };
        var countOpt = new Option<int>("--count") { Description = "Identity queries per instrument; the round trip is reported as median and 95th percentile.", DefaultValueFactory = _ => 1 };
        var timeoutOpt = new Option<double>("--timeout") { Description = "Seconds to wait for each answer (resources given on the command line).", DefaultValueFactory = _ => 2 };
        var trafficOpt = new Option<string?>("--traffic") { Description = "Write every command and response to this JSON-lines file." };
        var command = new Command("probe", "Ask instruments who they are, try every read-only query of their profiles, read their errors and time the round trip; never turns an output on.")
        {
            resourcesArg, benchOpt, profileOpt, roleOpt, countOpt, timeoutOpt, trafficOpt,
        };
        command.SetAction((parse, ct) => Terminal.GuardAsync(() => RunAsync(
            new Request(
                parse.GetValue(resourcesArg) ?? [],
                parse.GetValue(benchOpt),
                parse.GetValue(profileOpt),
                parse.GetValue(roleOpt),
                parse.GetValue(countOpt),
                parse.GetValue(timeoutOpt),
                parse.GetValue(trafficOpt)),
            ct)));
        return command;
    }

    private static async Task<int> RunAsync(Request request, CancellationToken ct)
    {
        if (request.Count < 1)
        {
            return Terminal.Fail($"--count must be at least 1, not {request.Count}.", ExitCodes.InvalidInput);
        }

        if (request.Timeout is <= 0 or > 3600)
        {
            return Terminal.Fail($"--timeout must be between 0 and 3600 s, not {request.Timeout}.", ExitCodes.InvalidInput);
        }

        string[] sections = ["supply", "load", "voltmeter", "uut", "reference"];
        if (request.Role is { } role && !sections.Contains(role))
        {
            return Terminal.Fail($"--role: '{role}' is not one of {string.Join(", ", sections)}.", ExitCodes.InvalidInput);
        }

        var given = request.Profile is null ? InstrumentProfile.Default : InstrumentProfile.Load(request.Profile, Directory.GetCurrentDirectory());
        var targets = new List<Target>();
        foreach (var text in request.Resources)
        {
            var address = ResourceAddress.Parse(text);
            if (address is SimulatedAddress)
            {
                return Terminal.Fail($"{text}: simulated instruments live inside a bench; probe them with --bench BENCH.", ExitCodes.InvalidInput);
            }

            var session = new SessionOptions { Timeout = TimeSpan.FromSeconds(request.Timeout) };
            targets.Add(new Target(text, address, DriverSettings.Default with { Session = session }, given, request.Role));
        }

        SimulatedBench? simulator = null;
        if (request.Bench is not null)
        {
            var bench = BenchReader.Load(BenchHost.Locate(request.Bench));
            var baseDirectory = Path.GetDirectoryName(Path.GetFullPath(bench.File));
            foreach (var entry in bench.Instruments.Values.OrderBy(e => e.Role))
            {
                var settings = DriverSettings.Read(entry.Settings, baseDirectory, entry.Role);
                if (settings.TypedByOperator || settings.StreamedReading is not null)
                {
                    AnsiConsole.MarkupLineInterpolated($"{BenchReader.KeyOf(entry.Role)}: not probed (its reading is typed by the operator or sent as a display stream; it has no identity query).");
                    continue;
                }

                var section = ProfileRequirements.SectionOf(entry.Role, settings.Shunt is not null);
                targets.Add(new Target($"{BenchReader.KeyOf(entry.Role)} {entry.Resource}", ResourceAddress.Parse(entry.Resource), settings, InstrumentProfile.Load(settings.Profile, baseDirectory), section));
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

        using var traffic = request.Traffic is null ? null : TrafficLog.Create(request.Traffic, TimeProvider.System, TimeProvider.System.GetUtcNow());
        try
        {
            var results = await Task.WhenAll(targets.Select(t => ProbeAsync(t, request.Count, simulator is null ? null : simulator.Connect, traffic, ct)));
            Show(results, request.Count);
            var answered = results.Count(r => r.Report is not null);
            if (answered == 0)
            {
                return Terminal.Fail($"nothing answered ({results.Length} resource(s) probed); check the cabling, the address and the termination.", ExitCodes.InstrumentFailure);
            }

            return results.All(r => r.Report is { AllUnderstood: true }) ? ExitCodes.Success : ExitCodes.InstrumentFailure;
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
            return new Result(target, await ProfileProbe.RunAsync(session, target.Profile, target.Section, count, time, ct), null);
        }
        catch (InstrumentException ex)
        {
            return new Result(target, null, ex.Problem);
        }
    }

    private static void Show(IReadOnlyList<Result> results, int count)
    {
        var table = new Table().AddColumns("resource", "profile", "identity", "errors", count > 1 ? $"round trip, median / 95th pct of {count}" : "round trip");
        foreach (var r in results)
        {
            var report = r.Report;
            var trips = report?.RoundTrips ?? [];
            var trip = trips.Length == 0
                ? "-"
                : count > 1
                    ? $"{QuantityFormatter.Format(Median(trips) / 1000, SiUnit.Second)} / {QuantityFormatter.Format(Percentile95(trips) / 1000, SiUnit.Second)}"
                    : $"{QuantityFormatter.Format(trips[0] / 1000, SiUnit.Second)}";
            var identity = report is null
                ? $"[red]{Markup.Escape(r.Failure ?? "no answer")}[/]"
                : report.IdentityProblem is { } problem ? $"[red]{Markup.Escape(problem)}[/]" : Markup.Escape(report.Identity!.ToString());
            var errors = report is null ? "-"
                : !r.Target.Profile.Errors.CanAsk ? "not reported (errors: none)"
                : report.Errors.Count == 0 ? "none" : Markup.Escape(string.Join("; ", report.Errors));
            table.AddRow(Markup.Escape(r.Target.Label), Markup.Escape(r.Target.Profile.Name), identity, errors, trip);
        }

        AnsiConsole.Write(table);
        var queries = results.Where(r => r.Report is { Queries.Count: > 0 }).ToList();
        if (queries.Count == 0)
        {
            return;
        }

        var detail = new Table().AddColumns("resource", "operation", "sent", "answer", "read as");
        foreach (var r in queries)
        {
            foreach (var q in r.Report!.Queries)
            {
                detail.AddRow(
                    Markup.Escape(r.Target.Label),
                    Markup.Escape(q.Operation),
                    Markup.Escape(q.Command),
                    q.Answer is null ? "-" : Markup.Escape(q.Answer),
                    q.Problem is { } p ? $"[red]{Markup.Escape(p)}[/]" : Markup.Escape(q.Reading ?? string.Empty));
            }
        }

        AnsiConsole.Write(detail);
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

    private sealed record Request(string[] Resources, string? Bench, string? Profile, string? Role, int Count, double Timeout, string? Traffic);

    private sealed record Target(string Label, ResourceAddress Address, DriverSettings Settings, InstrumentProfile Profile, string? Section);

    private sealed record Result(Target Target, ProbeReport? Report, string? Failure)
    {
        public override string ToString() => string.Create(CultureInfo.InvariantCulture, $"{Target.Label}: {(Report?.Identity?.ToString() ?? Failure)}");
    }
}
