using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;
using ShuntSweep.Core.Timing;
using ShuntSweep.Engine.Journal;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Engine.Tests;

public sealed class RunJournalTests
{
    private static Sample S(int step, int i) =>
        new("60mA", "mA", step, i, new Current(0.01), new Current(0.01), 0.01, new Voltage(0.02), new Voltage(5), new Voltage(4.9), TimeSpan.FromSeconds(step));

    [Fact]
    public void Reopen_OfAJournalWithOtherColumns_IsRefused_AndLeavesItUntouched()
    {
        // A journal written before the shunt_tap_V column existed: appending today's rows would mix two layouts.
        var dir = Some.TempDirectory();
        var path = Path.Combine(dir, RunJournal.JournalFile);
        const string older = "range,jack,step,sample,setpoint_A,reference_A,uut_reading_A,burden_V,supply_V,load_V,elapsed_s\n60mA,mA,0,0,0.01,0.01,,0.02,5,4.9,0\n";
        File.WriteAllText(path, older);
        File.WriteAllText(Path.Combine(dir, RunJournal.EventsFile), "");
        var time = new VirtualTimeProvider();

        var ex = Assert.Throws<InvalidDataException>(() => RunJournal.Reopen(dir, new StepDone(0, older.Length), time, time.GetUtcNow()));

        Assert.Contains("start a new run", ex.Message, StringComparison.Ordinal);
        Assert.Equal(older, File.ReadAllText(path));
    }

    [Fact]
    public void Reopen_CutsTheJournalBackToTheLastCompletedStep()
    {
        var dir = Some.TempDirectory();
        var time = new VirtualTimeProvider();
        using (var journal = RunJournal.Create(dir, time, time.GetUtcNow()))
        {
            journal.CompleteStep(0, [S(0, 0), S(0, 1)]);
            journal.CompleteStep(1, [S(1, 0), S(1, 1)]);
        }

        // A crash while writing step 2: its rows were half written, its step-done never was.
        File.AppendAllText(Path.Combine(dir, RunJournal.JournalFile), JournalCsv.FormatRows([S(2, 0)]) + "60mA,mA,2,1,0.0");
        File.AppendAllText(Path.Combine(dir, RunJournal.EventsFile), "{\"event\":\"step-d");

        var last = EventLog.LastStepDone(dir);
        Assert.Equal(1, last!.Step);
        using (var reopened = RunJournal.Reopen(dir, last, time, time.GetUtcNow()))
        {
            reopened.CompleteStep(2, [S(2, 0), S(2, 1)]);
        }

        var contents = JournalCsv.Read(Path.Combine(dir, RunJournal.JournalFile));
        Assert.False(contents.TornTail);
        Assert.Equal([0, 0, 1, 1, 2, 2], contents.Samples.Select(s => s.Step));
        Assert.Equal(2, EventLog.LastStepDone(dir)!.Step);
    }
}
