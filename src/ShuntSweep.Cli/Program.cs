using System.CommandLine;
using ShuntSweep.Cli.Commands;

var root = new RootCommand("shuntsweep — characterise the burden voltage of current meters, range by range, on a real or simulated bench.")
{
    RunCommand.Create(),
    PlanCommand.Create(),
    FitCommand.Create(),
};

return await root.Parse(args).InvokeAsync();
