using System.Globalization;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.FrontEnds;
using ShuntSweep.Simulation.Physics;
using ShuntSweep.Simulation.Tests.Support;

namespace ShuntSweep.Simulation.Tests;

public sealed class PhysicsTests
{
    [Fact]
    public void Constants_AreTheExactCodata2018Values()
    {
        // CODATA 2018 exact defining constants (data/reference/physics/constants-codata2018.csv).
        var k = PhysicalConstants.Boltzmann;
        var e = PhysicalConstants.ElementaryCharge;
        Assert.Equal(ReferenceData.Constant("Boltzmann constant"), k);
        Assert.Equal(ReferenceData.Constant("elementary charge"), e);
    }

    [Fact]
    public void ThermalVoltage_MatchesKTOverQ_AtEveryTabulatedTemperature()
    {
        // V_T = kT/e computed with 30-digit decimals from the exact constants (data/reference/physics/thermal-voltage.csv).
        foreach (var row in ReferenceData.Rows("thermal-voltage.csv"))
        {
            var kelvins = double.Parse(row[0], CultureInfo.InvariantCulture);
            var expected = double.Parse(row[1], CultureInfo.InvariantCulture);
            Assert.Equal(expected, PhysicalConstants.ThermalVoltage(kelvins), expected * 1e-14);
        }
    }

    [Theory]
    [InlineData(0.1)]
    [InlineData(0.35)]
    [InlineData(0.6)]
    [InlineData(-0.45)]
    public void ClampDiodes_FollowShockleyForAnAntiparallelPair(double volts)
    {
        // Shockley: I = Is·(exp(V/(n·V_T)) − 1) per diode; an antiparallel pair conducts the forward one minus the reverse one.
        // V_T from CODATA k and e at 296.15 K (data/reference/physics/thermal-voltage.csv: 0.0255202324558429 V).
        const double vt = 0.0255202324558429429697949271179;
        const double isat = 1e-9;
        const double n = 1.9;
        var perDiode = volts / 2; // two diodes in series per direction share the voltage
        var expected = (isat * (Math.Exp(perDiode / (n * vt)) - 1)) - (isat * (Math.Exp(-perDiode / (n * vt)) - 1));
        var diodes = new ClampDiodes(isat, n, 2, 296.15);
        Assert.Equal(expected, diodes.CurrentAt(volts), Math.Abs(expected) * 1e-12);
    }

    [Fact]
    public void DefaultFuseTempco_LiesWithinHandbookValuesForCopperAndSilver()
    {
        // Handbook α at 20 °C for copper and silver (data/reference/physics/materials-20C.csv, sources S1–S5):
        // 0.0038 … 0.004041 /K. The simulator's default fuse element must be among them.
        var handbook = ReferenceData.Alphas("copper").Concat(ReferenceData.Alphas("silver")).ToList();
        var (bench, _) = Benches.FromText(MinimalBench(fuse: "{ coldResistance: 0.2 ohm }"));
        var element = Fuse(bench);
        Assert.InRange(element.Alpha, handbook.Min(), handbook.Max());
    }

    [Fact]
    public void DefaultShuntTempco_IsManganinLike_WithinHandbookBound()
    {
        // Handbook |α| of manganin: 2e-6 (S1, S4) and ±15e-6 /K (S3) — data/reference/physics/materials-20C.csv.
        var bound = ReferenceData.Alphas("manganin").Max();
        var (bench, _) = Benches.FromText(MinimalBench(fuse: "{ coldResistance: 0.2 ohm }"));
        var shunt = (ShuntFrontEnd)Circuit(bench).Uut.Range("10mA").FrontEnd;
        Assert.InRange(Math.Abs(shunt.Sections[0].Alpha), 0, bound);
    }

    [Fact]
    public void HeatedCopperElement_ResistanceRisesByAlphaTimesRise()
    {
        // R(T) = R0·(1 + α·ΔT) with copper α = 0.0039 /K (S1, materials-20C.csv): 100 K of rise adds 39 %.
        var alpha = ReferenceData.Alphas("copper")[0];
        var element = new ThermalElement(1.0, alpha, thermalResistance: 100, timeConstant: 1);
        element.Advance(watts: 1, seconds: 1000); // settles at R_th·P = 100 K
        Assert.Equal(100, element.Rise, 1e-9);
        Assert.Equal(1 + (alpha * 100), element.Resistance, 1e-12);
    }

    [Fact]
    public void ThermalStep_Reaches632PercentAtOneTimeConstant()
    {
        // First-order step response: ΔT(t) = ΔT∞·(1 − e^(−t/τ)); at t = τ it has covered 1 − 1/e = 63.2 % of the step.
        var element = new ThermalElement(1.0, 0, thermalResistance: 50, timeConstant: 2);
        for (var i = 0; i < 100; i++)
        {
            element.Advance(watts: 2, seconds: 0.02);
        }

        Assert.Equal(0.632, element.Rise / 100, 1e-3);
        Assert.Equal(1 - Math.Exp(-1), element.Rise / 100, 1e-12);
    }

    [Fact]
    public async Task DropAfterCurrentStep_RisesWithTheFusesEffectiveTimeConstant()
    {
        // With a constant current the element obeys C·dΔT/dt = I²R0(1+αΔT) − ΔT/R_th, a first-order system whose time constant is
        // τ' = τ/(1 − α·R_th·R0·I²); the drop therefore covers 63.2 % (1 − 1/e) of its rise at t = τ'.
        const double r0 = 0.5;
        const double alpha = 0.0039;
        const double rth = 400;
        const double tau = 2;
        const double current = 0.3;
        await using var rig = Rig.FromText(MinimalBench(fuse: $"{{ coldResistance: {r0} ohm, alpha: {alpha}, thermalResistance: {rth}, timeConstant: {tau} s, preArcingI2t: 1000 }}"));
        var tauEffective = tau / (1 - (alpha * rth * r0 * current * current));
        await rig.DriveAsync("1 A", "0.3");
        await rig.Dmm.SendAsync("CONF:VOLT:DC 1;:VOLT:NPLC 0.1;:ZERO:AUTO OFF");
        var start = rig.Elapsed;
        var cold = (await rig.Dmm.NumbersAsync("READ?"))[0];
        await rig.Clock.WaitUntilAsync(rig.Clock.Now() + (TimeSpan.FromSeconds(tauEffective) - (rig.Elapsed - start)), TestContext.Current.CancellationToken);
        var atTau = (await rig.Dmm.NumbersAsync("READ?"))[0];
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(60 * tauEffective), TestContext.Current.CancellationToken);
        var hot = (await rig.Dmm.NumbersAsync("READ?"))[0];
        // Steady state R = R0/(1 − α·R_th·R0·I²): the fuse's share of the drop rises from R0·I to that.
        var steadyRise = current * ((r0 / (1 - (alpha * rth * r0 * current * current))) - r0);
        Assert.Equal(steadyRise, hot - cold, steadyRise * 0.01);
        Assert.Equal(1 - Math.Exp(-1), (atTau - cold) / (hot - cold), 0.01);
    }

    [Fact]
    public async Task Fuse_OpensWhenPreArcingI2tIsExceeded_AndStaysOpenUntilReset()
    {
        // Pre-arcing I²t: the fuse opens once ∫I²dt of the overload reaches it (IEC 60127 terminology, from memory).
        // 1.2 A through a fuse of 0.5 A rating and 0.36 A²s opens after 0.36/1.44 = 0.25 s; its melting point is set out of reach.
        await using var rig = Rig.FromText(MinimalBench(fuse: "{ coldResistance: 0.1 ohm, thermalResistance: 1, timeConstant: 1 s, meltingPoint: 5000 °C, preArcingI2t: 0.36 }", rating: "0.5 A"));
        await rig.DriveAsync("1 A", "1.2");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(0.24), TestContext.Current.CancellationToken);
        Assert.False(rig.Bench.IsFuseOpen("IN"));
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(0.02), TestContext.Current.CancellationToken);
        Assert.True(rig.Bench.IsFuseOpen("IN"));
        Assert.Equal("1", await rig.Uut.QueryAsync("SIM:FUSE:OPEN?"));

        // Open: the load falls out of regulation and the jacks see (nearly) the whole supply voltage.
        Assert.Equal("2", await rig.Load.QueryAsync("STAT:QUES:COND?"));
        var drop = await rig.DropAsync(1, "10");
        Assert.Equal(5.0, drop, 0.01);

        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(10), TestContext.Current.CancellationToken);
        Assert.True(rig.Bench.IsFuseOpen("IN"));
        await rig.Load.SendAsync("CURR 0.1");
        await rig.Uut.SendAsync("SIM:FUSE:RES");
        Assert.False(rig.Bench.IsFuseOpen("IN"));
        Assert.Equal("0", await rig.Load.QueryAsync("STAT:QUES:COND?"));
    }

    [Fact]
    public async Task Fuse_OpensAtItsMeltingPoint_UnderSustainedOverload()
    {
        // Steady state: ΔT = R_th·I²·R(T) with R = R0/(1 − α·R_th·R0·I²); beyond α·R_th·R0·I² = 1 there is no steady state
        // and the element heats until it melts. Here that threshold is at I = 1/√(0.0039·200·0.2) = 2.53 A.
        await using var rig = Rig.FromText(MinimalBench(fuse: "{ coldResistance: 0.2 ohm, alpha: 0.0039, thermalResistance: 200, timeConstant: 0.5 s, meltingPoint: 600 °C, preArcingI2t: 1e9 }", rating: "3 A"));
        await rig.DriveAsync("1 A", "2.0");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(30), TestContext.Current.CancellationToken);
        Assert.False(rig.Bench.IsFuseOpen("IN"));
        var expectedRise = 200 * 2.0 * 2.0 * 0.2 / (1 - (0.0039 * 200 * 0.2 * 2.0 * 2.0));
        Assert.Equal(23 + expectedRise, rig.Bench.FuseTemperature("IN"), 0.5);

        await rig.Load.SendAsync("CURR 2.6");
        await rig.Clock.WaitAsync(TimeSpan.FromSeconds(30), TestContext.Current.CancellationToken);
        Assert.True(rig.Bench.IsFuseOpen("IN"));
    }

    [Fact]
    public void FeedbackAmmeter_TinyDropUntilSaturation_ThenSteepKnee()
    {
        // Transimpedance stage: V_in = offset + I·R_f/A_OL while |I·R_f| ≤ V_swing; beyond, the input follows I·R_f − V_swing.
        var fe = new FeedbackFrontEnd(feedbackResistance: 10e3, openLoopGain: 1e5, outputSwing: 1.2, inputOffset: 0);
        Assert.Equal(100e-6 * 10e3 / 1e5, fe.VoltageAt(100e-6), 1e-15);
        Assert.Equal(100e-6, fe.CurrentAt(fe.VoltageAt(100e-6)), 1e-15);
        var belowKnee = (fe.VoltageAt(119e-6) - fe.VoltageAt(110e-6)) / 9e-6;
        var aboveKnee = (fe.VoltageAt(140e-6) - fe.VoltageAt(130e-6)) / 10e-6;
        Assert.Equal(0.1, belowKnee, 1e-6);      // R_f/A_OL = 0.1 Ω
        Assert.Equal(10e3, aboveKnee, 1e-3);     // R_f
        Assert.True(double.IsPositiveInfinity(fe.Sensed(fe.VoltageAt(130e-6))));
    }

    internal static string MinimalBench(string fuse, string rating = "2 A", string extra = "") => $$"""
        bench: minimal
        uut:
          manufacturer: Test Maker
          model: T-1
          serial: T1-0001
          jacks:
            - { name: IN, fuseRating: {{rating}} }
          ranges:
            - { name: 10mA, jack: IN, fullScale: 10 mA, resolution: 1 uA, nominalShunt: 10 ohm, accuracy: { reading: 0.001, counts: 2 } }
            - { name: 1A, jack: IN, fullScale: 1 A, resolution: 100 uA, nominalShunt: 0.1 ohm, accuracy: { reading: 0.002, counts: 2 } }
        supply: { voltage: 5 V, currentLimit: 3 A }
        load: { minimumVoltage: 0.5 V, maxCurrent: 5 A }
        wiring: 10 mohm
        instruments:
          supply: { resource: "SIM::supply" }
          load: { resource: "SIM::load" }
          dropMeter: { resource: "SIM::dmm" }
          uutMeter: { resource: "SIM::uut" }
        simulation:
          uut:
            jacks:
              IN: { contacts: 1 mohm, fuse: {{fuse}} }
        {{extra}}
        """;

    private static BenchCircuit Circuit(SimulatedBench bench) =>
        (BenchCircuit)typeof(SimulatedBench).GetField("_circuit", System.Reflection.BindingFlags.NonPublic | System.Reflection.BindingFlags.Instance)!.GetValue(bench)!;

    private static ThermalElement Fuse(SimulatedBench bench) => Circuit(bench).Uut.Jack("IN").Fuse.Element;
}
