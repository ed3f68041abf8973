using ShuntSweep.Instruments.Resources;

namespace ShuntSweep.Instruments.Transports;

/// <summary>Opens the transport a resource address calls for.</summary>
internal static class TransportFactory
{
    /// <summary>An opener for <paramref name="address"/>: each call makes a fresh connection (used first, then for reconnects).</summary>
    public static TransportOpener For(ResourceAddress address, DriverSettings settings, Func<string, Stream>? simulated) => address switch
    {
        TcpSocketAddress tcp => ct => TcpTransport.ConnectAsync(tcp.Text, tcp.Host, tcp.Port, ct),
        SimulatedAddress sim => _ => ValueTask.FromResult<ITransport>(new StreamTransport(
            sim.Text,
            (simulated ?? throw new InvalidOperationException($"{sim.Text}: a simulated resource needs the simulated bench, and none was given."))(sim.Name))),
        _ => throw new NotSupportedException($"{address.Text}: this kind of resource is not supported yet."),
    };
}
