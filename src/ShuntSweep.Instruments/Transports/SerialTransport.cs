using System.IO.Ports;

namespace ShuntSweep.Instruments.Transports;

/// <summary>Opens a serial port (VISA <c>ASRL…::INSTR</c>) with the line settings of the bench file.</summary>
internal static class SerialTransport
{
    /// <summary>Opens <paramref name="device"/>; the port's stream becomes a <see cref="StreamTransport"/> that owns the port.</summary>
    public static ITransport Open(string resource, string device, SerialSettings settings)
    {
        var port = new SerialPort(device, settings.Baud, settings.Parity, settings.DataBits, settings.StopBits)
        {
            Handshake = settings.FlowControl,
            ReadTimeout = SerialPort.InfiniteTimeout,
            WriteTimeout = SerialPort.InfiniteTimeout,
        };
        try
        {
            port.Open();
            port.DiscardInBuffer();
            return new StreamTransport(resource, port.BaseStream, port);
        }
        catch
        {
            port.Dispose();
            throw;
        }
    }
}
