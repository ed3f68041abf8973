namespace ShuntSweep.Simulation.Scpi;

/// <summary>A SCPI-99 error raised while parsing or executing a program message unit; it ends up in the error queue.</summary>
internal sealed class ScpiException(int code, string? detail = null) : Exception(ScpiErrors.Format(code, detail))
{
    /// <summary>The SCPI-99 error code, for example -113.</summary>
    public int Code { get; } = code;

    /// <summary>Device-specific detail appended to the standard message after a semicolon, or null.</summary>
    public string? Detail { get; } = detail;
}
