using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments;

namespace ShuntSweep.Engine.Running;

/// <summary>What switching one output-bearing instrument off achieved: confirmed by read-back, or the reason it was not.</summary>
/// <param name="Role">The bench role (<c>load</c>, <c>supply</c>).</param>
/// <param name="Resource">The instrument's resource string.</param>
/// <param name="Confirmed">True when the instrument read back its output (input) as off.</param>
/// <param name="Problem">Why it was not confirmed; null when it was.</param>
public sealed record OffCheck(string Role, string Resource, bool Confirmed, string? Problem);

/// <summary>Switches every output-bearing instrument off at once, each with its own deadline, so that one hung or vanished instrument never keeps another on.</summary>
/// <remarks>Each off command is sent at once, ahead of answers a hung exchange still owes, and then confirmed by query within the same deadline.</remarks>
public static class SafeOff
{
    /// <summary>The longest one instrument may take to switch off and confirm it.</summary>
    public static readonly TimeSpan Deadline = TimeSpan.FromSeconds(4);

    /// <summary>Switches the load's input and the supply's output off concurrently and reports each; never throws.</summary>
    public static async Task<IReadOnlyList<OffCheck>> SwitchOffAsync(InstrumentBench bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var load = AttemptAsync("load", bench.Load.Resource, bench.IoTime, async ct =>
        {
            await bench.Load.SetInputAsync(false, ct);
            return !await bench.Load.IsInputOnAsync(ct);
        });
        var supply = AttemptAsync("supply", bench.Supply.Resource, bench.IoTime, async ct =>
        {
            await bench.Supply.SetOutputAsync(false, ct);
            return !await bench.Supply.IsOutputOnAsync(ct);
        });
        return await Task.WhenAll(load, supply);
    }

    private static async Task<OffCheck> AttemptAsync(string role, string resource, TimeProvider time, Func<CancellationToken, Task<bool>> switchOff)
    {
        // Switching off is idempotent: an attempt that did not confirm (a command the instrument missed, an error on the way) is made again until the deadline.
        using var deadline = new CancellationTokenSource(Deadline, time);
        var started = time.GetTimestamp();
        var silent = $"no confirmation within {QuantityFormatter.Format(Deadline.TotalSeconds, SiUnit.Second)} (it does not answer)";
        var problem = silent;
        while (true)
        {
            var left = Deadline - time.GetElapsedTime(started);
            if (left <= TimeSpan.Zero)
            {
                return new OffCheck(role, resource, false, problem);
            }

            try
            {
                // WaitAsync bounds the attempt even where a driver does not honour the token.
                if (await switchOff(deadline.Token).WaitAsync(left, time, CancellationToken.None))
                {
                    return new OffCheck(role, resource, true, null);
                }

                problem = "it still reports its output on";
            }
            catch (Exception ex) when (ex is OperationCanceledException or TimeoutException)
            {
                return new OffCheck(role, resource, false, silent);
            }
            catch (Exception ex) when (ex is not OutOfMemoryException)
            {
                problem = ex.Message;
            }

            try
            {
                await Task.Delay(TimeSpan.FromMilliseconds(100), time, deadline.Token);
            }
            catch (OperationCanceledException)
            {
                return new OffCheck(role, resource, false, problem);
            }
        }
    }
}
