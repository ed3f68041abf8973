using System.CommandLine;
using System.Globalization;
using ShuntSweep.Cli.Composition;
using ShuntSweep.Core.Bench;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Core.Records;

namespace ShuntSweep.Cli.Commands;

/// <summary>The options of <c>run</c> that the calibration record states: operator, customer, laboratory profile, conditions, as-found or
/// as-left, and the reason for running with an instrument past its calibration due date.</summary>
internal sealed class RecordOptions
{
    private readonly Option<string?> _operator = new("--operator") { Description = "Who runs the calibration (printed in the record; default: the lab profile's operator)." };
    private readonly Option<string?> _customer = new("--customer") { Description = "Whose UUT it is (printed in the record; default: the lab profile's customer)." };
    private readonly Option<string?> _lab = new("--lab") { Description = "A lab profile (YAML: laboratory, operator, customer) that heads the certificate." };
    private readonly Option<string?> _ambient = new("--ambient") { Description = "The ambient temperature during the run, with its unit ('23.1 °C'); a simulated bench states its own." };
    private readonly Option<string?> _humidity = new("--humidity") { Description = "The relative humidity during the run, with its unit ('45 %')." };
    private readonly Option<string?> _condition = new("--condition") { Description = "Whether the run records the UUT as it arrived or as it leaves: as-found or as-left." };
    private readonly Option<string?> _overdue = new("--overdue-reason")
    {
        Description = "Run although a bench instrument is past its calibration due date, for this reason (recorded in the journal and printed in the report).",
    };

    /// <summary>Adds the options to <paramref name="command"/>.</summary>
    public void AddTo(Command command)
    {
        foreach (var o in new[] { _operator, _customer, _lab, _ambient, _humidity, _condition, _overdue })
        {
            command.Options.Add(o);
        }
    }

    /// <summary>Reads the options (and the lab profile they name); a bad value is invalid input naming what was expected.</summary>
    /// <exception cref="DocumentException">When the lab profile is malformed.</exception>
    /// <exception cref="FormatException">When a temperature, humidity or condition is malformed.</exception>
    public RecordInput Read(ParseResult parse)
    {
        ArgumentNullException.ThrowIfNull(parse);
        string? labName = null, labOperator = null, labCustomer = null;
        if (parse.GetValue(_lab) is { } labFile)
        {
            var doc = YamlDocument.Load(labFile);
            labName = doc.Text("laboratory");
            labOperator = doc.StringOr("operator", null);
            labCustomer = doc.StringOr("customer", null);
            doc.Finish();
        }

        double? ambient = parse.GetValue(_ambient) is { } a ? QuantityParser.Parse(a, SiUnit.Celsius) : null;
        if (ambient is < -273.15 or > 100)
        {
            throw new FormatException($"--ambient {parse.GetValue(_ambient)}: expected a room temperature in °C, from -273.15 °C to 100 °C.");
        }

        double? humidity = parse.GetValue(_humidity) is { } h ? QuantityParser.Parse(h, SiUnit.None) * 100 : null;
        if (humidity is < 0 or > 100)
        {
            throw new FormatException($"--humidity {parse.GetValue(_humidity)}: expected a relative humidity from 0 % to 100 %.");
        }

        var condition = parse.GetValue(_condition);
        if (condition is not (null or "as-found" or "as-left"))
        {
            throw new FormatException($"--condition {condition}: expected as-found or as-left.");
        }

        return new RecordInput(parse.GetValue(_operator) ?? labOperator, parse.GetValue(_customer) ?? labCustomer, labName, ambient, humidity, condition, parse.GetValue(_overdue));
    }

    /// <summary>Warns of every instrument due for calibration soon or not recorded, and refuses (false) an overdue one unless a reason is given.</summary>
    public static bool CheckCalibration(IReadOnlyList<CalibrationStatus> calibrations, int warningDays, string? overdueReason)
    {
        ArgumentNullException.ThrowIfNull(calibrations);
        var unrecorded = calibrations.Where(c => c.State == CalibrationState.NotRecorded).Select(c => c.Role).ToList();
        if (unrecorded.Count > 0)
        {
            Terminal.Note("note", $"the bench file records no calibration for: {string.Join(", ", unrecorded)}; give each calibration: {{ certificate: ID, due: YYYY-MM-DD }} so that the record can state it.");
        }

        foreach (var c in calibrations)
        {
            switch (c.State)
            {
                case CalibrationState.DueSoon:
                    Terminal.Warn($"the {c.Role} ({c.Resource}) is due for calibration on {c.Calibration!.Due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)}, in {c.DaysLeft} day(s) (certificate {c.Calibration.Certificate}; the bench warns {warningDays} days ahead).");
                    break;
                case CalibrationState.Overdue when overdueReason is null:
                    Terminal.Fail(
                        $"the {c.Role} ({c.Resource}) was due for calibration on {c.Calibration!.Due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)} ({-c.DaysLeft} day(s) ago, certificate {c.Calibration.Certificate}). Calibrate it, or run anyway with --overdue-reason \"why\" (the reason is recorded in the journal and printed in the report). Nothing was touched.",
                        ExitCodes.InvalidInput);
                    return false;
                case CalibrationState.Overdue:
                    Terminal.Warn($"the {c.Role} ({c.Resource}) is past its calibration due date {c.Calibration!.Due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)}; running anyway: {overdueReason}");
                    break;
            }
        }

        return true;
    }
}

/// <summary>The record's context as given for one run.</summary>
internal sealed record RecordInput(string? Operator, string? Customer, string? Laboratory, double? AmbientCelsius, double? HumidityPercent, string? Condition, string? OverdueReason)
{
    /// <summary>The context the manifest records; a simulated bench states the ambient it simulates when none was given.</summary>
    public RunContext Context(BenchDescription bench)
    {
        ArgumentNullException.ThrowIfNull(bench);
        var ambient = AmbientCelsius ?? (bench.IsSimulated ? bench.Simulation?.QuantityOr("ambient", SiUnit.Celsius, 23) ?? 23 : null);
        return new RunContext(Operator, Customer, Laboratory, ambient, HumidityPercent, Condition);
    }
}

/// <summary>What the run records besides its measurements: the context and each instrument's calibration, with the override reason.</summary>
internal sealed record RecordContext(RunContext Context, IReadOnlyList<CalibrationStatus> Calibrations, string? Override);
