using System.Diagnostics;
using System.Text;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Messaging;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using ShuntSweep.Instruments.Transports;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

/// <summary>The serial path through a pseudo-terminal pair made by socat: the driver opens one end as ASRL/dev/…::INSTR, a fake instrument answers on the other.</summary>
public sealed class SerialTransportTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    [Fact]
    public async Task SerialSupply_OverPseudoTerminal_AnswersIdentityAndSettings()
    {
        await using var pair = await PtyPair.StartAsync(Ct);
        var fake = FakeInstrument.Supply();
        using var instrumentSide = new FileStream(pair.InstrumentEnd, FileMode.Open, FileAccess.ReadWrite, FileShare.ReadWrite, 1, false);
        var serving = Task.Run(() => Serve(instrumentSide, fake, Ct), Ct);

        var bench = TestBench.Load($"""
              supply:
                resource: ASRL{pair.DriverEnd}::INSTR
                baud: 115200
                parity: none
                dataBits: 8
                stopBits: 1
                flowControl: none
                timeout: 2 s
              load:
                resource: SIM::load
              dropMeter:
                resource: SIM::dmm
            """);
        var entry = bench.Instruments[Core.Bench.InstrumentRole.Supply];
        var settings = DriverSettings.Read(entry.Settings, null);
        Assert.Equal(new SerialSettings(115200), settings.Serial);
        var address = Resources.ResourceAddress.Parse(entry.Resource);
        await using var session = await BenchConnector.OpenSessionAsync(address, settings, InstrumentProfile.Default, null, TimeProvider.System, null, null, Ct);
        var supply = new ScpiSupply(session, InstrumentProfile.Default);

        var identity = await supply.IdentifyAsync(Ct);
        await supply.ConfigureAsync(Voltage.FromVolts(9), Current.FromMilliamperes(20), Ct);

        Assert.Equal("PS-1", identity.Model);
        Assert.Equal("9", fake.State["SOUR:VOLT"]);
        Assert.Equal("0.02", fake.State["SOUR:CURR"]);
        Assert.False(serving.IsFaulted, serving.Exception?.ToString());
    }

    [Fact]
    public void SerialSettings_OnANonSerialResource_AreRejected()
    {
        var settings = DriverSettings.Default with { Serial = new SerialSettings() };
        var ex = Assert.Throws<ArgumentException>(() => TransportFactory.For(Resources.ResourceAddress.Parse("TCPIP::127.0.0.1::5025::SOCKET"), settings, null, null));
        Assert.Contains("apply only to ASRL", ex.Message, StringComparison.Ordinal);
    }

    private static async Task Serve(Stream stream, FakeInstrument fake, CancellationToken ct)
    {
        var buffer = new byte[256];
        var line = new StringBuilder();
        while (!ct.IsCancellationRequested)
        {
            var n = await stream.ReadAsync(buffer, ct);
            if (n == 0)
            {
                return;
            }

            for (var i = 0; i < n; i++)
            {
                var b = buffer[i];
                if (b != '\n')
                {
                    line.Append((char)b);
                    continue;
                }

                var reply = fake.Handle(line.ToString());
                line.Clear();
                if (reply.Bytes is { } bytes)
                {
                    await stream.WriteAsync(bytes, ct);
                    await stream.FlushAsync(ct);
                }
            }
        }
    }

    /// <summary>Two linked pseudo-terminals from <c>socat</c>; the test is skipped, saying why, when socat is not installed.</summary>
    private sealed class PtyPair : IAsyncDisposable
    {
        private readonly Process _socat;
        private readonly string _dir;

        private PtyPair(Process socat, string dir)
        {
            _socat = socat;
            _dir = dir;
        }

        public string DriverEnd => Path.Combine(_dir, "driver");

        public string InstrumentEnd => Path.Combine(_dir, "instrument");

        public static async Task<PtyPair> StartAsync(CancellationToken ct)
        {
            var socat = new[] { "/usr/bin/socat", "/bin/socat", "/usr/local/bin/socat" }.FirstOrDefault(File.Exists);
            if (socat is null)
            {
                Assert.Skip("socat is not installed (apt-get install socat); the serial test needs it to make a pseudo-terminal pair.");
            }

            var dir = Directory.CreateTempSubdirectory("shuntsweep-pty-").FullName;
            var start = new ProcessStartInfo(socat)
            {
                ArgumentList = { "pty,raw,echo=0,link=" + Path.Combine(dir, "driver"), "pty,raw,echo=0,link=" + Path.Combine(dir, "instrument") },
                RedirectStandardError = true,
                RedirectStandardOutput = true,
            };
            var process = Process.Start(start) ?? throw new InvalidOperationException("socat did not start.");
            var pair = new PtyPair(process, dir);
            for (var i = 0; i < 100 && !(File.Exists(pair.DriverEnd) && File.Exists(pair.InstrumentEnd)); i++)
            {
                await Task.Delay(20, ct);
            }

            return File.Exists(pair.DriverEnd) && File.Exists(pair.InstrumentEnd)
                ? pair
                : throw new InvalidOperationException($"socat made no pseudo-terminals: {await process.StandardError.ReadToEndAsync(ct)}");
        }

        public async ValueTask DisposeAsync()
        {
            if (!_socat.HasExited)
            {
                _socat.Kill();
                await _socat.WaitForExitAsync();
            }

            _socat.Dispose();
        }
    }
}
