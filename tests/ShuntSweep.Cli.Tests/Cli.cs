using System.Diagnostics;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>Runs <c>shuntsweep</c> in-process, or as a child process when standard output and error must be told apart, as a user would from the shell.</summary>
internal static class Cli
{
    private static readonly SemaphoreSlim OneAtATime = new(1, 1);

    /// <summary>Runs archive into a database of the test run's own, never the user's.</summary>
    static Cli() => Environment.SetEnvironmentVariable("SHUNTSWEEP_ARCHIVE", Path.Combine(Testing.Some.TempDirectory(), "archive.db"));

    /// <summary>Invokes the command line with <paramref name="args"/> and returns its exit code; an exception no command handled is thrown
    /// to the caller instead of being printed as a stack trace with exit code 1.</summary>
    public static Task<int> RunStrictAsync(params string[] args) =>
        OneAtATimeAsync(() => ShuntSweepCommandLine.InvokeAsync(args, Strict(), TestContext.Current.CancellationToken));

    /// <summary>As <see cref="RunStrictAsync"/>, and returns what the command wrote to standard error.</summary>
    public static Task<(int Exit, string Err)> RunStrictCapturingErrorAsync(params string[] args) =>
        OneAtATimeAsync(async () =>
        {
            var original = Console.Error;
            using var err = new StringWriter();
            Console.SetError(err);
            try
            {
                return (await ShuntSweepCommandLine.InvokeAsync(args, Strict(), TestContext.Current.CancellationToken), err.ToString());
            }
            finally
            {
                Console.SetError(original);
            }
        });

    /// <summary>Invokes the command line with <paramref name="args"/> and returns its exit code.</summary>
    /// <remarks>Invocations are serialised: the console is process-wide.</remarks>
    public static Task<int> RunAsync(params string[] args) =>
        OneAtATimeAsync(() => ShuntSweepCommandLine.InvokeAsync(args, cancellationToken: TestContext.Current.CancellationToken));

    private static System.CommandLine.InvocationConfiguration Strict() => new() { EnableDefaultExceptionHandler = false };

    /// <summary>Runs <paramref name="invoke"/> while no other in-process invocation runs: the console is process-wide.</summary>
    private static async Task<T> OneAtATimeAsync<T>(Func<Task<T>> invoke)
    {
        await OneAtATime.WaitAsync(TestContext.Current.CancellationToken);
        try
        {
            return await invoke();
        }
        finally
        {
            OneAtATime.Release();
        }
    }

    /// <summary>Runs <c>shuntsweep</c> as a child process with its output piped and <paramref name="environment"/> added to its environment.</summary>
    public static async Task<(int Exit, string Out, string Err)> RunProcessAsync(IReadOnlyDictionary<string, string?> environment, params string[] args)
    {
        var ct = TestContext.Current.CancellationToken;
        var start = new ProcessStartInfo("dotnet")
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            RedirectStandardInput = true,
        };
        start.ArgumentList.Add(Path.Combine(AppContext.BaseDirectory, "shuntsweep.dll"));
        foreach (var a in args)
        {
            start.ArgumentList.Add(a);
        }

        start.Environment["COLUMNS"] = null;
        foreach (var (key, value) in environment)
        {
            start.Environment[key] = value;
        }

        using var child = Process.Start(start)!;
        child.StandardInput.Close();
        var output = child.StandardOutput.ReadToEndAsync(ct);
        var error = child.StandardError.ReadToEndAsync(ct);
        await child.WaitForExitAsync(ct);
        return (child.ExitCode, await output, await error);
    }
}
