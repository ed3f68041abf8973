using System.Diagnostics;

namespace ShuntSweep.Reporting;

/// <summary>Prints the HTML report to PDF in a headless Chromium: the page footers (report id, page x of y) and the page breaks come from the
/// report's print style, so the PDF is what printing the report from the browser gives.</summary>
public static class PdfPrinter
{
    /// <summary>The environment variable naming the browser executable, when it is not where Debian installs it.</summary>
    public const string BrowserVariable = "SHUNTSWEEP_BROWSER";

    private static readonly string[] KnownPlaces = ["/usr/bin/chromium", "/usr/bin/chromium-browser", "/usr/bin/google-chrome"];

    /// <summary>The browser to print with: <see cref="BrowserVariable"/> when set, else the first of Debian's usual places that exists; null when none.</summary>
    public static string? FindBrowser() =>
        Environment.GetEnvironmentVariable(BrowserVariable) is { Length: > 0 } named ? (File.Exists(named) ? named : null) : KnownPlaces.FirstOrDefault(File.Exists);

    /// <summary>Prints <paramref name="htmlPath"/> to <paramref name="pdfPath"/> with <paramref name="browser"/>; returns the PDF's path.</summary>
    /// <exception cref="IOException">The browser failed, timed out or wrote no PDF.</exception>
    public static async Task<string> PrintAsync(string htmlPath, string pdfPath, string browser, CancellationToken cancellationToken = default)
    {
        ArgumentNullException.ThrowIfNull(htmlPath);
        ArgumentNullException.ThrowIfNull(pdfPath);
        ArgumentNullException.ThrowIfNull(browser);
        var profile = Directory.CreateTempSubdirectory("shuntsweep-print-").FullName;
        var partial = pdfPath + ".tmp";
        try
        {
            // A profile of its own, no GPU and no sandbox (the page is our own file; the sandbox cannot start as root in containers).
            var info = new ProcessStartInfo(browser)
            {
                RedirectStandardError = true,
                RedirectStandardOutput = true,
                ArgumentList =
                {
                    "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", "--user-data-dir=" + profile, "--no-pdf-header-footer",
                    "--print-to-pdf=" + Path.GetFullPath(partial), new Uri(Path.GetFullPath(htmlPath)).AbsoluteUri,
                },
            };
            using var process = Process.Start(info) ?? throw new IOException($"{browser} did not start.");
            var stderr = process.StandardError.ReadToEndAsync(cancellationToken);
            _ = process.StandardOutput.ReadToEndAsync(cancellationToken);
            using var timeout = CancellationTokenSource.CreateLinkedTokenSource(cancellationToken);
            timeout.CancelAfter(TimeSpan.FromMinutes(2));
            try
            {
                await process.WaitForExitAsync(timeout.Token).ConfigureAwait(false);
            }
            catch (OperationCanceledException)
            {
                process.Kill(entireProcessTree: true);
                throw new IOException($"{browser} did not finish printing {htmlPath} within 2 minutes.");
            }

            if (process.ExitCode != 0 || !File.Exists(partial) || new FileInfo(partial).Length < 5 || !IsPdf(partial))
            {
                var said = (await stderr.ConfigureAwait(false)).Split('\n').Where(l => l.Length > 0 && !l.Contains("dbus", StringComparison.OrdinalIgnoreCase)).TakeLast(3);
                throw new IOException($"{browser} wrote no PDF of {htmlPath} (exit {process.ExitCode}). {string.Join(" ", said)}".TrimEnd());
            }

            File.Move(partial, pdfPath, overwrite: true);
            return pdfPath;
        }
        finally
        {
            File.Delete(partial);
            Directory.Delete(profile, recursive: true);
        }
    }

    private static bool IsPdf(string path)
    {
        Span<byte> head = stackalloc byte[5];
        using var file = File.OpenRead(path);
        return file.Read(head) == 5 && head.SequenceEqual("%PDF-"u8);
    }
}
