namespace ShuntSweep.Instruments.Messaging;

/// <summary>How a session talks to one instrument: terminators, timeout, what to send after a stale answer was discarded.</summary>
public sealed record SessionOptions
{
    /// <summary>Appended to every command; the default value is LF ("\n"), the IEEE 488.2 program message terminator over a byte stream.</summary>
    public string WriteTermination { get; init; } = "\n";

    /// <summary>Ends every response; the default value is LF ("\n") (IEEE 488.2 §8.5 response message terminator, NL).</summary>
    public string ReadTermination { get; init; } = "\n";

    /// <summary>How long one write or one query may take when the caller gives no timeout; the default value is 2 s.</summary>
    public TimeSpan Timeout { get; init; } = TimeSpan.FromSeconds(2);

    /// <summary>Commands sent after the session had to resynchronise (late answers discarded or the connection reopened); the default value is none.</summary>
    public IReadOnlyList<string> ClearCommands { get; init; } = [];

    /// <summary>How the instrument reports errors; the default value is the SCPI-99 error queue <c>SYST:ERR?</c> (SCPI-99 Vol. 2 §21.8).</summary>
    public ErrorReporting Errors { get; init; } = ErrorReporting.Scpi;

    /// <summary>How long the instrument needs after each command before the next; the default value is no wait.</summary>
    public CommandPacing Pacing { get; init; } = CommandPacing.None;

    /// <summary>The largest response accepted, in bytes; the default value is 16 MiB.</summary>
    public int MaxResponseBytes { get; init; } = 16 * 1024 * 1024;

    /// <summary>Checks that the options make sense.</summary>
    public void Validate()
    {
        ArgumentException.ThrowIfNullOrEmpty(WriteTermination, nameof(WriteTermination));
        ArgumentException.ThrowIfNullOrEmpty(ReadTermination, nameof(ReadTermination));
        ArgumentOutOfRangeException.ThrowIfLessThanOrEqual(Timeout, TimeSpan.Zero, nameof(Timeout));
        ArgumentOutOfRangeException.ThrowIfLessThan(MaxResponseBytes, 64, nameof(MaxResponseBytes));
    }
}
