using ShuntSweep.Engine.Planning;
using ShuntSweep.Engine.Running;
using Spectre.Console;

namespace ShuntSweep.Cli.Composition;

/// <summary>Asks the operator at the terminal to confirm each manual action, with the live progress bar put aside meanwhile.</summary>
internal sealed class ConsoleOperator(RunDisplay display) : IOperator
{
    public async Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken)
    {
        await display.PauseAsync();
        try
        {
            AnsiConsole.MarkupLineInterpolated($"[yellow]operator ({prompt.Id}):[/] {prompt.Text}");
            return await new ConfirmationPrompt("Done? (n stops the run with the outputs off)") { DefaultValue = false }.ShowAsync(AnsiConsole.Console, cancellationToken);
        }
        finally
        {
            await display.StartAsync();
        }
    }

    public string Describe(PromptStep prompt) => "operator at the terminal";
}

/// <summary>Answers the confirmation before outputs turn on with yes (<c>--yes</c>, for unattended runs) and passes every other prompt on.</summary>
internal sealed class AssumeYesOperator(IOperator inner) : IOperator
{
    public Task<bool> ConfirmAsync(PromptStep prompt, CancellationToken cancellationToken) =>
        prompt.Id == Runner.StartPromptId ? Task.FromResult(true) : inner.ConfirmAsync(prompt, cancellationToken);

    public string Describe(PromptStep prompt) => prompt.Id == Runner.StartPromptId ? "--yes" : inner.Describe(prompt);
}
