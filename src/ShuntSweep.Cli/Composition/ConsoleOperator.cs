using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using Spectre.Console;

namespace ShuntSweep.Cli.Composition;

/// <summary>Asks the operator at the terminal to confirm each manual action.</summary>
internal sealed class ConsoleOperator : IOperator
{
    public async Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken)
    {
        AnsiConsole.MarkupLineInterpolated($"[yellow]operator ({prompt.Id}):[/] {prompt.Text}");
        return await new ConfirmationPrompt("Done? (no aborts the run)").ShowAsync(AnsiConsole.Console, cancellationToken);
    }
}
