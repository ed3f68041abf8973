using System.Reflection;

namespace ShuntSweep.Core.Records;

/// <summary>The tool's name, version and the source commit it was built from, as a calibration record must name the software that made it.</summary>
public static class SoftwareIdentity
{
    /// <summary>"shuntsweep 0.1.0 (commit 13abdbee680c)", or "(commit not recorded)" for a build made outside a git clone.</summary>
    public static string Describe { get; } = Make(typeof(SoftwareIdentity).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion);

    /// <summary>The description of an informational version "VERSION[+COMMIT]" (the SDK appends the commit when it builds from git).</summary>
    public static string Make(string? informationalVersion)
    {
        var parts = (informationalVersion ?? "?").Split('+', 2);
        var commit = parts.Length == 2 && parts[1].Length > 0 ? $"commit {parts[1][..Math.Min(12, parts[1].Length)]}" : "commit not recorded";
        return $"shuntsweep {parts[0]} ({commit})";
    }
}
