using System.Diagnostics;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Drivers;
using ShuntSweep.Instruments.Profiles;
using ShuntSweep.Instruments.Tests.Support;
using Xunit;

namespace ShuntSweep.Instruments.Tests;

public sealed class ConcurrentMeasurementTests
{
    private static CancellationToken Ct => TestContext.Current.CancellationToken;

    [Fact]
    public async Task ThreeMeters_AreAllArmedBeforeAnyFetchIsAnswered()
    {
        // Each fake meter answers FETC? only once all three have been armed (SCPI INITiate then FETCh?): a driver that
        // armed and fetched one meter after the other would wait forever for the first answer and time out.
        var integration = TimeSpan.FromMilliseconds(300);
        var events = new List<string>();
        var armedCount = 0;
        var allArmed = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        FakeInstrument Integrating(FakeInstrument fake, string name, string reading)
        {
            long armedAt = 0;
            fake.Fault = c =>
            {
                if (c == "INIT")
                {
                    armedAt = Stopwatch.GetTimestamp();
                    lock (events)
                    {
                        events.Add($"arm {name}");
                    }

                    if (Interlocked.Increment(ref armedCount) == 3)
                    {
                        allArmed.SetResult();
                    }

                    return Reply.None;
                }

                if (c == "FETC?")
                {
                    var left = integration - Stopwatch.GetElapsedTime(armedAt);
                    lock (events)
                    {
                        events.Add($"fetch {name}");
                    }

                    // The answer waits (without a thread) until all three are armed; a 5 s wait means they were not.
                    return new Reply(System.Text.Encoding.ASCII.GetBytes(reading + "\n"), left > TimeSpan.Zero ? left : TimeSpan.Zero)
                    {
                        Before = () => allArmed.Task.WaitAsync(TimeSpan.FromSeconds(5), Ct),
                    };
                }

                return null;
            };
            return fake;
        }

        await using var dmmServer = ScpiResponder.Start(Integrating(FakeInstrument.Voltmeter(), "dmm", "+5.000000E-02"));
        await using var uutServer = ScpiResponder.Start(Integrating(FakeInstrument.CurrentMeter("Nowhere Instruments,NM-10,T-0001,0.9"), "uut", "+1.000100E-01"));
        await using var refServer = ScpiResponder.Start(Integrating(FakeInstrument.CurrentMeter("Test Bench Co,RA-4,SN400,1.2"), "ref", "+1.000000E-01"));
        await using var dmmSession = await DriverTests.OpenAsync(dmmServer);
        await using var uutSession = await DriverTests.OpenAsync(uutServer);
        await using var refSession = await DriverTests.OpenAsync(refServer);
        var timing = new MeterTiming(50, integration);
        var dmm = new ScpiVoltmeter(dmmSession, InstrumentProfile.Default, timing);
        var uut = new ScpiUutMeter(uutSession, InstrumentProfile.Default, timing, 1);
        var reference = new ScpiReferenceAmmeter(refSession, InstrumentProfile.Default, timing);
        await dmm.ConfigureAsync(new VoltmeterSettings(Voltage.FromVolts(1), 1, false, 1), Ct);
        await reference.ConfigureAsync(Current.FromAmperes(1), 1, Ct);

        ITriggeredMeter[] meters = [dmm, uut, reference];
        await Task.WhenAll(meters.Select(m => m.ArmAsync(Ct)));
        var readings = await Task.WhenAll(meters.Select(m => m.FetchAsync(Ct)));

        Assert.Equal(0.05, readings[0][0], 12);
        Assert.Equal(0.10001, readings[1][0], 12);
        Assert.Equal(0.1, readings[2][0], 12);
        Assert.Equal(6, events.Count);
    }
}
