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
            // On standard error, like every caution: the operator sees it under --quiet and when the results are piped.
            Terminal.Error.MarkupLineInterpolated($"[yellow]operator ({prompt.Id}):[/] {prompt.Text}");
            return await new ConfirmationPrompt("Done? (n stops the run with the outputs off)") { DefaultValue = false }.ShowAsync(Terminal.Error, cancellationToken);
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
