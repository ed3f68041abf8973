namespace ShuntSweep.Simulation;

/// <summary>A small seeded generator (SplitMix64) whose sequence is fixed by its seed on every platform and runtime, so runs replay exactly.</summary>
internal sealed class SeededRandom(ulong seed)
{
    private ulong _state = seed;

    /// <summary>A generator for one named stream of a run: the same run seed and name always give the same sequence.</summary>
    public static SeededRandom For(int seed, string stream)
    {
        unchecked
        {
            // FNV-1a of the stream name, so that streams of one run are independent of each other and of creation order.
            var hash = 14695981039346656037UL;
            foreach (var c in stream)
            {
                hash = (hash ^ c) * 1099511628211UL;
            }

            return new SeededRandom(((ulong)(uint)seed * 0x9E3779B97F4A7C15UL) ^ hash);
        }
    }

    /// <summary>A generator for one named stream of a simulated unit's parts, fixed by its serial number: one serial is one physical
    /// unit whatever the run's seed, which draws only its noise and faults.</summary>
    public static SeededRandom ForUnit(string serial, string stream)
    {
        ArgumentNullException.ThrowIfNull(serial);
        return For(0, "unit:" + serial + "/" + stream);
    }

    /// <summary>The next 64 random bits.</summary>
    public ulong NextUInt64()
    {
        unchecked
        {
            var z = _state += 0x9E3779B97F4A7C15UL;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return z ^ (z >> 31);
        }
    }

    /// <summary>A uniform number in [0, 1).</summary>
    public double NextDouble() => (NextUInt64() >> 11) * (1.0 / 9007199254740992.0);

    /// <summary>A uniform number in [-1, 1).</summary>
    public double NextSigned() => (2 * NextDouble()) - 1;

    /// <summary>A standard normal number (Box–Muller).</summary>
    public double NextGaussian()
    {
        var u1 = 1.0 - NextDouble();
        var u2 = NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2.0 * Math.PI * u2);
    }
}
