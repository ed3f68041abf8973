using BenchmarkDotNet.Running;
using ShuntSweep.Benchmarks;

// `schedule SEQUENCE BENCH` reports the engine's schedule in virtual time; anything else goes to BenchmarkDotNet.
if (args is ["schedule", var sequence, var bench])
{
    return await ScheduleReport.RunAsync(sequence, bench);
}

BenchmarkSwitcher.FromAssembly(typeof(ScheduleReport).Assembly).Run(args);
return 0;
