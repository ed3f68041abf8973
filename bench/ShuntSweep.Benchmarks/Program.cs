using BenchmarkDotNet.Running;
using ShuntSweep.Benchmarks;

// `schedule SEQUENCE BENCH` reports the engine's schedule in virtual time; `served SEQUENCE BENCH [--rounds N]` the wall time of a
// run over loopback TCP with concurrent and sequential end-of-point queries; anything else goes to BenchmarkDotNet.
if (args is ["schedule", var sequence, var bench])
{
    return await ScheduleReport.RunAsync(sequence, bench);
}

if (args is ["served", var servedSequence, var servedBench, ..] && (args.Length == 3 || args is [_, _, _, "--rounds", _]))
{
    return await ServedReport.RunAsync(servedSequence, servedBench, args.Length == 5 ? int.Parse(args[4], System.Globalization.CultureInfo.InvariantCulture) : 3);
}

// `coverage [SEEDS]` reports how often the analysis's 95 % intervals hold the known truth of synthetic sweeps.
if (args is ["coverage", .. var rest])
{
    return CoverageReport.Run(rest is [var n] ? int.Parse(n, System.Globalization.CultureInfo.InvariantCulture) : 1000);
}

BenchmarkSwitcher.FromAssembly(typeof(ScheduleReport).Assembly).Run(args);
return 0;
