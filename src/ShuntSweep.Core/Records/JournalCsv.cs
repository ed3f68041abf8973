using System.Globalization;
using System.Text;
using CsvHelper;
using CsvHelper.Configuration;
using ShuntSweep.Core.Documents;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Core.Records;

/// <summary>The journal's CSV form: one row per sample, each column named with its unit, numbers in invariant round-trip form.</summary>
/// <remarks>An empty <c>uut_reading_A</c> means no reading; <c>+OL</c>/<c>-OL</c> mean the UUT showed overload. An empty
/// <c>shunt_tap_V</c> means the bench has no tap voltmeter across the shunt.</remarks>
public static class JournalCsv
{
    /// <summary>The columns in the order they are written.</summary>
    public static readonly IReadOnlyList<string> Columns =
    [
        "range", "jack", "step", "sample", "setpoint_A", "reference_A", "uut_reading_A", "burden_V", "supply_V", "load_V", "elapsed_s", "shunt_tap_V",
    ];

    /// <summary>The columns a journal must have to be fitted; the rest are optional and unknown ones are ignored.</summary>
    public static readonly IReadOnlyList<string> RequiredColumns = ["range", "setpoint_A", "reference_A", "burden_V"];

    /// <summary>The header line, with its line ending.</summary>
    public static string Header => string.Join(',', Columns) + "\n";

    /// <summary>Formats samples as CSV rows (no header), ready to be appended in one write.</summary>
    public static string FormatRows(IEnumerable<Sample> samples)
    {
        ArgumentNullException.ThrowIfNull(samples);
        var sb = new StringBuilder();
        using var writer = new StringWriter(sb, CultureInfo.InvariantCulture);
        using var csv = new CsvWriter(writer, new CsvConfiguration(CultureInfo.InvariantCulture) { NewLine = "\n" });
        foreach (var s in samples)
        {
            csv.WriteField(s.Range);
            csv.WriteField(s.Jack);
            csv.WriteField(s.Step.ToString(CultureInfo.InvariantCulture));
            csv.WriteField(s.SampleIndex.ToString(CultureInfo.InvariantCulture));
            csv.WriteField(Number(s.Setpoint.Amperes));
            csv.WriteField(Number(s.Reference.Amperes));
            csv.WriteField(Reading(s.UutReading));
            csv.WriteField(Number(s.Burden.Volts));
            csv.WriteField(Number(s.SupplyVoltage.Volts));
            csv.WriteField(Number(s.LoadVoltage.Volts));
            csv.WriteField(Number(s.Elapsed.TotalSeconds));
            csv.WriteField(s.ShuntTap is { } tap ? Number(tap.Volts) : string.Empty);
            csv.NextRecord();
        }

        csv.Flush();
        return sb.ToString();
    }

    /// <summary>Reads a journal file; a malformed row is an error naming its line and column.</summary>
    /// <remarks>A last line without its line ending is a write torn by a crash: it is left out and reported in <see cref="JournalContents.TornTail"/>.</remarks>
    public static JournalContents Read(string path)
    {
        var text = File.ReadAllText(path);
        return Parse(text, path);
    }

    /// <summary>Parses journal text; <paramref name="fileName"/> is used in messages.</summary>
    public static JournalContents Parse(string text, string fileName)
    {
        ArgumentNullException.ThrowIfNull(text);
        var torn = text.Length > 0 && !text.EndsWith('\n');
        var complete = torn ? text[..(text.LastIndexOf('\n') + 1)] : text;
        var samples = new List<Sample>();
        using var reader = new StringReader(complete);
        using var parser = new CsvParser(reader, new CsvConfiguration(CultureInfo.InvariantCulture) { BadDataFound = null });
        if (!parser.Read())
        {
            throw new DocumentException(fileName, 0, 0, "the journal is empty; expected a header line starting with 'range'.");
        }

        var header = parser.Record ?? [];
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var i = 0; i < header.Length; i++)
        {
            index.TryAdd(header[i].Trim(), i);
        }

        foreach (var required in RequiredColumns)
        {
            if (!index.ContainsKey(required))
            {
                throw new DocumentException(fileName, 1, 1, $"the header has no '{required}' column; a journal needs {string.Join(", ", RequiredColumns)}.");
            }
        }

        while (parser.Read())
        {
            var record = parser.Record ?? [];
            var line = parser.RawRow;
            if (record.Length == 1 && string.IsNullOrWhiteSpace(record[0]))
            {
                continue;
            }

            if (record.Length < header.Length)
            {
                throw new DocumentException(fileName, line, 1, $"the row has {record.Length} fields; the header has {header.Length}.");
            }

            string Field(string name) => index.TryGetValue(name, out var i) ? record[i] : string.Empty;
            double Num(string name, bool required)
            {
                var raw = Field(name);
                if (raw.Length == 0 && !required)
                {
                    return double.NaN;
                }

                return double.TryParse(raw, NumberStyles.Float, CultureInfo.InvariantCulture, out var v) && double.IsFinite(v)
                    ? v
                    : throw new DocumentException(fileName, line, Column(record, index[name]), $"column '{name}': expected a number, found '{raw}'.");
            }

            int Int(string name, int fallback)
            {
                var raw = Field(name);
                if (raw.Length == 0)
                {
                    return fallback;
                }

                return int.TryParse(raw, NumberStyles.Integer, CultureInfo.InvariantCulture, out var v) && v >= 0
                    ? v
                    : throw new DocumentException(fileName, line, Column(record, index[name]), $"column '{name}': expected a whole number, found '{raw}'.");
            }

            var range = Field("range");
            if (range.Length == 0)
            {
                throw new DocumentException(fileName, line, 1, "column 'range': a range name is required.");
            }

            double uut;
            var uutRaw = Field("uut_reading_A");
            if (uutRaw is "+OL" or "OL")
            {
                uut = double.PositiveInfinity;
            }
            else if (uutRaw == "-OL")
            {
                uut = double.NegativeInfinity;
            }
            else
            {
                uut = Num("uut_reading_A", false);
            }

            var setpoint = Num("setpoint_A", true);
            samples.Add(new Sample(
                range,
                Field("jack") is { Length: > 0 } jack ? jack : "?",
                Int("step", -1),
                Int("sample", 0),
                new Current(setpoint),
                new Current(Num("reference_A", true)),
                uut,
                new Voltage(Num("burden_V", true)),
                new Voltage(Num("supply_V", false) is var sv && double.IsNaN(sv) ? 0 : sv),
                new Voltage(Num("load_V", false) is var lv && double.IsNaN(lv) ? 0 : lv),
                TimeSpan.FromSeconds(Num("elapsed_s", false) is var e && double.IsNaN(e) ? 0 : e),
                Num("shunt_tap_V", false) is var tap && double.IsNaN(tap) ? null : new Voltage(tap)));
        }

        return new JournalContents(NumberSteps(samples), torn);
    }

    /// <summary>A journal without a <c>step</c> column gets one step per run of equal range and setpoint.</summary>
    private static List<Sample> NumberSteps(List<Sample> samples)
    {
        if (samples.All(s => s.Step >= 0))
        {
            return samples;
        }

        var step = -1;
        Sample? previous = null;
        var numbered = new List<Sample>(samples.Count);
        foreach (var s in samples)
        {
            if (previous is null || previous.Range != s.Range || previous.Setpoint != s.Setpoint)
            {
                step++;
            }

            numbered.Add(s with { Step = step });
            previous = s;
        }

        return numbered;
    }

    private static int Column(string[] record, int field)
    {
        var column = 1;
        for (var i = 0; i < field && i < record.Length; i++)
        {
            column += record[i].Length + 1;
        }

        return column;
    }

    private static string Number(double v) => v.ToString("R", CultureInfo.InvariantCulture);

    private static string Reading(double v) => v switch
    {
        double.PositiveInfinity => "+OL",
        double.NegativeInfinity => "-OL",
        _ when double.IsNaN(v) => string.Empty,
        _ => Number(v),
    };
}

/// <summary>The samples read from a journal, and whether its last line was torn by an interrupted write.</summary>
public sealed record JournalContents(IReadOnlyList<Sample> Samples, bool TornTail);
