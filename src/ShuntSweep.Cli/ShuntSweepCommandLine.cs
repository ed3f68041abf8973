using System.CommandLine;
using ShuntSweep.Cli.Commands;

namespace ShuntSweep.Cli;

/// <summary>The <c>shuntsweep</c> command tree; one place lists every command.</summary>
internal static class ShuntSweepCommandLine
{
    /// <summary>Builds the root command with all subcommands.</summary>
    public static RootCommand Create() =>
        new("shuntsweep — characterise the burden voltage of current meters, range by range, on a real or simulated bench.")
        {
            RunCommand.Create(),
            PlanCommand.Create(),
            FitCommand.Create(),
            PredictCommand.Create(),
            CorrectCommand.Create(),
            ReportCommand.Create(),
            HistoryCommand.Create(),
            CompareCommand.Create(),
            ProbeCommand.Create(),
            SimCommand.Create(),
        };
}
