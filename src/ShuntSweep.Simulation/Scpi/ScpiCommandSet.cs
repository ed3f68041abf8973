namespace ShuntSweep.Simulation.Scpi;

/// <summary>The command set of one simulated instrument: patterns and their handlers, matched per SCPI-99 header rules.</summary>
internal sealed class ScpiCommandSet
{
    private readonly List<(ScpiPattern Pattern, Func<ScpiCall, ValueTask> Handler)> _commands = [];

    /// <summary>The patterns in the order they were added, for documentation and tests.</summary>
    public IEnumerable<string> Patterns => _commands.Select(c => c.Pattern.Text);

    /// <summary>Adds a command whose handler runs at once.</summary>
    public ScpiCommandSet Add(string pattern, Action<ScpiCall> handler)
    {
        ArgumentNullException.ThrowIfNull(handler);
        return Add(pattern, call =>
        {
            handler(call);
            return ValueTask.CompletedTask;
        });
    }

    /// <summary>Adds a command whose handler may wait (a fetch waits for its measurement).</summary>
    public ScpiCommandSet Add(string pattern, Func<ScpiCall, ValueTask> handler)
    {
        _commands.Add((ScpiPattern.Parse(pattern), handler));
        return this;
    }

    /// <summary>Finds the handler for a header; null when the header is undefined.</summary>
    public (Func<ScpiCall, ValueTask> Handler, int[] Suffixes, ScpiPattern Pattern)? Find(IReadOnlyList<string> mnemonics, bool isQuery)
    {
        foreach (var (pattern, handler) in _commands)
        {
            if (pattern.IsQuery == isQuery && pattern.TryMatch(mnemonics, out var suffixes))
            {
                return (handler, suffixes, pattern);
            }
        }

        return null;
    }
}
