using ShuntSweep.Core.Quantities;
using ShuntSweep.Instruments.Messaging;

namespace ShuntSweep.Instruments.Drivers;

/// <summary>A reference ammeter made of a voltmeter across a calibrated shunt: the current is the voltage divided by the shunt's value.</summary>
internal sealed class ShuntReferenceAmmeter(ScpiVoltmeter voltmeter, ReferenceShunt shunt) : IReferenceAmmeter
{
    public string Resource => voltmeter.Resource;

    public ReferenceShunt? Shunt { get; } = shunt;

    public TimeSpan MeasurementTime => voltmeter.MeasurementTime;

    public Task<InstrumentIdentity> IdentifyAsync(CancellationToken cancellationToken = default) => voltmeter.IdentifyAsync(cancellationToken);

    public Task<IReadOnlyList<InstrumentError>> ReadErrorsAsync(CancellationToken cancellationToken = default) => voltmeter.ReadErrorsAsync(cancellationToken);

    /// <summary>Sets the voltmeter to the range that holds <paramref name="maximum"/> × R.</summary>
    public Task ConfigureAsync(Current maximum, double nplc, CancellationToken cancellationToken = default) =>
        voltmeter.ConfigureAsync(new VoltmeterSettings(maximum.Abs() * Shunt!.Resistance, nplc, AutoZero: true, SamplesPerTrigger: 1), cancellationToken);

    public Task ArmAsync(CancellationToken cancellationToken = default) => voltmeter.ArmAsync(cancellationToken);

    public async Task<IReadOnlyList<double>> FetchAsync(CancellationToken cancellationToken = default)
    {
        var volts = await voltmeter.FetchAsync(cancellationToken);
        return volts.Select(v => v / Shunt!.Resistance.Ohms).ToArray();
    }
}
