using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>The identity an instrument gives in answer to <c>*IDN?</c> (IEEE 488.2 §10.14: maker, model, serial, firmware).</summary>
public sealed record InstrumentIdentity(string Manufacturer, string Model, string Serial, string Firmware)
{
    /// <inheritdoc />
    public override string ToString() => $"{Manufacturer} {Model} s/n {Serial} fw {Firmware}";
}

/// <summary>What every role driver can do: say who it is and report queued instrument errors.</summary>
public interface IInstrument
{
    /// <summary>The resource string the driver is connected to.</summary>
    string Resource { get; }

    /// <summary>Asks the instrument for its identity.</summary>
    Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default);

    /// <summary>Reads and empties the instrument's error queue (SCPI <c>SYSTem:ERRor?</c> until code 0), oldest first.</summary>
    /// <remarks>An instrument without an error queue (an operator typing readings, a serial display stream) has nothing to report.</remarks>
    Task<IReadOnlyList<InstrumentError>> ReadErrorsAsync(CancellationToken cancellationToken = default) =>
        Task.FromResult<IReadOnlyList<InstrumentError>>([]);
}

/// <summary>A meter that is armed, measures, then is fetched, so that several meters can measure the same moment (SCPI INITiate/FETCh).</summary>
public interface ITriggeredMeter : IInstrument
{
    /// <summary>How long one armed measurement takes (integration of all its samples plus overhead).</summary>
    TimeSpan MeasurementTime { get; }

    /// <summary>Starts a measurement (SCPI <c>INITiate</c>).</summary>
    Task ArmAsync(CancellationToken cancellationToken = default);

    /// <summary>Waits for the armed measurement and returns its readings in SI units (SCPI <c>FETCh?</c>).</summary>
    /// <remarks>Overload (SCPI 9.9E37) comes back as positive or negative infinity; "not a number" (9.91E37) as NaN.</remarks>
    Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default);
}
