using ShuntSweep.Instruments.Resources;

namespace ShuntSweep.Instruments.Transports;

/// <summary>Opens the transport a resource address calls for.</summary>
internal static class TransportFactory
{
    /// <summary>An opener for <paramref name="address"/>: each call makes a fresh connection (used first, then for reconnects).</summary>
    public static TransportOpener For(ResourceAddress address, DriverSettings settings, Func<string, Stream>? simulated, IVisaLibrary? visa)
    {
        if (settings.Serial is not null && address is not SerialAddress)
        {
            throw new ArgumentException($"{address.Text}: serial settings (baud, parity, dataBits, stopBits, flowControl) apply only to ASRL resources.");
        }

        return address switch
        {
            TcpSocketAddress tcp => ct => TcpTransport.ConnectAsync(tcp.Text, tcp.Host, tcp.Port, ct),
            SerialAddress serial => _ => ValueTask.FromResult(SerialTransport.Open(serial.Text, serial.Device, settings.Serial ?? new SerialSettings())),
            UsbTmcAddress usb => _ => ValueTask.FromResult(UsbTmcTransport.Open(usb, settings.Device)),
            SimulatedAddress sim when simulated is not null => _ => ValueTask.FromResult<ITransport>(new StreamTransport(sim.Text, simulated(sim.Name))),
            SimulatedAddress sim => throw new ArgumentException($"{sim.Text}: a simulated resource needs the simulated bench, and none was given."),
            VisaOnlyAddress v when visa is not null => ct => visa.OpenAsync(v.Text, settings.Session.Timeout, ct),
            VisaOnlyAddress v => throw new ArgumentException($"{v.Text}: this resource needs a VISA library, and none is configured; for a LAN instrument use its raw socket port, for example TCPIP::host::5025::SOCKET."),
            _ => throw new ArgumentException($"{address.Text}: this kind of resource is not supported."),
        };
    }
}
