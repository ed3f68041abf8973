using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Instruments.Resources;
using ShuntSweep.Instruments.Tests.Support;
using ShuntSweep.Instruments.Transports;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class DriverSettingsTests
{
    [Fact]
    public void Read_AllKeys_FromTheBenchFile()
    {
        var bench = TestBench.Load("""
              supply:
                resource: SIM::supply
                timeout: 750 ms
                termination: crlf
                writeTermination: lf
                resilience:
                  retries: 4
                  retryDelay: 50 ms
                  operationTimeout: 20 s
                  breaker:
                    failureRatio: 0.25
                    minimumThroughput: 8
                    window: 10 s
                    pause: 5 s
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
                lineFrequency: 60 Hz
                overhead: 25 ms
                timeoutMargin: 3
            """);

        var supply = DriverSettings.Read(bench.Instruments[InstrumentRole.Supply].Settings, null, InstrumentRole.Supply);
        var dmm = DriverSettings.Read(bench.Instruments[InstrumentRole.DropMeter].Settings, null, InstrumentRole.DropMeter);

        Assert.Equal(TimeSpan.FromMilliseconds(750), supply.Session.Timeout);
        Assert.Equal("\r\n", supply.Session.ReadTermination);
        Assert.Equal("\n", supply.Session.WriteTermination);
        Assert.Equal(new Resilience.ResilienceSettings(4, TimeSpan.FromMilliseconds(50), TimeSpan.FromSeconds(20), 0.25, 8, TimeSpan.FromSeconds(10), TimeSpan.FromSeconds(5)), supply.Resilience);
        Assert.Equal(60, dmm.Timing.LineFrequency);
        Assert.Equal(TimeSpan.FromMilliseconds(25), dmm.Timing.OverheadTime);
        // 2 samples × 6 NPLC / 60 Hz = 200 ms, plus 25 ms overhead.
        Assert.Equal(TimeSpan.FromMilliseconds(225), dmm.Timing.MeasurementTime(6, 2));
        Assert.Equal(TimeSpan.FromMilliseconds(750 + (3 * 225)), dmm.Timing.FetchTimeout(TimeSpan.FromMilliseconds(750), TimeSpan.FromMilliseconds(225)));
    }

    [Theory]
    [InlineData("resilience:\n      retrys: 2", "did you mean 'retries'")]
    [InlineData("termination: lfcr", "not one of lf, crlf, cr")]
    [InlineData("lineFrequency: 5 kHz", "not a mains frequency")]
    [InlineData("kind: stream", "only the uutMeter and reference roles have a kind")]
    [InlineData("baud: fast", "expected a whole number")]
    public void Read_BadSetting_IsPositionedError(string yaml, string expected)
    {
        var bench = TestBench.Load($"""
              supply:
                resource: SIM::supply
                {yaml}
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
            """);

        var ex = Assert.Throws<DocumentException>(() => DriverSettings.Read(bench.Instruments[InstrumentRole.Supply].Settings, null, InstrumentRole.Supply));
        Assert.Contains(expected, ex.Message, StringComparison.Ordinal);
        Assert.True(ex.Line > 0);
    }

    [Fact]
    public void UsbTmc_FindsTheDeviceFileWhoseUsbIdsAndSerialMatch()
    {
        // The Linux usbtmc driver registers /sys/class/usbmisc/usbtmcN; its device link is the USB interface, whose parent holds idVendor, idProduct, serial.
        var root = Directory.CreateTempSubdirectory("shuntsweep-sysfs-").FullName;
        void Device(string name, string vendor, string product, string serial)
        {
            var usb = Directory.CreateDirectory(Path.Combine(root, "devices", name)).FullName;
            File.WriteAllText(Path.Combine(usb, "idVendor"), vendor + "\n");
            File.WriteAllText(Path.Combine(usb, "idProduct"), product + "\n");
            File.WriteAllText(Path.Combine(usb, "serial"), serial + "\n");
            var iface = Directory.CreateDirectory(Path.Combine(usb, name + ":1.0")).FullName;
            var cls = Directory.CreateDirectory(Path.Combine(root, "usbmisc", name.Replace("dev", "usbtmc", StringComparison.Ordinal))).FullName;
            File.CreateSymbolicLink(Path.Combine(cls, "device"), iface);
        }

        Device("dev0", "1ab1", "0588", "AAA");
        Device("dev1", "1ab1", "0588", "BBB");
        var wanted = (UsbTmcAddress)ResourceAddress.Parse("USB::0x1AB1::0x0588::BBB::INSTR");
        var anyOf = (UsbTmcAddress)ResourceAddress.Parse("USB::0x1AB1::0x0588::INSTR");
        var none = (UsbTmcAddress)ResourceAddress.Parse("USB::0x1AB1::0x9999::INSTR");

        Assert.Equal("/dev/usbtmc1", UsbTmcTransport.Find(wanted, Path.Combine(root, "usbmisc")));
        Assert.Equal("/dev/usbtmc0", UsbTmcTransport.Find(anyOf, Path.Combine(root, "usbmisc")));
        Assert.Null(UsbTmcTransport.Find(none, Path.Combine(root, "usbmisc")));
    }
}
