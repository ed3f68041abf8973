using System.Text;
using ShuntSweep.Simulation.Faults;
using ShuntSweep.Simulation.Scpi;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>Serves one connection to one simulated instrument: reads LF-terminated program messages, executes them, writes the responses, with the declared faults in the path.</summary>
internal sealed class ScpiSession(SimulatedInstrument instrument)
{
    /// <summary>The longest program message accepted; a longer one is discarded with -363 "Input buffer overrun".</summary>
    public const int MaxLine = 65536;

    /// <summary>Runs until the peer closes the stream, a fault drops the connection, or <paramref name="cancellationToken"/> fires.</summary>
    public async Task RunAsync(Stream stream, CancellationToken cancellationToken)
    {
        var buffer = new byte[4096];
        var line = new List<byte>();
        var overrun = false;
        try
        {
            while (!cancellationToken.IsCancellationRequested)
            {
                var n = await stream.ReadAsync(buffer, cancellationToken);
                if (n == 0)
                {
                    return;
                }

                for (var i = 0; i < n; i++)
                {
                    var b = buffer[i];
                    if (b != (byte)'\n')
                    {
                        if (line.Count < MaxLine)
                        {
                            line.Add(b);
                        }
                        else
                        {
                            overrun = true;
                        }

                        continue;
                    }

                    if (overrun)
                    {
                        instrument.Scpi.Push(ScpiErrors.InputBufferOverrun);
                        overrun = false;
                        line.Clear();
                        continue;
                    }

                    var text = Encoding.Latin1.GetString(line.ToArray()).TrimEnd('\r');
                    line.Clear();
                    if (!await HandleAsync(stream, text, cancellationToken))
                    {
                        return;
                    }
                }
            }
        }
        catch (OperationCanceledException) when (cancellationToken.IsCancellationRequested)
        {
        }
        catch (IOException)
        {
            // The peer went away mid-reply; nothing to tell anyone.
        }
        finally
        {
            await stream.DisposeAsync();
        }
    }

    private async Task<bool> HandleAsync(Stream stream, string text, CancellationToken cancellationToken)
    {
        var context = instrument.NextCommand();
        foreach (var fault in instrument.Faults)
        {
            fault.OnCommand(context);
        }

        if (context.DropConnection)
        {
            return false;
        }

        var response = await instrument.Scpi.ExecuteAsync(text, cancellationToken);
        if (response is null)
        {
            return true;
        }

        var wire = Encoding.ASCII.GetBytes(response + "\n");
        foreach (var fault in instrument.Faults)
        {
            wire = await fault.OnReplyAsync(context, wire, cancellationToken);
        }

        await stream.WriteAsync(wire, cancellationToken);
        await stream.FlushAsync(cancellationToken);
        return true;
    }
}

/// <summary>A served instrument: its SCPI front, the faults that watch it, and its command counter.</summary>
internal sealed class SimulatedInstrument(string name, ScpiInstrument scpi, IReadOnlyList<IFault> faults, Func<int, FaultContext> context)
{
    private int _commands;

    /// <summary>The instrument's name (<c>supply</c>, <c>load</c>, <c>dmm</c>, <c>uut</c>, <c>ref</c>).</summary>
    public string Name { get; } = name;

    /// <summary>The SCPI front.</summary>
    public ScpiInstrument Scpi { get; } = scpi;

    /// <summary>The faults that watch this instrument.</summary>
    public IReadOnlyList<IFault> Faults { get; } = faults;

    /// <summary>Counts a command line and gives the faults their context for it.</summary>
    public FaultContext NextCommand() => context(Interlocked.Increment(ref _commands));
}
