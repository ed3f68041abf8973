using System.Globalization;

namespace ShuntSweep.Instruments.Resources;

/// <summary>A parsed resource string in VISA syntax (VPP-4.3): where an instrument is and how to reach it.</summary>
public abstract record ResourceAddress
{
    /// <summary>The resource string as written.</summary>
    public required string Text { get; init; }

    /// <inheritdoc />
    public override string ToString() => Text;

    /// <summary>Parses a resource string; throws <see cref="FormatException"/> with what was expected.</summary>
    /// <remarks>
    /// Accepted forms: <c>TCPIP[board]::host::port::SOCKET</c> (an IPv6 host in brackets, <c>TCPIP::[::1]::5025::SOCKET</c>), <c>ASRL[board]::INSTR</c> (board n is /dev/ttyS(n-1)),
    /// <c>ASRL/dev/ttyX::INSTR</c>, <c>USB[board]::vendor::product[::serial[::interface]]::INSTR</c>, and <c>SIM::name</c>.
    /// Keywords are case-insensitive (VPP-4.3 §4.3.1.1).
    /// </remarks>
    public static ResourceAddress Parse(string text)
    {
        if (string.IsNullOrWhiteSpace(text))
        {
            throw new FormatException("the resource string is empty; expected for example TCPIP::192.0.2.10::5025::SOCKET, ASRL/dev/ttyUSB0::INSTR, USB::0x1234::0x5678::SN1::INSTR or SIM::supply.");
        }

        var t = text.Trim();
        var parts = Split(t);
        var head = parts[0];
        if (head.Equals("SIM", StringComparison.OrdinalIgnoreCase))
        {
            return parts.Length == 2 && IsName(parts[1])
                ? new SimulatedAddress { Text = t, Name = parts[1] }
                : throw new FormatException($"'{t}': a simulated resource is SIM::<name> with a name of letters, digits, '-' or '_' (for example SIM::dmm).");
        }

        if (head.StartsWith("TCPIP", StringComparison.OrdinalIgnoreCase))
        {
            return ParseTcp(t, parts);
        }

        if (head.StartsWith("ASRL", StringComparison.OrdinalIgnoreCase))
        {
            return ParseSerial(t, parts);
        }

        if (head.StartsWith("USB", StringComparison.OrdinalIgnoreCase))
        {
            return ParseUsb(t, parts);
        }

        if (head.StartsWith("GPIB", StringComparison.OrdinalIgnoreCase) && parts.Length >= 3 && parts[^1].Equals("INSTR", StringComparison.OrdinalIgnoreCase))
        {
            return new VisaOnlyAddress { Text = t };
        }

        throw new FormatException($"'{t}' is not a resource string ShuntSweep can open; expected TCPIP::host::port::SOCKET, ASRL…::INSTR, USB…::INSTR or SIM::name.");
    }

    private static ResourceAddress ParseTcp(string t, string[] parts)
    {
        Board(parts[0], "TCPIP", t);
        if (parts.Length == 4 && parts[3].Equals("SOCKET", StringComparison.OrdinalIgnoreCase))
        {
            var host = parts[1];
            if (host.StartsWith('['))
            {
                if (!IsBracketedIpv6(host))
                {
                    throw new FormatException($"'{t}': '{host}' is not an IPv6 address in brackets (for example [::1] or [2001:db8::10]).");
                }
            }
            else if (!IsHost(host) || host.Contains(':', StringComparison.Ordinal))
            {
                throw new FormatException($"'{t}': '{host}' is not a host name or IP address{(host.Contains(':', StringComparison.Ordinal) ? " (write an IPv6 address in brackets, for example [::1])" : string.Empty)}.");
            }

            if (!int.TryParse(parts[2], NumberStyles.None, CultureInfo.InvariantCulture, out var port) || port is < 1 or > 65535)
            {
                throw new FormatException($"'{t}': the port '{parts[2]}' must be a number from 1 to 65535 (raw SCPI sockets are usually 5025).");
            }

            return new TcpSocketAddress { Text = t, Host = host.Trim('[', ']'), Port = port };
        }

        if (parts.Length is 2 or 3 or 4 && parts[^1].Equals("INSTR", StringComparison.OrdinalIgnoreCase) && (IsHost(parts[1]) || IsBracketedIpv6(parts[1])))
        {
            // VXI-11 (TCPIP::host[::lan device]::INSTR) and HiSLIP (TCPIP::host::hislip0::INSTR) are left to a VISA library.
            return new VisaOnlyAddress { Text = t };
        }

        throw new FormatException($"'{t}': expected TCPIP[board]::host::port::SOCKET (or TCPIP::host[::device]::INSTR through a VISA library).");
    }

    private static SerialAddress ParseSerial(string t, string[] parts)
    {
        if (parts.Length != 2 || !parts[1].Equals("INSTR", StringComparison.OrdinalIgnoreCase))
        {
            throw new FormatException($"'{t}': expected ASRL<number>::INSTR or ASRL/dev/<device>::INSTR.");
        }

        var rest = parts[0][4..];
        if (rest.StartsWith('/'))
        {
            return rest.Length > 1 && !rest.Contains('\0', StringComparison.Ordinal) && !rest.EndsWith('/')
                ? new SerialAddress { Text = t, Device = rest }
                : throw new FormatException($"'{t}': '{rest}' is not a device path.");
        }

        if (int.TryParse(rest, NumberStyles.None, CultureInfo.InvariantCulture, out var board) && board >= 1)
        {
            // VISA numbers serial ports from 1; Linux numbers its UARTs from 0.
            return new SerialAddress { Text = t, Device = $"/dev/ttyS{board - 1}" };
        }

        throw new FormatException($"'{t}': after ASRL comes a port number from 1 or a device path such as /dev/ttyUSB0.");
    }

    private static UsbTmcAddress ParseUsb(string t, string[] parts)
    {
        Board(parts[0], "USB", t);
        if (parts.Length is < 4 or > 6 || !parts[^1].Equals("INSTR", StringComparison.OrdinalIgnoreCase))
        {
            throw new FormatException($"'{t}': expected USB[board]::<vendor id>::<product id>[::<serial>[::<interface>]]::INSTR.");
        }

        var vendor = UsbId(parts[1], "vendor", t);
        var product = UsbId(parts[2], "product", t);
        var serial = parts.Length >= 5 ? parts[3] : null;
        int? iface = null;
        if (parts.Length == 6)
        {
            iface = int.TryParse(parts[4], NumberStyles.None, CultureInfo.InvariantCulture, out var i) && i <= 255
                ? i
                : throw new FormatException($"'{t}': the USB interface number '{parts[4]}' must be 0…255.");
        }

        if (serial is not null && (serial.Length == 0 || serial.Any(char.IsWhiteSpace)))
        {
            throw new FormatException($"'{t}': the USB serial number must not be empty or contain spaces.");
        }

        return new UsbTmcAddress { Text = t, VendorId = vendor, ProductId = product, SerialNumber = serial, Interface = iface };
    }

    private static void Board(string head, string keyword, string t)
    {
        var board = head[keyword.Length..];
        if (board.Length > 0 && !int.TryParse(board, NumberStyles.None, CultureInfo.InvariantCulture, out _))
        {
            throw new FormatException($"'{t}': '{head}' must be {keyword} followed by an optional board number.");
        }
    }

    private static int UsbId(string s, string what, string t)
    {
        var ok = s.StartsWith("0x", StringComparison.OrdinalIgnoreCase)
            ? int.TryParse(s.AsSpan(2), NumberStyles.AllowHexSpecifier, CultureInfo.InvariantCulture, out var v)
            : int.TryParse(s, NumberStyles.None, CultureInfo.InvariantCulture, out v);
        return ok && v is >= 0 and <= 0xFFFF
            ? v
            : throw new FormatException($"'{t}': the USB {what} id '{s}' must be a number 0…65535 (decimal or 0x hex).");
    }

    /// <summary>Splits a resource string at its <c>::</c> separators, keeping a bracketed IPv6 address (whose colons are not separators) whole.</summary>
    private static string[] Split(string text)
    {
        var parts = new List<string>();
        var start = 0;
        var inBrackets = false;
        for (var i = 0; i < text.Length; i++)
        {
            if (text[i] == '[')
            {
                inBrackets = true;
            }
            else if (text[i] == ']')
            {
                inBrackets = false;
            }
            else if (!inBrackets && text[i] == ':' && i + 1 < text.Length && text[i + 1] == ':')
            {
                parts.Add(text[start..i]);
                start = i + 2;
                i++;
            }
        }

        parts.Add(text[start..]);
        return [.. parts];
    }

    private static bool IsBracketedIpv6(string s) =>
        s.Length > 2 && s[0] == '[' && s[^1] == ']'
        && System.Net.IPAddress.TryParse(s[1..^1], out var address) && address.AddressFamily == System.Net.Sockets.AddressFamily.InterNetworkV6;

    private static bool IsName(string s) => s.Length > 0 && s.All(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '_');

    private static bool IsHost(string s) =>
        s.Length > 0 && s.Length <= 253 && s.All(c => char.IsAsciiLetterOrDigit(c) || c is '-' or '.' or ':' or '_');
}

/// <summary>A raw TCP socket, <c>TCPIP::host::port::SOCKET</c>.</summary>
public sealed record TcpSocketAddress : ResourceAddress
{
    /// <summary>The host name or IP address (an IPv6 address without its brackets, <c>::1</c>).</summary>
    public required string Host { get; init; }

    /// <summary>The TCP port (SCPI raw sockets are commonly 5025).</summary>
    public required int Port { get; init; }
}

/// <summary>A serial port, <c>ASRL/dev/ttyUSB0::INSTR</c> or <c>ASRL1::INSTR</c>.</summary>
public sealed record SerialAddress : ResourceAddress
{
    /// <summary>The device path, for example <c>/dev/ttyUSB0</c>.</summary>
    public required string Device { get; init; }
}

/// <summary>A USB test-and-measurement class device, reached on Linux through the usbtmc driver's <c>/dev/usbtmcN</c> file.</summary>
public sealed record UsbTmcAddress : ResourceAddress
{
    /// <summary>The USB vendor id.</summary>
    public required int VendorId { get; init; }

    /// <summary>The USB product id.</summary>
    public required int ProductId { get; init; }

    /// <summary>The USB serial number, when given.</summary>
    public string? SerialNumber { get; init; }

    /// <summary>The USB interface number, when given.</summary>
    public int? Interface { get; init; }
}

/// <summary>A VISA resource ShuntSweep cannot open by itself (GPIB, VXI-11, HiSLIP); it needs a VISA library behind <see cref="Transports.IVisaLibrary"/>.</summary>
public sealed record VisaOnlyAddress : ResourceAddress;

/// <summary>An in-process simulated instrument, <c>SIM::name</c>.</summary>
public sealed record SimulatedAddress : ResourceAddress
{
    /// <summary>The simulated instrument's name, for example <c>dmm</c>.</summary>
    public required string Name { get; init; }
}
