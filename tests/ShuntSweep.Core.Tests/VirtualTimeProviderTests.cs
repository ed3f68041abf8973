using ShuntSweep.Core.Timing;
using Xunit;

namespace ShuntSweep.Core.Tests;

public sealed class VirtualTimeProviderTests
{
    [Fact]
    public async Task ConcurrentWaits_ToTheSameDeadline_AdvanceTimeOnce()
    {
        var clock = new VirtualBenchClock(new VirtualTimeProvider());
        var start = clock.Now();
        var deadline = start + TimeSpan.FromMilliseconds(200);
        await Task.WhenAll(Enumerable.Range(0, 3).Select(_ => clock.WaitUntilAsync(deadline).AsTask()));
        Assert.Equal(TimeSpan.FromMilliseconds(200), clock.Now() - start);
    }

    [Fact]
    public async Task TaskDelay_OnVirtualTime_CompletesWhenTimePasses()
    {
        var time = new VirtualTimeProvider();
        var delay = Task.Delay(TimeSpan.FromSeconds(5), time, TestContext.Current.CancellationToken);
        Assert.False(delay.IsCompleted);
        time.Advance(TimeSpan.FromSeconds(5));
        await delay.WaitAsync(TimeSpan.FromSeconds(5), TestContext.Current.CancellationToken);
        Assert.True(delay.IsCompletedSuccessfully);
    }

    [Fact]
    public void Time_NeverMovesBackwards()
    {
        var time = new VirtualTimeProvider();
        time.Advance(TimeSpan.FromSeconds(10));
        time.AdvanceTo(VirtualTimeProvider.DefaultStart);
        Assert.Equal(VirtualTimeProvider.DefaultStart + TimeSpan.FromSeconds(10), time.GetUtcNow());
    }
}
