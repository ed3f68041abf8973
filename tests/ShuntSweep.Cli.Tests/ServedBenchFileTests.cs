using System.Net;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation;
using ShuntSweep.Simulation.Hosting;
using ShuntSweep.Testing;
using Xunit;

namespace ShuntSweep.Cli.Tests;

/// <summary>The bench file <c>sim serve --write-bench</c> writes drives the served instruments: every role on its TCP port, no simulator.</summary>
public sealed class ServedBenchFileTests
{
    [Fact]
    public async Task WrittenBenchFile_NamesEachServedPort_AndProbesEveryInstrumentOverTcp()
    {
        var source = Repo.File("simulators/handheld-tarnwell-tw18.yaml");
        var description = BenchReader.Load(source);
        await using var simulated = SimulatedBench.Create(description, new RealBenchClock(TimeProvider.System), 1);
        await using var tcp = TcpBenchHost.Start(simulated, IPAddress.Loopback, 0, allowRemote: false);
        var file = Path.Combine(Some.TempDirectory(), "served.yaml");
        ServedBenchFile.Write(source, tcp.Endpoints.Select(e => (e.Name, e.Resource)), file);

        var served = BenchReader.Load(file);
        Assert.False(served.IsSimulated);
        Assert.Null(served.Simulation);
        Assert.Equal(description.Uut.Ranges.Select(r => r.Name), served.Uut.Ranges.Select(r => r.Name));
        Assert.Equal(
            tcp.Endpoints.Select(e => e.Resource).Order(StringComparer.Ordinal),
            served.Instruments.Values.Select(i => i.Resource).Order(StringComparer.Ordinal));
        Assert.Equal(0, await Cli.RunAsync("probe", "--bench", file, "--count", "1"));
    }
}
