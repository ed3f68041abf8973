using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>Runs <c>shuntsweep</c> in-process, as a user would from the shell.</summary>
internal static class Cli
{
    private static readonly SemaphoreSlim OneAtATime = new(1, 1);

    /// <summary>Runs archive into a database of the test run's own, never the user's.</summary>
    static Cli() => Environment.SetEnvironmentVariable("SHUNTSWEEP_ARCHIVE", Path.Combine(Testing.Some.TempDirectory(), "archive.db"));

    /// <summary>Invokes the command line with <paramref name="args"/> and returns its exit code.</summary>
    /// <remarks>Invocations are serialised: the console is process-wide.</remarks>
    public static async Task<int> RunAsync(params string[] args)
    {
        await OneAtATime.WaitAsync(TestContext.Current.CancellationToken);
        try
        {
            return await ShuntSweepCommandLine.Create().Parse(args).InvokeAsync(cancellationToken: TestContext.Current.CancellationToken);
        }
        finally
        {
            OneAtATime.Release();
        }
    }
}
