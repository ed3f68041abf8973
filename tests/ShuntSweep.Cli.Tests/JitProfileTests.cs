using ShuntSweep.Cli.Tests.Served;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>The compilation profile each command records for its next start, and a command that runs as before when it cannot.</summary>
public sealed class JitProfileTests
{
    [Fact]
    public async Task ACommand_RecordsItsCompilationProfile_UnderTheUsersLocalData()
    {
        var data = Some.TempDirectory();

        using (var tool = ToolProcess.Start(new Dictionary<string, string> { ["XDG_DATA_HOME"] = data }, "plan", Repo.File("sequences/ci-smoke.yaml")))
        {
            Assert.Equal(0, await tool.WaitAsync(TimeSpan.FromSeconds(60)));
        }

        var profile = new FileInfo(Path.Combine(data, "shuntsweep", "jit", "plan.profile"));
        Assert.True(profile.Exists, $"no profile at {profile.FullName}");
        Assert.True(profile.Length > 0);
    }

    [Fact]
    public async Task ACommand_WhoseProfileFolderCannotBeMade_RunsAsBefore()
    {
        // A file where the folder should be: creating the cache fails, and the command must not notice.
        var blocked = Some.TempFile("not a folder");

        using var tool = ToolProcess.Start(new Dictionary<string, string> { ["XDG_DATA_HOME"] = blocked }, "plan", Repo.File("sequences/ci-smoke.yaml"));

        Assert.Equal(0, await tool.WaitAsync(TimeSpan.FromSeconds(60)));
        Assert.Contains("steps", tool.Output, StringComparison.Ordinal);
    }
}
