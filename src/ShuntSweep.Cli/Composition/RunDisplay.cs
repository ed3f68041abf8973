using ShuntSweep.Engine.Running;
using Spectre.Console;

namespace ShuntSweep.Cli.Composition;

/// <summary>The live progress bar of a run, which steps aside while the operator is asked something and comes back after.</summary>
/// <remarks>A live display and a prompt cannot share the terminal, so a pause ends the current bar and a resume starts a new one at the same progress.</remarks>
internal sealed class RunDisplay(string title, int total) : IProgress<RunProgress>, IAsyncDisposable
{
    private readonly Lock _gate = new();
    private RunProgress _last = new(0, total, string.Empty);
    private ProgressTask? _task;
    private TaskCompletionSource? _release;
    private Task? _live;

    /// <summary>Shows the bar (again).</summary>
    public async Task StartAsync()
    {
        var shown = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        _release = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        var release = _release.Task;
        _live = AnsiConsole.Progress()
            .AutoClear(false)
            .Columns(new TaskDescriptionColumn(), new ProgressBarColumn(), new PercentageColumn(), new RemainingTimeColumn(), new ElapsedTimeColumn())
            .StartAsync(async context =>
            {
                lock (_gate)
                {
                    _task = context.AddTask(Markup.Escape(title), maxValue: total);
                    Apply(_task, _last);
                }

                shown.SetResult();
                await release;
            });
        await shown.Task;
    }

    /// <summary>Takes the bar off the terminal until <see cref="StartAsync"/>.</summary>
    public async Task PauseAsync()
    {
        lock (_gate)
        {
            _task = null;
        }

        _release?.TrySetResult();
        if (_live is { } live)
        {
            await live;
        }

        _live = null;
    }

    /// <inheritdoc />
    public void Report(RunProgress value)
    {
        lock (_gate)
        {
            _last = value;
            if (_task is { } t)
            {
                Apply(t, value);
            }
        }
    }

    /// <inheritdoc />
    public async ValueTask DisposeAsync() => await PauseAsync();

    private static void Apply(ProgressTask task, RunProgress p)
    {
        task.Value = p.StepsDone;
        task.Description = Markup.Escape(p.Activity.Length == 0 ? "starting" : p.Activity);
    }
}
