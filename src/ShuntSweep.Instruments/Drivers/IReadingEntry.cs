namespace ShuntSweep.Instruments.Drivers;

/// <summary>Where a person types the UUT's displayed reading, for a UUT with no remote interface.</summary>
public interface IReadingEntry
{
    /// <summary>Asks for the reading the UUT shows, in amperes (the implementation accepts units such as "12.34 mA"); infinity for an overload display.</summary>
    Task<double> AskReadingAsync(string prompt, CancellationToken cancellationToken);
}
