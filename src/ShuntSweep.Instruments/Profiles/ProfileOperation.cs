using System.Globalization;

namespace ShuntSweep.Instruments.Profiles;

/// <summary>One driver operation of a profile: the command templates it sends, how a value is written into them, how long the instrument
/// needs afterwards, and how its answer is read.</summary>
/// <remarks>Placeholders: <c>{value}</c> (the number after conversion and scaling, the on/off word or the auto word), <c>{code}</c> (the code
/// the <see cref="Codes"/> table gives the range name), <c>{name}</c> (the range name).</remarks>
public sealed class ProfileOperation
{
    internal ProfileOperation(
        string key,
        IReadOnlyList<string> templates,
        NumberFormat number,
        double unitFactor,
        bool toSeconds,
        IReadOnlyDictionary<string, string> codes,
        TimeSpan processingTime,
        AnswerFormat answer,
        (string? On, string? Off, string? Auto) words,
        ProfilePosition position)
    {
        Key = key;
        Templates = templates;
        Number = number;
        UnitFactor = unitFactor;
        ToSeconds = toSeconds;
        Codes = codes;
        ProcessingTime = processingTime;
        Answer = answer;
        Words = words;
        Position = position;
    }

    /// <summary>The operation's key, for example <c>supply.setVoltage</c>.</summary>
    public string Key { get; }

    /// <summary>The command templates sent in order; empty when the instrument cannot do this.</summary>
    public IReadOnlyList<string> Templates { get; }

    /// <summary>How <c>{value}</c> is written.</summary>
    public NumberFormat Number { get; }

    /// <summary>The SI value of one of the instrument's units (1e-3 when it takes milliamperes); values are divided by it before sending.</summary>
    public double UnitFactor { get; }

    /// <summary>True when the value is an integration time in power-line cycles that the instrument takes in seconds (NPLC / line frequency).</summary>
    public bool ToSeconds { get; }

    /// <summary>Range name → the code the instrument wants for it (<c>{code}</c>).</summary>
    public IReadOnlyDictionary<string, string> Codes { get; }

    /// <summary>How long the instrument is busy after this command before it hears the next.</summary>
    public TimeSpan ProcessingTime { get; }

    /// <summary>How the answer of this query is read.</summary>
    public AnswerFormat Answer { get; }

    /// <summary>Words for true, false and auto that replace the profile's for this operation; null where the profile's apply.</summary>
    public (string? On, string? Off, string? Auto) Words { get; }

    /// <summary>Where the operation is written (the built-in profile, or a line of a profile file).</summary>
    public ProfilePosition Position { get; }

    /// <summary>True when the instrument can do this (at least one command).</summary>
    public bool IsSupported => Templates.Count > 0;

    /// <summary>True when a template has the placeholder <paramref name="name"/> (for example <c>code</c>).</summary>
    public bool Uses(string name) => Templates.Any(t => t.Contains("{" + name + "}", StringComparison.Ordinal));

    /// <summary>The number written into <c>{value}</c> for an SI value (or NPLC) after conversion and scaling.</summary>
    public string FormatValue(double si, double lineFrequency)
    {
        var value = ToSeconds ? si / lineFrequency : si;
        return Number.Format(value / UnitFactor);
    }

    /// <summary>The largest value not above <paramref name="si"/> in magnitude that the number format writes exactly: a protection limit must never
    /// be rounded up by a format with few decimals (a 52.8 mA limit sent with 3 decimals in A is 0.052, not 0.053).</summary>
    public double TowardZero(double si)
    {
        var decimals = Number.Kind switch
        {
            NumberFormat.NumberStyleKind.Fixed => Number.Digits,
            NumberFormat.NumberStyleKind.Significant when si != 0 => Number.Digits - 1 - (int)Math.Floor(Math.Log10(Math.Abs(si / UnitFactor))),
            _ => (int?)null,
        };
        if (decimals is not { } d || !double.IsFinite(si))
        {
            return si;
        }

        var step = Math.Pow(10, -d) * UnitFactor;
        return Math.Sign(si) * Math.Floor((Math.Abs(si) / step) + 1e-9) * step;
    }

    /// <summary>The SI value (or NPLC) a number written into <c>{value}</c> stands for: the inverse of <see cref="FormatValue"/> (for the simulator).</summary>
    public double ReadValue(string text, double lineFrequency)
    {
        var value = double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture) * UnitFactor;
        return ToSeconds ? value * lineFrequency : value;
    }

    /// <summary>The templates with each placeholder replaced.</summary>
    internal IReadOnlyList<string> Render(string? value, string? code, string? name)
    {
        var result = new string[Templates.Count];
        for (var i = 0; i < result.Length; i++)
        {
            var t = Templates[i];
            if (value is not null)
            {
                t = t.Replace("{value}", value, StringComparison.Ordinal);
            }

            if (code is not null)
            {
                t = t.Replace("{code}", code, StringComparison.Ordinal);
            }

            if (name is not null)
            {
                t = t.Replace("{name}", name, StringComparison.Ordinal);
            }

            result[i] = t;
        }

        return result;
    }
}

/// <summary>Where something in a profile was written: file, line and column (0, 0 for the built-in profile).</summary>
/// <param name="File">The profile file, or the built-in resource's name.</param>
/// <param name="Line">The line, from 1; 0 when not known.</param>
/// <param name="Column">The column, from 1; 0 when not known.</param>
public sealed record ProfilePosition(string File, int Line, int Column)
{
    /// <summary>An error at this position.</summary>
    public Core.Documents.DocumentException Error(string problem) => new(File, Line, Column, problem);
}
