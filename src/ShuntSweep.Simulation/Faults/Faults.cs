using ShuntSweep.Core.Timing;
using ShuntSweep.Simulation.Physics;

namespace ShuntSweep.Simulation.Faults;

/// <summary>Common behaviour of the connection faults: they fire once when their trigger holds, except where a kind says otherwise.</summary>
internal abstract class ConnectionFault(string instrument, FaultTrigger trigger, bool repeats) : IFault
{
    private bool _fired;

    /// <inheritdoc />
    public string? Instrument { get; } = instrument;

    /// <inheritdoc />
    public void Attach(BenchCircuit circuit)
    {
    }

    /// <inheritdoc />
    public virtual void OnCommand(FaultContext context)
    {
    }

    /// <inheritdoc />
    public virtual ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken) =>
        ValueTask.FromResult(reply);

    /// <summary>True when the fault should act now (and, for a one-shot fault, marks it spent).</summary>
    protected bool Fire(FaultContext context)
    {
        if ((_fired && !repeats) || !trigger.Holds(context))
        {
            return false;
        }

        _fired = true;
        return true;
    }
}

/// <summary>Every reply (from the trigger on) is delayed on the bench clock: a slow instrument or a congested link.</summary>
internal sealed class LatencyFault(string instrument, FaultTrigger trigger, TimeSpan delay) : ConnectionFault(instrument, trigger, repeats: true)
{
    /// <inheritdoc />
    public override async ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken)
    {
        if (Fire(context))
        {
            await context.Clock.WaitAsync(delay, cancellationToken);
        }

        return reply;
    }
}

/// <summary>One reply arrives only after <c>delay</c> on a timer of the bench's time source, which is later than the client's timeout:
/// in virtual time it comes once the client (or anyone) moves the clock past it.</summary>
internal sealed class LateReplyFault(string instrument, FaultTrigger trigger, TimeSpan delay) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override async ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken)
    {
        if (Fire(context))
        {
            // Client timeouts run on the wall clock, so lateness is wall-clock time even on a virtual bench; a virtual delay would
            // wait for a clock that nobody moves while this reply is owed.
            var time = context.Clock is VirtualBenchClock ? TimeProvider.System : context.Clock.Time;
            await Task.Delay(delay, time, cancellationToken);
        }

        return reply;
    }
}

/// <summary>One reply loses its tail (terminator included): a truncated block.</summary>
internal sealed class TruncatedReplyFault(string instrument, FaultTrigger trigger, int? keep) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken)
    {
        if (!Fire(context))
        {
            return ValueTask.FromResult(reply);
        }

        var length = Math.Clamp(keep ?? ((reply.Length - 1) / 2), 0, Math.Max(0, reply.Length - 1));
        return ValueTask.FromResult(reply[..length]);
    }
}

/// <summary>One byte of one reply is corrupted (bit 6 flipped, so a digit becomes a letter): line noise.</summary>
internal sealed class GarbledByteFault(string instrument, FaultTrigger trigger) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken)
    {
        if (!Fire(context) || reply.Length < 2)
        {
            return ValueTask.FromResult(reply);
        }

        var copy = (byte[])reply.Clone();
        var at = (int)(context.Random.NextDouble() * (copy.Length - 1));
        copy[at] ^= 0x40;
        return ValueTask.FromResult(copy);
    }
}

/// <summary>The connection is closed by the instrument when the N-th command arrives.</summary>
internal sealed class DropConnectionFault(string instrument, FaultTrigger trigger) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override void OnCommand(FaultContext context)
    {
        if (Fire(context))
        {
            context.DropConnection = true;
        }
    }
}

/// <summary>The instrument hangs when the N-th command arrives: the socket stays open, nothing is executed or answered any more, and its output keeps its state.</summary>
internal sealed class HangFault(string instrument, FaultTrigger trigger) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override void OnCommand(FaultContext context)
    {
        if (Fire(context))
        {
            context.Hang = true;
        }
    }
}

/// <summary>The instrument leaves the network when the N-th command arrives: its connections close, new ones are refused, and its output keeps its state.</summary>
internal sealed class UnplugFault(string instrument, FaultTrigger trigger) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override void OnCommand(FaultContext context)
    {
        if (Fire(context))
        {
            context.Unplug = true;
        }
    }
}

/// <summary>An error is pushed into the instrument's queue, as a device reports an internal problem.</summary>
internal sealed class PushErrorFault(string instrument, FaultTrigger trigger, int code, string? detail) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override void OnCommand(FaultContext context)
    {
        if (Fire(context))
        {
            context.Scpi.Push(code, detail);
        }
    }
}

/// <summary>The instrument resets itself (a brown-out): every setting returns to its *RST state, outputs off.</summary>
internal sealed class ResetFault(string instrument, FaultTrigger trigger) : ConnectionFault(instrument, trigger, repeats: false)
{
    /// <inheritdoc />
    public override void OnCommand(FaultContext context)
    {
        if (Fire(context))
        {
            context.Scpi.Reset();
        }
    }
}

/// <summary>A fault on the physics (the fuse opening, the load dropping out) at a time after the start, or on an instrument's N-th command.</summary>
internal sealed class PhysicsFault(string? instrument, FaultTrigger trigger, Action<BenchCircuit> apply) : IFault
{
    private bool _fired;

    /// <inheritdoc />
    public string? Instrument { get; } = instrument;

    /// <inheritdoc />
    public void Attach(BenchCircuit circuit)
    {
        ArgumentNullException.ThrowIfNull(circuit);
        if (trigger.At is { } at)
        {
            circuit.Schedule(circuit.Start + at, c =>
            {
                _fired = true;
                apply(c);
            });
        }
    }

    /// <inheritdoc />
    public void OnCommand(FaultContext context)
    {
        ArgumentNullException.ThrowIfNull(context);
        if (!_fired && trigger.AfterCommands is { } n && context.Commands >= n)
        {
            _fired = true;
            context.Circuit.Change(apply);
        }
    }

    /// <inheritdoc />
    public ValueTask<byte[]> OnReplyAsync(FaultContext context, byte[] reply, CancellationToken cancellationToken) => ValueTask.FromResult(reply);
}
