using System.Runtime;

namespace ShuntSweep.Cli;

/// <summary>Background compilation from a recorded profile (.NET multicore JIT): each command records which methods it compiled, and the
/// next start of the same command compiles them on a spare core before they are first called.</summary>
/// <remarks>A run lives seconds and a fifth of its CPU goes to compiling code that runs once; the profile moves most of that off the critical
/// path. It is a cache under the user's local application data, one file per command; when that folder cannot be written the tool runs as
/// before, compiling on first call.</remarks>
internal static class JitProfile
{
    /// <summary>Starts recording (and, when a profile from an earlier start exists, playing back) for the command named by the first argument.</summary>
    public static void Start(string[] args)
    {
        var command = args.Length > 0 && args[0].All(c => char.IsAsciiLetterLower(c) || c == '-') ? args[0] : "none";
        try
        {
            var root = Path.Combine(Environment.GetFolderPath(Environment.SpecialFolder.LocalApplicationData, Environment.SpecialFolderOption.Create), "shuntsweep", "jit");
            Directory.CreateDirectory(root);
            ProfileOptimization.SetProfileRoot(root);
            ProfileOptimization.StartProfile($"{command}.profile");
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or ArgumentException or NotSupportedException)
        {
            // No cache: every method is compiled when first called, as without a profile.
        }
    }
}
