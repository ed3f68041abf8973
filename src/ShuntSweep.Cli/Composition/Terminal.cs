using System.Globalization;
using ShuntSweep.Core.Documents;
using Spectre.Console;

namespace ShuntSweep.Cli.Composition;

/// <summary>How commands talk to the person at the terminal: results on standard output, errors and cautions on standard error.</summary>
/// <remarks>Commands write results through <see cref="AnsiConsole"/>, which <see cref="Configure"/> points at standard output (or nowhere
/// under <c>--quiet</c>); <see cref="Error"/> always writes to standard error.</remarks>
internal static class Terminal
{
    /// <summary>The width used when the output is piped and COLUMNS is not set: wide enough that no line is ever wrapped.</summary>
    internal const int UnwrappedWidth = 32767;

    /// <summary>Errors, warnings and safety cautions; standard error, shown under <c>--quiet</c> too.</summary>
    public static IAnsiConsole Error { get; private set; } = AnsiConsole.Console;

    /// <summary>Points the result console at standard output (or discards it when <paramref name="quiet"/>) and the error console at standard error,
    /// each as wide as the terminal, or COLUMNS when set, or unwrapped when piped.</summary>
    public static void Configure(bool quiet)
    {
        var columns = Environment.GetEnvironmentVariable("COLUMNS");
        AnsiConsole.Console = Create(quiet ? TextWriter.Null : Console.Out, Console.IsOutputRedirected || quiet, columns);
        Error = Create(Console.Error, Console.IsErrorRedirected, columns);
    }

    /// <summary>The width text is laid out to: COLUMNS when it is a positive number, else the terminal's own width, else unwrapped when piped.</summary>
    internal static int? WidthFor(bool redirected, string? columns) =>
        int.TryParse(columns, NumberStyles.None, CultureInfo.InvariantCulture, out var c) && c > 0 ? c
        : redirected ? UnwrappedWidth
        : null;

    /// <summary>Writes an error message (file:line:col for bad input) to standard error and returns <paramref name="exitCode"/>.</summary>
    public static int Fail(string message, int exitCode)
    {
        Error.MarkupLineInterpolated($"[red]error:[/] {message}");
        return exitCode;
    }

    /// <summary>Writes a warning or note to standard error.</summary>
    public static void Note(string label, string message) => Error.MarkupLineInterpolated($"[yellow]{label}:[/] {message}");

    /// <summary>True when a person can answer a prompt here: standard input and output are a terminal.</summary>
    public static bool CanAsk => !Console.IsInputRedirected && AnsiConsole.Profile.Capabilities.Interactive;

    /// <summary>Writes a warning to standard error: something went wrong that loses no data.</summary>
    public static void Warn(string message) => Note("warning", message);

    /// <summary>Runs <paramref name="body"/>, turning bad input into exit code 2 with its position.</summary>
    public static async Task<int> GuardAsync(Func<Task<int>> body)
    {
        try
        {
            return await body();
        }
        catch (DocumentException ex)
        {
            return Fail(ex.Message, ExitCodes.InvalidInput);
        }
        catch (FileNotFoundException ex)
        {
            return Fail(ex.Message, ExitCodes.InvalidInput);
        }
        catch (DirectoryNotFoundException ex)
        {
            return Fail(ex.Message, ExitCodes.InvalidInput);
        }
        catch (ShuntSweep.Instruments.Messaging.InstrumentException ex)
        {
            // Raised before a run starts (connecting, identifying): no output has been turned on by then.
            return Fail(ex.Message, ExitCodes.InstrumentFailure);
        }
        catch (Exception ex) when (ex is FormatException or ArgumentException or InvalidDataException or KeyNotFoundException)
        {
            // Bad data inside a well-formed file (too few points in a range, an unknown range name, a malformed result.json).
            return Fail(ex.Message, ExitCodes.InvalidInput);
        }
    }

    private static IAnsiConsole Create(TextWriter writer, bool redirected, string? columns)
    {
        var console = AnsiConsole.Create(new AnsiConsoleSettings
        {
            Out = new AnsiConsoleOutput(writer),
            Ansi = redirected ? AnsiSupport.No : AnsiSupport.Detect,
            ColorSystem = redirected ? ColorSystemSupport.NoColors : ColorSystemSupport.Detect,
            Interactive = redirected ? InteractionSupport.No : InteractionSupport.Detect,
        });
        if (WidthFor(redirected, columns) is { } width)
        {
            console.Profile.Width = width;
        }

        return console;
    }
}
