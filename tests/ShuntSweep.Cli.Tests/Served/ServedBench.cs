using System.Diagnostics;
using System.Net.Sockets;
using System.Text;
using System.Text.RegularExpressions;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests.Served;

/// <summary>A simulated bench served by <c>shuntsweep sim serve</c> in its own process on loopback, and the TCP bench file that drives it: what a real bench is to the tool.</summary>
internal sealed partial class ServedBench : IAsyncDisposable
{
    private readonly Process _server;
    private readonly Dictionary<string, (string Host, int Port)> _endpoints;

    private ServedBench(Process server, Dictionary<string, (string, int)> endpoints, string benchFile, string directory)
    {
        _server = server;
        _endpoints = endpoints;
        BenchFile = benchFile;
        Directory = directory;
    }

    /// <summary>The bench file of <c>TCPIP::…::SOCKET</c> resources.</summary>
    public string BenchFile { get; }

    /// <summary>A scratch directory of the test's own.</summary>
    public string Directory { get; }

    /// <summary>True once the server process has ended.</summary>
    public bool HasExited => _server.HasExited;

    /// <summary>The path of <c>shuntsweep.dll</c> next to the tests.</summary>
    public static string Tool => Path.Combine(AppContext.BaseDirectory, "shuntsweep.dll");

    /// <summary>Serves <paramref name="simulatorYaml"/> (a simulated bench file whose <c>simulation</c> section is last) at <paramref name="speed"/> times real time,
    /// on the loopback address <paramref name="host"/> (127.0.0.1 or ::1).</summary>
    public static async Task<ServedBench> StartAsync(string simulatorYaml, double speed = 1, string host = "127.0.0.1")
    {
        var ct = TestContext.Current.CancellationToken;
        var dir = Some.TempDirectory();
        var simFile = Path.Combine(dir, "simulated.yaml");
        await File.WriteAllTextAsync(simFile, simulatorYaml, ct);
        var start = new ProcessStartInfo("dotnet", [Tool, "sim", "serve", simFile, "--host", host, "--port", "0", "--speed", speed.ToString(System.Globalization.CultureInfo.InvariantCulture)])
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            RedirectStandardInput = true,
        };
        var server = Process.Start(start)!;
        _ = server.StandardError.ReadToEndAsync(ct);
        var endpoints = new Dictionary<string, (string, int)>(StringComparer.Ordinal);
        using var deadline = CancellationTokenSource.CreateLinkedTokenSource(ct);
        deadline.CancelAfter(TimeSpan.FromSeconds(60));
        while (await server.StandardOutput.ReadLineAsync(deadline.Token) is { } line)
        {
            if (Endpoint().Match(line) is { Success: true } m)
            {
                endpoints[m.Groups["role"].Value] = (m.Groups["host"].Value, int.Parse(m.Groups["port"].Value, System.Globalization.CultureInfo.InvariantCulture));
            }

            if (line.Contains("Ctrl-C", StringComparison.Ordinal))
            {
                break;
            }
        }

        _ = server.StandardOutput.ReadToEndAsync(ct);
        Assert.True(endpoints.Count >= 3, "sim serve printed no endpoints");
        var benchText = simulatorYaml[..simulatorYaml.IndexOf("\nsimulation:", StringComparison.Ordinal)] + "\n";
        benchText = SimResource().Replace(benchText, m =>
        {
            var role = m.Groups["role"].Value;
            var (host, port) = endpoints[role];
            return $"{role}: {{ resource: \"TCPIP::{host}::{port}::SOCKET\"";
        });
        var benchFile = Path.Combine(dir, "tcp-bench.yaml");
        await File.WriteAllTextAsync(benchFile, benchText, ct);
        return new ServedBench(server, endpoints, benchFile, dir);
    }

    /// <summary>Asks the instrument at <paramref name="role"/> a query on a connection of the test's own; null when it does not answer within 3 s.</summary>
    public async Task<string?> AskAsync(string role, string query)
    {
        var (host, port) = _endpoints[role];
        using var deadline = new CancellationTokenSource(TimeSpan.FromSeconds(3));
        try
        {
            using var client = new TcpClient();
            await client.ConnectAsync(host.Trim('[', ']'), port, deadline.Token);
            var stream = client.GetStream();
            await stream.WriteAsync(Encoding.ASCII.GetBytes(query + "\n"), deadline.Token);
            var buffer = new byte[256];
            var text = new StringBuilder();
            while (!text.ToString().Contains('\n', StringComparison.Ordinal))
            {
                var n = await stream.ReadAsync(buffer, deadline.Token);
                if (n == 0)
                {
                    return null;
                }

                text.Append(Encoding.ASCII.GetString(buffer, 0, n));
            }

            return text.ToString().Trim();
        }
        catch (Exception e) when (e is OperationCanceledException or SocketException or IOException)
        {
            return null;
        }
    }

    /// <summary>Ends the server process at once, as a power cut of the whole bench would.</summary>
    public void Kill()
    {
        _server.Kill(entireProcessTree: true);
        _server.WaitForExit();
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync()
    {
        if (!_server.HasExited)
        {
            _server.Kill(entireProcessTree: true);
            await _server.WaitForExitAsync();
        }

        _server.Dispose();
    }

    [GeneratedRegex(@"^\s+(?<role>\w+)\s+TCPIP::(?<host>\[[0-9a-fA-F:.]+\]|[^:]+)::(?<port>\d+)::SOCKET")]
    private static partial Regex Endpoint();

    [GeneratedRegex(@"(?<role>supply|load|dropMeter|uutMeter|reference|shuntTap): \{ resource: ""SIM::\w+""")]
    private static partial Regex SimResource();
}

/// <summary>A <c>shuntsweep</c> process started by a test, with its output collected.</summary>
internal sealed class ToolProcess : IDisposable
{
    private readonly Process _process;
    private readonly StringBuilder _output = new();
    private readonly Lock _gate = new();

    private ToolProcess(Process process)
    {
        _process = process;
        process.OutputDataReceived += (_, e) => Append(e.Data);
        process.ErrorDataReceived += (_, e) => Append(e.Data);
        process.BeginOutputReadLine();
        process.BeginErrorReadLine();
    }

    /// <summary>The process id.</summary>
    public int Id => _process.Id;

    /// <summary>Everything the process printed so far.</summary>
    public string Output
    {
        get
        {
            lock (_gate)
            {
                return _output.ToString();
            }
        }
    }

    /// <summary>Starts <c>shuntsweep</c> with <paramref name="args"/>, its standard input a pipe (no terminal), archiving into a database of the test's own.</summary>
    public static ToolProcess Start(params string[] args) => Start(new Dictionary<string, string>(), args);

    /// <summary>Starts <c>shuntsweep</c> as <see cref="Start(string[])"/> does, with <paramref name="environment"/> added to its environment.</summary>
    public static ToolProcess Start(IReadOnlyDictionary<string, string> environment, params string[] args)
    {
        var start = new ProcessStartInfo("dotnet", [ServedBench.Tool, .. args])
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            RedirectStandardInput = true,
        };
        start.Environment["SHUNTSWEEP_ARCHIVE"] = Path.Combine(Some.TempDirectory(), "archive.db");
        start.Environment["COLUMNS"] = "200";
        foreach (var (name, value) in environment)
        {
            start.Environment[name] = value;
        }

        return new ToolProcess(Process.Start(start)!);
    }

    /// <summary>Waits for the process to end (at most <paramref name="limit"/>) and returns its exit code.</summary>
    public async Task<int> WaitAsync(TimeSpan limit)
    {
        using var deadline = CancellationTokenSource.CreateLinkedTokenSource(TestContext.Current.CancellationToken);
        deadline.CancelAfter(limit);
        try
        {
            await _process.WaitForExitAsync(deadline.Token);
        }
        catch (OperationCanceledException)
        {
            _process.Kill(entireProcessTree: true);
            throw new TimeoutException($"shuntsweep did not end within {limit.TotalSeconds} s. Output:\n{Output}");
        }

        _process.WaitForExit();
        return _process.ExitCode;
    }

    /// <summary>Waits until <paramref name="condition"/> holds, polling every 20 ms; fails naming <paramref name="what"/> and showing the output after <paramref name="limit"/>.</summary>
    public async Task WaitUntilAsync(Func<bool> condition, string what, TimeSpan limit)
    {
        var waited = Stopwatch.StartNew();
        while (!condition())
        {
            Assert.True(waited.Elapsed < limit, $"not in time: {what}. Output:\n{Output}");
            await Task.Delay(20, TestContext.Current.CancellationToken);
        }
    }

    /// <summary>Sends a POSIX signal (INT for Ctrl-C, TERM) to the process.</summary>
    public void Signal(string name)
    {
        using var kill = Process.Start("kill", ["-" + name, Id.ToString(System.Globalization.CultureInfo.InvariantCulture)])!;
        kill.WaitForExit();
    }

    /// <inheritdoc />
    public void Dispose()
    {
        if (!_process.HasExited)
        {
            _process.Kill(entireProcessTree: true);
        }

        _process.Dispose();
    }

    private void Append(string? line)
    {
        if (line is null)
        {
            return;
        }

        lock (_gate)
        {
            _output.AppendLine(line);
        }
    }
}
