using System.CommandLine;
using System.Net;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation;
using ShuntSweep.Simulation.Hosting;

namespace ShuntSweep.Cli.Commands;

/// <summary>The <c>shuntsweep sim</c> commands: serve a simulated bench on TCP ports so any SCPI client can drive it.</summary>
internal static class SimCommand
{
    /// <summary>Builds <c>sim</c> with its <c>serve</c> subcommand.</summary>
    public static Command Create()
    {
        var bench = new Argument<FileInfo?>("bench")
        {
            Description = $"The simulated bench file (a bench file with a 'simulation' section). Default: {Composition.BenchHost.DefaultBench}.",
            Arity = ArgumentArity.ZeroOrOne,
        };
        var host = new Option<string>("--host")
        {
            Description = "The address to listen on (IPv4 or IPv6, ::1 say). Anything but loopback needs --allow-remote; 0.0.0.0 or :: listens on every interface and prints each one's resource strings.",
            DefaultValueFactory = _ => "127.0.0.1",
        };
        var port = new Option<int>("--port")
        {
            Description = "The first TCP port; the instruments take consecutive ports from it in the order supply, load, dmm, uut, ref. 0 picks free ports.",
            DefaultValueFactory = _ => 5025,
        };
        var speed = new Option<double>("--speed")
        {
            Description = "How many times faster than real time the simulated bench runs (thermal time constants, integration times, dwell).",
            DefaultValueFactory = _ => 1.0,
        };
        var seed = new Option<int>("--seed")
        {
            Description = "The seed of the noise and random faults; the same seed replays the same bench (the unit's parts follow from its serial number).",
            DefaultValueFactory = _ => 1,
        };
        var allowRemote = new Option<bool>("--allow-remote")
        {
            Description = "Allow a non-loopback --host. The simulator has no authentication: anyone who can reach the port can drive it.",
        };

        var writeBench = new Option<string?>("--write-bench")
        {
            Description = "Also write a bench file that drives the served instruments over TCP (the bench without its simulation section), for run, plan and probe.",
        };

        var serve = new Command("serve", "Serve the instruments of a simulated bench, one TCP port each, until Ctrl-C.")
        {
            bench, host, port, speed, seed, allowRemote, writeBench,
        };
        serve.SetAction((result, cancellationToken) => ServeAsync(
            result.GetValue(bench)?.FullName,
            result.GetValue(host) ?? "127.0.0.1",
            result.GetValue(port),
            result.GetValue(speed),
            result.GetValue(seed),
            result.GetValue(allowRemote),
            result.GetValue(writeBench),
            cancellationToken));

        return new Command("sim", "Run the physics-faithful simulated bench.") { serve };
    }

    private static async Task<int> ServeAsync(string? given, string hostText, int port, double speed, int seed, bool allowRemote, string? writeBench, CancellationToken cancellationToken)
    {
        if (!IPAddress.TryParse(hostText, out var address))
        {
            await Console.Error.WriteLineAsync($"--host: '{hostText}' is not an IP address (for example 127.0.0.1).");
            return ExitCodes.InvalidInput;
        }

        if (!IPAddress.IsLoopback(address) && !allowRemote)
        {
            await Console.Error.WriteLineAsync($"--host {address} is not a loopback address; the simulator has no authentication. Add --allow-remote to serve it on the network anyway.");
            return ExitCodes.InvalidInput;
        }

        if (port is < 0 or > 65535)
        {
            await Console.Error.WriteLineAsync($"--port: {port} is not a TCP port (0 to 65535).");
            return ExitCodes.InvalidInput;
        }

        if (!double.IsFinite(speed) || speed <= 0)
        {
            await Console.Error.WriteLineAsync($"--speed: {speed} must be a positive number (1 = real time).");
            return ExitCodes.InvalidInput;
        }

        string path;
        try
        {
            path = Composition.BenchHost.Locate(given);
        }
        catch (Exception ex) when (ex is FileNotFoundException or DocumentException)
        {
            await Console.Error.WriteLineAsync(ex.Message);
            return ExitCodes.InvalidInput;
        }

        BenchDescription description;
        SimulatedBench simulated;
        var clock = new RealBenchClock(speed == 1 ? TimeProvider.System : new ScaledTimeProvider(TimeProvider.System, speed));
        try
        {
            description = BenchReader.Load(path);
            simulated = SimulatedBench.Create(description, clock, seed);
        }
        catch (DocumentException ex)
        {
            await Console.Error.WriteLineAsync(ex.Message);
            return ExitCodes.InvalidInput;
        }

        await using (simulated)
        {
            TcpBenchHost tcp;
            try
            {
                tcp = TcpBenchHost.Start(simulated, address, port, allowRemote, line => Console.Error.WriteLine($"{TimeProvider.System.GetUtcNow():HH:mm:ss} {line}"));
            }
            catch (System.Net.Sockets.SocketException ex)
            {
                await Console.Error.WriteLineAsync($"Cannot listen on {address} from port {port}: {ex.Message}");
                return ExitCodes.InstrumentFailure;
            }

            await using (tcp)
            {
                Console.WriteLine($"Serving '{description.Name}' (UUT {description.Uut.Manufacturer} {description.Uut.Model} s/n {description.Uut.Serial}), seed {seed}, {(speed == 1 ? "real time" : $"{speed}x real time")}.");
                if (!IPAddress.IsLoopback(address))
                {
                    await Console.Error.WriteLineAsync(
                        $"warning: serving on {address} with --allow-remote: anyone who can reach these ports over the network can drive this simulated bench; it has no authentication. Serve on a trusted network only.");
                }

                foreach (var (name, served, _) in tcp.Endpoints)
                {
                    var role = description.Instruments.Values.First(i => string.Equals(i.Resource, "SIM::" + name, StringComparison.OrdinalIgnoreCase)).Role;
                    Console.WriteLine($"  {BenchReader.KeyOf(role),-10} {string.Join("  ", tcp.Addresses.Select(a => TcpBenchHost.ResourceFor(a, served)))}");
                }

                if (writeBench is not null)
                {
                    ServedBenchFile.Write(path, tcp.Endpoints.Select(e => (e.Name, e.Resource)), writeBench);
                    Console.WriteLine($"Bench file for these instruments: {writeBench}");
                }

                Console.WriteLine("Press Ctrl-C to stop.");
                try
                {
                    await Task.Delay(Timeout.Infinite, cancellationToken);
                }
                catch (OperationCanceledException)
                {
                }

                Console.WriteLine("Stopped.");
            }
        }

        return ExitCodes.Success;
    }
}
