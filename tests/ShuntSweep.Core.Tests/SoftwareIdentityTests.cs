using ShuntSweep.Core.Records;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class SoftwareIdentityTests
{
    [Fact]
    public void ABuildFromGit_NamesItsVersionAndCommit()
    {
        Assert.Equal("shuntsweep 0.1.0 (commit 13abdbee680c)", SoftwareIdentity.Make("0.1.0+13abdbee680ca09e009f9b032eb97d00299df3b7"));
    }

    [Fact]
    public void ABuildWithoutACommit_SaysSo()
    {
        Assert.Equal("shuntsweep 0.1.0 (commit not recorded)", SoftwareIdentity.Make("0.1.0"));
        Assert.Equal("shuntsweep ? (commit not recorded)", SoftwareIdentity.Make(null));
    }

    [Fact]
    public void ThisBuild_CarriesTheCommitItWasBuiltFrom()
    {
        // The repository is a git clone, so the SDK's source link stamps the commit into the informational version.
        Assert.Matches(@"^shuntsweep \d+\.\d+\.\d+ \(commit [0-9a-f]{12}\)$", SoftwareIdentity.Describe);
    }
}
