using ShuntSweep.Core.Documents;
using Spectre.Console;

namespace ShuntSweep.Cli.Composition;

/// <summary>How commands report errors and safety notes to the person at the terminal.</summary>
internal static class Terminal
{
    /// <summary>Writes an error message (file:line:col for bad input) in red and returns <paramref name="exitCode"/>.</summary>
    public static int Fail(string message, int exitCode)
    {
        AnsiConsole.MarkupLineInterpolated($"[red]error:[/] {message}");
        return exitCode;
    }

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
}
