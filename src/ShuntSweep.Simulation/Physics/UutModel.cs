using ShuntSweep.Core.Uut;
using ShuntSweep.Simulation.FrontEnds;

namespace ShuntSweep.Simulation.Physics;

/// <summary>The physics of one input jack: its fuse and the contact resistance between its terminals and the range switch.</summary>
internal sealed class UutJack(JackSpec spec, Fuse fuse, double contacts)
{
    /// <summary>What the specification says about the jack.</summary>
    public JackSpec Spec { get; } = spec;

    /// <summary>The jack's fuse.</summary>
    public Fuse Fuse { get; } = fuse;

    /// <summary>The contact and internal wiring resistance in series with the jack, in ohms.</summary>
    public double Contacts { get; } = contacts;
}

/// <summary>The physics of one range: its front end, optional clamp diodes, and its fixed per-unit reading errors.</summary>
internal sealed class UutRange(RangeSpec spec, UutJack jack, IFrontEnd frontEnd, ClampDiodes? diodes, double gainError, double offset, double noiseCounts)
{
    /// <summary>What the specification says about the range.</summary>
    public RangeSpec Spec { get; } = spec;

    /// <summary>The jack the range is measured through.</summary>
    public UutJack Jack { get; } = jack;

    /// <summary>The shunt, amplified shunt or feedback ammeter of the range.</summary>
    public IFrontEnd FrontEnd { get; } = frontEnd;

    /// <summary>The clamp diodes across the range, if any.</summary>
    public ClampDiodes? Diodes { get; } = diodes;

    /// <summary>The unit's fixed gain error as a fraction (reading = sensed·(1 + gain error) + offset).</summary>
    public double GainError { get; } = gainError;

    /// <summary>The unit's fixed offset, in amperes.</summary>
    public double Offset { get; } = offset;

    /// <summary>The reading noise in counts (rms) before quantisation.</summary>
    public double NoiseCounts { get; } = noiseCounts;

    /// <summary>The current through the range (front end and diodes) with <paramref name="volts"/> across it.</summary>
    public double CurrentAt(double volts) => FrontEnd.CurrentAt(volts) + (Diodes?.CurrentAt(volts) ?? 0);

    /// <summary>The displayed value for a sensed current: errors, noise, quantisation to counts, overload beyond full scale plus over-range.</summary>
    public double Display(double sensed, SeededRandom random) =>
        double.IsFinite(sensed) ? Shown(sensed, NoiseCounts * Spec.Resolution.Amperes * random.NextGaussian()) : Shown(sensed, 0);

    /// <summary>The displayed value without reading noise (ground truth for tests).</summary>
    public double NoiselessDisplay(double sensed) => Shown(sensed, 0);

    private double Shown(double sensed, double noise)
    {
        if (!double.IsFinite(sensed))
        {
            return double.IsNaN(sensed) ? double.NaN : (sensed > 0 ? double.PositiveInfinity : double.NegativeInfinity);
        }

        var resolution = Spec.Resolution.Amperes;
        var limit = Spec.FullScale.Amperes * (1 + Spec.OverRange);
        var value = (sensed * (1 + GainError)) + Offset + noise;
        var counts = Math.Round(value / resolution, MidpointRounding.AwayFromZero);
        var shown = counts * resolution;
        return Math.Abs(shown) > limit ? (shown > 0 ? double.PositiveInfinity : double.NegativeInfinity) : shown;
    }
}

/// <summary>The UUT as the simulator builds it: jacks with fuses, ranges with front ends, and the range the operator has selected.</summary>
internal sealed class UutModel(UutDescription description, IReadOnlyList<UutJack> jacks, IReadOnlyList<UutRange> ranges, string firmware, double readingTime)
{
    /// <summary>The UUT's description from the bench file.</summary>
    public UutDescription Description { get; } = description;

    /// <summary>The jacks.</summary>
    public IReadOnlyList<UutJack> Jacks { get; } = jacks;

    /// <summary>The ranges.</summary>
    public IReadOnlyList<UutRange> Ranges { get; } = ranges;

    /// <summary>The firmware field of the UUT's <c>*IDN?</c> answer.</summary>
    public string Firmware { get; } = firmware;

    /// <summary>How long the UUT takes to produce one reading, in seconds.</summary>
    public double ReadingTime { get; } = readingTime;

    /// <summary>The selected range (the lead is in its jack).</summary>
    public UutRange Selected { get; set; } = ranges[0];

    /// <summary>The range named <paramref name="name"/>.</summary>
    public UutRange Range(string name) =>
        Ranges.FirstOrDefault(r => r.Spec.Name == name)
        ?? throw new KeyNotFoundException($"The UUT has no range '{name}'; it has {string.Join(", ", Ranges.Select(r => r.Spec.Name))}.");

    /// <summary>The jack named <paramref name="name"/>.</summary>
    public UutJack Jack(string name) =>
        Jacks.FirstOrDefault(j => j.Spec.Name == name)
        ?? throw new KeyNotFoundException($"The UUT has no jack '{name}'; it has {string.Join(", ", Jacks.Select(j => j.Spec.Name))}.");
}
