using System.Text;

namespace ShuntSweep.Simulation.Scpi;

/// <summary>One matched program message unit as its handler sees it: typed access to the parameters and a place for the answer.</summary>
internal sealed class ScpiCall(ScpiMessageUnit unit, int[] suffixes, StringBuilder response)
{
    /// <summary>The parsed unit.</summary>
    public ScpiMessageUnit Unit { get; } = unit;

    /// <summary>The numeric suffix of each keyword of the matched pattern (1 where none was written).</summary>
    public IReadOnlyList<int> Suffixes { get; } = suffixes;

    /// <summary>The number of parameters written.</summary>
    public int Count => Unit.Parameters.Count;

    /// <summary>Checks that at most <paramref name="max"/> parameters were written (-108 otherwise) and at least <paramref name="min"/> (-109).</summary>
    public void Expect(int min, int max)
    {
        if (Count > max)
        {
            throw new ScpiException(ScpiErrors.ParameterNotAllowed, $"{Count} parameters, at most {max} expected");
        }

        if (Count < min)
        {
            throw new ScpiException(ScpiErrors.MissingParameter);
        }
    }

    /// <summary>Parameter <paramref name="index"/> as a number in SI units, checked against [<paramref name="min"/>, <paramref name="max"/>] (-222 outside).</summary>
    public double Number(int index, ScpiUnit unit, double min, double max, double @default)
    {
        var p = Parameter(index);
        if (p.IsString)
        {
            throw new ScpiException(ScpiErrors.DataTypeError, "a number was expected, not a string");
        }

        var value = ScpiNumber.Parse(p.Text, unit, min, max, @default);
        return double.IsNaN(value) || value < min || value > max
            ? throw new ScpiException(ScpiErrors.DataOutOfRange, $"{ScpiNumber.Nr3(value)} outside {ScpiNumber.Nr3(min)} to {ScpiNumber.Nr3(max)}")
            : value;
    }

    /// <summary>Parameter <paramref name="index"/> as a boolean: ON, OFF, or a number (non-zero after rounding is true, SCPI-99 §7.3).</summary>
    public bool Boolean(int index)
    {
        var p = Parameter(index);
        var text = p.Text.ToUpperInvariant();
        if (text == "ON")
        {
            return true;
        }

        if (text == "OFF")
        {
            return false;
        }

        if (p.IsString)
        {
            throw new ScpiException(ScpiErrors.DataTypeError);
        }

        var value = ScpiNumber.Parse(text, ScpiUnit.None, 0, 1, 0);
        return double.IsNaN(value) ? throw new ScpiException(ScpiErrors.IllegalParameterValue) : Math.Round(value) != 0;
    }

    /// <summary>Parameter <paramref name="index"/> as one of the character-data keywords in <paramref name="choices"/> (SCPI short/long form).</summary>
    /// <returns>The matched keyword as written in <paramref name="choices"/>.</returns>
    public string Choice(int index, params string[] choices)
    {
        var p = Parameter(index);
        if (p.IsString)
        {
            throw new ScpiException(ScpiErrors.DataTypeError);
        }

        var written = p.Text.ToUpperInvariant();
        foreach (var c in choices)
        {
            if (ScpiPattern.Parse(c).TryMatch([written], out _))
            {
                return c;
            }
        }

        throw new ScpiException(ScpiErrors.IllegalParameterValue, $"'{p.Text}' is not one of {string.Join(", ", choices)}");
    }

    /// <summary>True when parameter <paramref name="index"/> is the keyword <paramref name="keyword"/> (short or long form).</summary>
    public bool Is(int index, string keyword) =>
        index < Count && !Unit.Parameters[index].IsString && ScpiPattern.Parse(keyword).TryMatch([Unit.Parameters[index].Text.ToUpperInvariant()], out _);

    /// <summary>Parameter <paramref name="index"/> as text (a quoted string or character data).</summary>
    public string Text(int index) => Parameter(index).Text;

    /// <summary>Sets the answer of this query unit.</summary>
    public void Reply(string text)
    {
        if (response.Length > 0)
        {
            // IEEE 488.2 §8.4.1: response message units are separated by a semicolon.
            response.Append(';');
        }

        response.Append(text);
    }

    /// <summary>Answers a number as NR3.</summary>
    public void Reply(double value) => Reply(ScpiNumber.Nr3(value));

    /// <summary>Answers a boolean as 0 or 1.</summary>
    public void Reply(bool value) => Reply(value ? "1" : "0");

    private ScpiParameter Parameter(int index) =>
        index < Count ? Unit.Parameters[index] : throw new ScpiException(ScpiErrors.MissingParameter);
}
