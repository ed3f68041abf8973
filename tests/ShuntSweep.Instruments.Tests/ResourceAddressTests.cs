using CsCheck;
using ShuntSweep.Instruments.Resources;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class ResourceAddressTests
{
    [Fact]
    public void Parse_TcpSocket_ReadsHostAndPort()
    {
        // VPP-4.3 §4.3.1: TCPIP[board]::host address::port::SOCKET; 192.0.2.0/24 is the RFC 5737 documentation range.
        var a = Assert.IsType<TcpSocketAddress>(ResourceAddress.Parse("TCPIP0::192.0.2.10::5025::SOCKET"));
        Assert.Equal(("192.0.2.10", 5025), (a.Host, a.Port));
        Assert.IsType<TcpSocketAddress>(ResourceAddress.Parse("tcpip::bench-dmm.example::5025::socket"));
    }

    [Theory]
    [InlineData("TCPIP::[::1]::5025::SOCKET", "::1", 5025)]
    [InlineData("TCPIP0::[2001:db8::10]::6000::SOCKET", "2001:db8::10", 6000)]
    [InlineData("TCPIP::[fe80::1:2:3:4]::1::SOCKET", "fe80::1:2:3:4", 1)]
    public void Parse_TcpSocket_ReadsABracketedIpv6Host(string text, string host, int port)
    {
        // An IPv6 literal is bracketed as in a URL (RFC 3986 §3.2.2) so that its colons are not taken for '::' separators;
        // 2001:db8::/32 is the RFC 3849 documentation prefix.
        var a = Assert.IsType<TcpSocketAddress>(ResourceAddress.Parse(text));
        Assert.Equal((host, port), (a.Host, a.Port));
    }

    [Theory]
    [InlineData("TCPIP::[::1::5025::SOCKET", "expected TCPIP")]
    [InlineData("TCPIP::[192.0.2.1]::5025::SOCKET", "IPv6 address in brackets")]
    [InlineData("TCPIP::2001:db8:1:2:3:4:5:6::5025::SOCKET", "write an IPv6 address in brackets")]
    public void Parse_MalformedIpv6_SaysHowToWriteIt(string text, string expected) =>
        Assert.Contains(expected, Assert.Throws<FormatException>(() => ResourceAddress.Parse(text)).Message, StringComparison.Ordinal);

    [Theory]
    [InlineData("ASRL/dev/ttyUSB0::INSTR", "/dev/ttyUSB0")]
    [InlineData("ASRL1::INSTR", "/dev/ttyS0")]
    [InlineData("asrl3::instr", "/dev/ttyS2")]
    public void Parse_Serial_MapsToDevice(string text, string device) =>
        Assert.Equal(device, Assert.IsType<SerialAddress>(ResourceAddress.Parse(text)).Device);

    [Fact]
    public void Parse_Usb_ReadsIdsInHexOrDecimal()
    {
        var a = Assert.IsType<UsbTmcAddress>(ResourceAddress.Parse("USB0::0x1AB1::1234::SN42::INSTR"));
        Assert.Equal((0x1AB1, 1234, "SN42", (int?)null), (a.VendorId, a.ProductId, a.SerialNumber, a.Interface));
        Assert.Equal(3, Assert.IsType<UsbTmcAddress>(ResourceAddress.Parse("USB::0x0001::0x0002::X::3::INSTR")).Interface);
    }

    [Fact]
    public void Parse_Simulated_ReadsName() =>
        Assert.Equal("dmm", Assert.IsType<SimulatedAddress>(ResourceAddress.Parse("SIM::dmm")).Name);

    [Theory]
    [InlineData("GPIB0::22::INSTR")]
    [InlineData("TCPIP::192.0.2.10::INSTR")]
    [InlineData("TCPIP::192.0.2.10::hislip0::INSTR")]
    public void Parse_VisaOnlyForms_AreRecognised(string text) => Assert.IsType<VisaOnlyAddress>(ResourceAddress.Parse(text));

    [Theory]
    [InlineData("", "empty")]
    [InlineData("TCPIP::192.0.2.10::70000::SOCKET", "1 to 65535")]
    [InlineData("TCPIP::192.0.2.10::x::SOCKET", "1 to 65535")]
    [InlineData("SIM::", "SIM::<name>")]
    [InlineData("USB::0x10000::1::INSTR", "0…65535")]
    [InlineData("ASRL0::INSTR", "number from 1")]
    [InlineData("COM1", "not a resource string")]
    public void Parse_BadInput_SaysWhatWasExpected(string text, string expected)
    {
        var ex = Assert.Throws<FormatException>(() => ResourceAddress.Parse(text));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void Parse_RandomText_ReturnsOrThrowsFormatException_Only() =>
        Gen.String[Gen.Char["ASRLTCPIUSBGIMN:/0123456789x.-_ ast"], 0, 40].Sample(s =>
        {
            try
            {
                var a = ResourceAddress.Parse(s);
                return a.Text == s.Trim();
            }
            catch (FormatException ex)
            {
                return ex.Message.Length > 0;
            }
        }, iter: 10_000);

    [Fact]
    public void Parse_GeneratedTcpSockets_RoundTrip() =>
        Gen.Select(Gen.Int[0, 255], Gen.Int[0, 255], Gen.Int[1, 65535]).Sample((a, b, port) =>
        {
            var parsed = (TcpSocketAddress)ResourceAddress.Parse($"TCPIP::10.{a}.{b}.1::{port}::SOCKET");
            return parsed.Host == $"10.{a}.{b}.1" && parsed.Port == port;
        }, iter: 10_000);
}
