namespace ShuntSweep.Instruments.Transports;

/// <summary>The seam for a VISA library (for resources ShuntSweep cannot open itself, such as GPIB, VXI-11 or HiSLIP).</summary>
/// <remarks>
/// UNTESTED: no VISA implementation is available in our build and test environment, so no adapter ships and this seam has never
/// been exercised against a real library. An adapter opens the resource with its VISA session and exposes it as an
/// <see cref="ITransport"/> (write bytes, read bytes, honour cancellation); see docs/instruments.md.
/// </remarks>
public interface IVisaLibrary
{
    /// <summary>Opens <paramref name="resource"/> through VISA.</summary>
    ValueTask<ITransport> OpenAsync(string resource, TimeSpan timeout, CancellationToken cancellationToken);
}
