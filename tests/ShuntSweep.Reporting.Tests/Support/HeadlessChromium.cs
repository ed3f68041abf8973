using System.Diagnostics;
using System.Net.WebSockets;
using System.Text;
using System.Text.Json;
using System.Text.Json.Nodes;

namespace ShuntSweep.Reporting.Tests.Support;

/// <summary>Debian's chromium driven headless over the DevTools protocol: load a page, watch every request it makes, evaluate script, take a screenshot.</summary>
internal sealed class HeadlessChromium : IAsyncDisposable
{
    /// <summary>Where Debian installs chromium.</summary>
    public const string Executable = "/usr/bin/chromium";

    private static readonly TimeSpan Timeout = TimeSpan.FromSeconds(60);
    private readonly Process _process;
    private readonly string _profile;
    private readonly ClientWebSocket _socket = new();
    private readonly Dictionary<int, TaskCompletionSource<JsonObject>> _pending = [];
    private readonly List<JsonObject> _events = [];
    private readonly Lock _lock = new();
    private readonly CancellationTokenSource _stop = new();
    private Task? _receiver;
    private int _nextId;

    private HeadlessChromium(Process process, string profile)
    {
        _process = process;
        _profile = profile;
    }

    /// <summary>Whether chromium is installed.</summary>
    public static bool IsInstalled => File.Exists(Executable);

    /// <summary>Every URL the page asked for since navigation (Network.requestWillBeSent).</summary>
    public IReadOnlyList<string> RequestedUrls
    {
        get
        {
            lock (_lock)
            {
                return _events.Where(e => (string?)e["method"] == "Network.requestWillBeSent").Select(e => (string)e["params"]!["request"]!["url"]!).ToList();
            }
        }
    }

    /// <summary>Starts chromium with a new empty profile and no background services, attached to its first page.</summary>
    public static async Task<HeadlessChromium> StartAsync(int width, int height)
    {
        var profile = Path.Combine(Path.GetTempPath(), "shuntsweep-chromium", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(profile);
        var info = new ProcessStartInfo(Executable) { RedirectStandardError = true, RedirectStandardOutput = true, UseShellExecute = false };
        foreach (var a in new[]
        {
            "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
            "--disable-component-update", "--disable-sync", $"--user-data-dir={profile}", "--remote-debugging-port=0",
            $"--window-size={width},{height}", "--hide-scrollbars", "about:blank",
        })
        {
            info.ArgumentList.Add(a);
        }

        var process = Process.Start(info) ?? throw new InvalidOperationException("chromium did not start.");
        var browser = new HeadlessChromium(process, profile);
        try
        {
            using var timeout = new CancellationTokenSource(Timeout);
            string? endpoint = null;
            while (endpoint is null)
            {
                var line = await process.StandardError.ReadLineAsync(timeout.Token) ?? throw new InvalidOperationException("chromium exited before opening its DevTools port.");
                var at = line.IndexOf("ws://", StringComparison.Ordinal);
                if (line.Contains("DevTools listening on", StringComparison.Ordinal) && at >= 0)
                {
                    endpoint = line[at..].Trim();
                }
            }

            _ = process.StandardError.ReadToEndAsync(CancellationToken.None);
            var port = new Uri(endpoint).Port;
            using var http = new HttpClient();
            var targets = JsonNode.Parse(await http.GetStringAsync(new Uri($"http://127.0.0.1:{port}/json/list"), timeout.Token))!.AsArray();
            var page = targets.First(t => (string?)t!["type"] == "page")!;
            await browser._socket.ConnectAsync(new Uri((string)page["webSocketDebuggerUrl"]!), timeout.Token);
            browser._receiver = browser.ReceiveAsync();
            return browser;
        }
        catch
        {
            await browser.DisposeAsync();
            throw;
        }
    }

    /// <summary>Sends one DevTools command and waits for its answer.</summary>
    public async Task<JsonObject> SendAsync(string method, JsonObject? parameters = null)
    {
        var tcs = new TaskCompletionSource<JsonObject>(TaskCreationOptions.RunContinuationsAsynchronously);
        int id;
        lock (_lock)
        {
            id = ++_nextId;
            _pending[id] = tcs;
        }

        var message = new JsonObject { ["id"] = id, ["method"] = method, ["params"] = parameters ?? [] };
        await _socket.SendAsync(Encoding.UTF8.GetBytes(message.ToJsonString()), WebSocketMessageType.Text, true, CancellationToken.None);
        var answer = await tcs.Task.WaitAsync(Timeout);
        return answer["error"] is { } error ? throw new InvalidOperationException($"{method}: {error.ToJsonString()}") : (JsonObject)answer["result"]!;
    }

    /// <summary>Records network requests, navigates to <paramref name="url"/> and waits for its load event.</summary>
    public async Task NavigateAsync(string url)
    {
        await SendAsync("Network.enable");
        await SendAsync("Page.enable");
        await SendAsync("Page.navigate", new JsonObject { ["url"] = url });
        using var timeout = new CancellationTokenSource(Timeout);
        while (!HasEvent("Page.loadEventFired"))
        {
            await Task.Delay(50, timeout.Token);
        }
    }

    /// <summary>Evaluates <paramref name="expression"/> in the page and returns its JSON value.</summary>
    public async Task<JsonNode?> EvaluateAsync(string expression)
    {
        var result = await SendAsync("Runtime.evaluate", new JsonObject { ["expression"] = expression, ["returnByValue"] = true, ["awaitPromise"] = true });
        return result["exceptionDetails"] is { } ex ? throw new InvalidOperationException(ex.ToJsonString()) : result["result"]!["value"]?.DeepClone();
    }

    /// <summary>A PNG screenshot of the whole page.</summary>
    public async Task<byte[]> ScreenshotAsync()
    {
        var result = await SendAsync("Page.captureScreenshot", new JsonObject { ["format"] = "png", ["captureBeyondViewport"] = true });
        return Convert.FromBase64String((string)result["data"]!);
    }

    public async ValueTask DisposeAsync()
    {
        await _stop.CancelAsync();
        try
        {
            if (_socket.State == WebSocketState.Open)
            {
                await _socket.CloseOutputAsync(WebSocketCloseStatus.NormalClosure, null, CancellationToken.None);
            }
        }
        catch (WebSocketException)
        {
            // The browser is going away anyway.
        }

        if (!_process.HasExited)
        {
            _process.Kill(entireProcessTree: true);
        }

        await _process.WaitForExitAsync();
        _process.Dispose();
        _socket.Dispose();
        _stop.Dispose();
        try
        {
            Directory.Delete(_profile, recursive: true);
        }
        catch (IOException)
        {
            // Chromium may still be flushing its profile; the temp folder is cleaned later.
        }
    }

    private bool HasEvent(string method)
    {
        lock (_lock)
        {
            return _events.Any(e => (string?)e["method"] == method);
        }
    }

    private async Task ReceiveAsync()
    {
        var buffer = new byte[1 << 20];
        var message = new MemoryStream();
        try
        {
            while (!_stop.IsCancellationRequested)
            {
                var r = await _socket.ReceiveAsync(buffer, _stop.Token);
                if (r.MessageType == WebSocketMessageType.Close)
                {
                    return;
                }

                message.Write(buffer, 0, r.Count);
                if (!r.EndOfMessage)
                {
                    continue;
                }

                var node = JsonNode.Parse(message.ToArray())!.AsObject();
                message.SetLength(0);
                lock (_lock)
                {
                    if (node["id"] is { } idNode && _pending.Remove(idNode.GetValue<int>(), out var tcs))
                    {
                        tcs.SetResult(node);
                    }
                    else if (node["method"] is not null)
                    {
                        _events.Add(node);
                    }
                }
            }
        }
        catch (OperationCanceledException)
        {
            // Disposed.
        }
        catch (WebSocketException)
        {
            // The browser closed the connection.
        }
        catch (JsonException)
        {
            // A message cut off at shutdown.
        }
    }
}
