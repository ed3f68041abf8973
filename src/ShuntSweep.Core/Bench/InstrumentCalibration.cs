using System.Globalization;
using ShuntSweep.Core.Documents;

namespace ShuntSweep.Core.Bench;

/// <summary>A bench instrument's calibration as its certificate states it: the certificate's id and the date the next calibration is due.</summary>
/// <param name="Certificate">The certificate number or id.</param>
/// <param name="Due">The date by which the instrument must be calibrated again (ISO 8601, <c>2027-03-01</c>).</param>
public sealed record InstrumentCalibration(string Certificate, DateOnly Due)
{
    /// <summary>Reads an instrument's <c>calibration: { certificate, due }</c> mapping; null when the instrument has none.</summary>
    public static InstrumentCalibration? Read(MappingReader instrument)
    {
        ArgumentNullException.ThrowIfNull(instrument);
        if (instrument.Mapping("calibration") is not { } map)
        {
            return null;
        }

        var certificate = map.Text("certificate");
        var dueNode = map.Required("due");
        if (!DateOnly.TryParseExact(dueNode.AsString(), "yyyy-MM-dd", CultureInfo.InvariantCulture, DateTimeStyles.None, out var due))
        {
            throw dueNode.Error($"{dueNode.What}: '{dueNode.AsString()}' is not a date; write it as ISO 8601, year-month-day (2027-03-01).");
        }

        map.Finish();
        return new InstrumentCalibration(certificate, due);
    }
}

/// <summary>Where an instrument's calibration stands on the day of a run.</summary>
public enum CalibrationState
{
    /// <summary>Calibrated, and not due within the bench's warning period.</summary>
    Current,

    /// <summary>Due within the bench's warning period.</summary>
    DueSoon,

    /// <summary>Past its due date: a run needs an override with a reason.</summary>
    Overdue,

    /// <summary>The bench file records no calibration for the instrument.</summary>
    NotRecorded,
}

/// <summary>One instrument's calibration on the day of a run.</summary>
/// <param name="Role">The instrument's role key (<c>dropMeter</c>, ...).</param>
/// <param name="Resource">Its resource string.</param>
/// <param name="Calibration">Its certificate and due date, when recorded.</param>
/// <param name="State">Where it stands.</param>
/// <param name="DaysLeft">Days from the run's date to the due date (negative when overdue; 0 when not recorded).</param>
public sealed record CalibrationStatus(string Role, string Resource, InstrumentCalibration? Calibration, CalibrationState State, int DaysLeft);

/// <summary>Checks every bench instrument's calibration due date on the day of a run.</summary>
public static class CalibrationCheck
{
    /// <summary>The status of each instrument of <paramref name="bench"/> on <paramref name="today"/>; simulated instruments are left out.</summary>
    public static IReadOnlyList<CalibrationStatus> Assess(BenchDescription bench, DateOnly today)
    {
        ArgumentNullException.ThrowIfNull(bench);
        return bench.Instruments.Values
            .Where(i => !i.Resource.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase) || i.Calibration is not null)
            .OrderBy(i => i.Role)
            .Select(i =>
            {
                if (i.Calibration is not { } c)
                {
                    return new CalibrationStatus(BenchReader.KeyOf(i.Role), i.Resource, null, CalibrationState.NotRecorded, 0);
                }

                var left = c.Due.DayNumber - today.DayNumber;
                var state = left < 0 ? CalibrationState.Overdue : left <= bench.CalibrationWarningDays ? CalibrationState.DueSoon : CalibrationState.Current;
                return new CalibrationStatus(BenchReader.KeyOf(i.Role), i.Resource, c, state, left);
            })
            .ToList();
    }
}
