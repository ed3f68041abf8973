namespace ShuntSweep.Instruments.Messaging;

/// <summary>How an instrument reports that it rejected a command.</summary>
public enum ErrorMode
{
    /// <summary>An SCPI error queue: <c>code,"message"</c> entries read until code 0 (SCPI-99 <c>SYSTem:ERRor?</c>).</summary>
    Queue,

    /// <summary>A queue of bare codes: a whole number per read, 0 when empty.</summary>
    Code,

    /// <summary>A status word read once; the bits of the mask mean an error.</summary>
    Status,

    /// <summary>No way to ask: settings are checked by reading them back instead.</summary>
    None,
}

/// <summary>How the session asks an instrument for its errors (mode, query, mask, and a command that clears a held error).</summary>
/// <param name="Mode">The error reporting mode.</param>
/// <param name="Query">The query that reads one entry or the status word; empty in mode <see cref="ErrorMode.None"/>.</param>
/// <param name="Mask">In mode <see cref="ErrorMode.Status"/>, the bits that mean an error.</param>
/// <param name="Clear">Sent after an error was read, for instruments that hold an error until told; empty when not needed.</param>
public sealed record ErrorReporting(ErrorMode Mode, string Query, int Mask = 0, string Clear = "")
{
    /// <summary>The SCPI-99 error queue, <c>SYST:ERR?</c>.</summary>
    public static ErrorReporting Scpi { get; } = new(ErrorMode.Queue, "SYST:ERR?");

    /// <summary>No error reporting.</summary>
    public static ErrorReporting Nothing { get; } = new(ErrorMode.None, string.Empty);

    /// <summary>True when the instrument can be asked for errors at all.</summary>
    public bool CanAsk => Mode != ErrorMode.None;
}

/// <summary>How fast commands may follow each other: a gap after every command and, per command, a processing time during which the instrument hears nothing.</summary>
/// <param name="Gap">The least time between the end of one command and the start of the next.</param>
/// <param name="Processing">Per command header (the text before its first space or placeholder; open when a placeholder follows it directly,
/// as in <c>R{code}</c>, so that any text may follow), how long the instrument is busy after it.</param>
public sealed record CommandPacing(TimeSpan Gap, IReadOnlyList<(string Header, bool Open, TimeSpan Busy)> Processing)
{
    /// <summary>No pacing: commands go out as fast as the link carries them.</summary>
    public static CommandPacing None { get; } = new(TimeSpan.Zero, []);

    /// <summary>True when no command needs a wait.</summary>
    public bool IsNone => Gap == TimeSpan.Zero && Processing.Count == 0;

    /// <summary>How long the instrument needs after <paramref name="command"/> before it hears the next one.</summary>
    public TimeSpan After(string command)
    {
        ArgumentNullException.ThrowIfNull(command);
        var wait = Gap;
        foreach (var (header, open, busy) in Processing)
        {
            if (busy > wait && command.StartsWith(header, StringComparison.OrdinalIgnoreCase)
                && (open || command.Length == header.Length || !char.IsAsciiLetterOrDigit(command[header.Length]) || !char.IsAsciiLetterOrDigit(header[^1])))
            {
                wait = busy;
            }
        }

        return wait;
    }
}
