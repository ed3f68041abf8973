namespace ShuntSweep.Simulation.Scpi;

/// <summary>What a connection talks to: the instrument's command interpreter, in SCPI or in the dialect of a profile.</summary>
internal interface IInstrumentFront
{
    /// <summary>Executes one program message (a line without its terminator); returns the response message, or null when nothing was queried.</summary>
    ValueTask<string?> ExecuteAsync(string line, CancellationToken cancellationToken);

    /// <summary>Executes one program message that arrived between the wall-clock timestamps <paramref name="earliest"/> and <paramref name="latest"/>;
    /// a front with processing times judges from them whether the instrument could have heard the line.</summary>
    ValueTask<string?> ExecuteAsync(string line, long earliest, long latest, CancellationToken cancellationToken) => ExecuteAsync(line, cancellationToken);

    /// <summary>Records an error the connection found (an overlong line) where the instrument reports errors.</summary>
    void Push(int code, string? detail = null);
}
