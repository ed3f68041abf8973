using ShuntSweep.Analysis;
using ShuntSweep.Analysis.Insertion;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

public sealed class InsertionAgainstSimulationTests
{
    private static readonly string Bench = Repo.File("simulators/handheld-tarnwell-tw18.yaml");

    /// <summary>The demo sequence's settling tolerance on its heated ranges, as a fraction of the drop.</summary>
    private const double SettlingShortfall = 2e-6;

    // One circuit per range of the demo, each drawing roughly half to two thirds of full scale (invented circuits).
    public static TheoryData<string, double, double> Circuits => new()
    {
        { "6mA", 1.0, 100.0 },
        { "60mA", 1.0, 20.0 },
        { "400mA", 1.0, 2.0 },
        { "10A", 0.5, 0.05 },
    };

    [Theory]
    [MemberData(nameof(Circuits))]
    public async Task Predict_AgreesWithTheSimulatedUnitInsertedInTheSameCircuit(string range, double volts, double ohms)
    {
        var result = await DemoResultAsync();

        var predicted = Assert.Single(InsertionError.Predict(result, volts, ohms, range).Ranges);
        var truth = await SimulateAsync(range, volts, ohms);

        // Kirchhoff's voltage law on the simulator's own physics (fuse and shunt at their steady temperatures) against the solution on
        // the fitted curve: they agree within the prediction's expanded uncertainty (k = 2) combined with what the demo's settling rule
        // lets each heated point fall short of its steady state (within 0.0002 % of the drop).
        var settling = SettlingShortfall * truth.Drop.Volts / (ohms + (truth.Drop.Volts / truth.Current.Amperes));
        var allowance = Math.Sqrt(Math.Pow(2 * predicted.CurrentA.StandardUncertainty, 2) + Math.Pow(settling, 2));
        Assert.True(Math.Abs(predicted.CurrentA.Value - truth.Current.Amperes) <= allowance, $"{range}: predicted {predicted.CurrentA.Value:G9} A, simulated {truth.Current.Amperes:G9} A, allowed ±{allowance:G3}");
        Assert.Equal(truth.Drop.Volts, predicted.DropVolts, truth.Drop.Volts * 1e-3);
        Assert.Equal(volts - truth.Drop.Volts, predicted.VoltsLeft, truth.Drop.Volts * 1e-3);
    }

    [Theory]
    [MemberData(nameof(Circuits))]
    public async Task Correct_TakesTheSimulatedCurrentBackToTheUndisturbedCurrent(string range, double volts, double ohms)
    {
        var result = await DemoResultAsync();
        var truth = await SimulateAsync(range, volts, ohms);

        var corrected = InsertionError.Correct(result, range, truth.Current.Amperes, ohms);

        // Undisturbed current V/R (Ohm's law, common practice, no source); the correction removes the burden's share of it.
        var undisturbed = volts / ohms;
        var allowance = Math.Sqrt(Math.Pow(2 * corrected.UndisturbedCurrentA.StandardUncertainty, 2) + Math.Pow(SettlingShortfall * truth.Drop.Volts / ohms, 2));
        Assert.True(Math.Abs(corrected.UndisturbedCurrentA.Value - undisturbed) <= allowance, $"{range}: corrected {corrected.UndisturbedCurrentA.Value:G9} A, undisturbed {undisturbed:G9} A, allowed ±{allowance:G3}");
        Assert.True(Math.Abs(corrected.UndisturbedCurrentA.Value - undisturbed) < 0.01 * Math.Abs(truth.Current.Amperes - undisturbed), $"{range}: the correction removed less than 99 % of the insertion error");
    }

    private static async Task<(Current Current, Voltage Drop, double Reading)> SimulateAsync(string range, double volts, double ohms)
    {
        await using var unit = SimulatedBench.Create(BenchReader.Load(Bench), new VirtualBenchClock(new VirtualTimeProvider()), 7);
        return unit.SteadyStateInCircuit(range, new Voltage(volts), new Resistance(ohms));
    }

    private static async Task<Analysis.Results.CharacterisationResult> DemoResultAsync()
    {
        await Gate.WaitAsync();
        try
        {
            if (_demo is null)
            {
                var dir = Some.TempDirectory();
                Assert.Equal(0, await Cli.RunAsync("run", Repo.File("sequences/demo-handheld.yaml"), "--bench", Bench, "--out", dir, "--seed", "7"));
                _demo = ResultJson.Read(Path.Combine(dir, "result.json"));
            }

            return _demo;
        }
        finally
        {
            Gate.Release();
        }
    }

    private static readonly SemaphoreSlim Gate = new(1, 1);
    private static Analysis.Results.CharacterisationResult? _demo;
}
