using System.CommandLine;
using System.CommandLine.Parsing;
using ShuntSweep.Cli.Commands;
using ShuntSweep.Cli.Composition;
using Spectre.Console;

namespace ShuntSweep.Cli;

/// <summary>The <c>shuntsweep</c> command tree; one place lists every command and applies the command-line conventions.</summary>
internal static class ShuntSweepCommandLine
{
    /// <summary>Results are not printed; errors and safety cautions still go to standard error.</summary>
    public static readonly Option<bool> Quiet = new("--quiet", "-q")
    {
        Description = "Print nothing but errors and cautions (on standard error); the exit code tells the outcome.",
        Recursive = true,
    };

    /// <summary>Builds the root command with all subcommands.</summary>
    public static RootCommand Create() =>
        new("shuntsweep — characterise the burden voltage of current meters, range by range, on a real or simulated bench.")
        {
            Quiet,
            RunCommand.Create(),
            PlanCommand.Create(),
            FitCommand.Create(),
            PredictCommand.Create(),
            CorrectCommand.Create(),
            ReportCommand.Create(),
            HistoryCommand.Create(),
            CompareCommand.Create(),
            OverlayCommand.Create(),
            SealCommands.Endorse(),
            SealCommands.Verify(),
            ProbeCommand.Create(),
            CheckProfileCommand.Create(),
            SimCommand.Create(),
        };

    /// <summary>Parses and runs <paramref name="args"/>: a usage error (unknown command or option, bad or missing value) is written to
    /// standard error naming the offending token and exits 2; anything else runs the command.</summary>
    public static async Task<int> InvokeAsync(string[] args, InvocationConfiguration? invocation = null, CancellationToken cancellationToken = default)
    {
        var parse = Create().Parse(args);
        Terminal.Configure(parse.GetValue(Quiet));
        var problems = UsageErrors(parse);
        if (problems.Count > 0)
        {
            foreach (var problem in problems)
            {
                Terminal.Fail(problem, ExitCodes.InvalidInput);
            }

            Terminal.Error.MarkupLineInterpolated($"See '{CommandPath(parse.CommandResult)} --help'.");
            return ExitCodes.InvalidInput;
        }

        return await parse.InvokeAsync(invocation, cancellationToken);
    }

    /// <summary>The usage errors of <paramref name="parse"/>, an unknown option first: an argument slot that swallowed <c>--nosuchopt</c>
    /// would otherwise make the parser blame the file that follows it.</summary>
    internal static IReadOnlyList<string> UsageErrors(ParseResult parse)
    {
        var problems = new List<string>();
        var command = CommandPath(parse.CommandResult);
        foreach (var token in parse.Tokens)
        {
            if (token.Type == TokenType.Argument && LooksLikeOption(token.Value) && !IsOptionValue(parse, token))
            {
                problems.Add($"'{token.Value}' is not an option of '{command}'.");
            }
        }

        var unknownOptions = problems.Count;
        foreach (var error in parse.Errors.OrderBy(e => e.Message.Contains("Unrecognized", StringComparison.Ordinal) ? 0 : 1))
        {
            if (unknownOptions == 0 || !error.Message.Contains("Unrecognized command or argument", StringComparison.Ordinal))
            {
                problems.Add(error.Message);
            }
        }

        return problems;
    }

    private static bool LooksLikeOption(string value) => value.Length > 1 && value[0] == '-' && (char.IsAsciiLetter(value[1]) || (value[1] == '-' && value.Length > 2));

    /// <summary>Whether <paramref name="token"/> was taken as the value of an option (a value may itself start with a dash).</summary>
    private static bool IsOptionValue(ParseResult parse, Token token)
    {
        for (var r = parse.CommandResult; r is not null; r = r.Parent as CommandResult)
        {
            if (r.Children.OfType<OptionResult>().Any(o => o.Tokens.Any(t => ReferenceEquals(t, token) || t.Equals(token))))
            {
                return true;
            }
        }

        return false;
    }

    private static string CommandPath(CommandResult result)
    {
        var names = new List<string>();
        for (SymbolResult? r = result; r is not null; r = r.Parent)
        {
            if (r is CommandResult c)
            {
                names.Insert(0, c.Command.Name);
            }
        }

        return string.Join(' ', names);
    }
}
