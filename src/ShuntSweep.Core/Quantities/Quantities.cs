namespace ShuntSweep.Core.Quantities;

/// <summary>An electric current in amperes; the value type used for currents at every edge of the tool.</summary>
/// <remarks>NaN is rejected; infinities are allowed only where a caller checks them (overload).</remarks>
public readonly record struct Current : IComparable<Current>
{
    /// <summary>Creates a current from a value in amperes.</summary>
    public Current(double amperes) => Amperes = Guard.NotNaN(amperes, nameof(amperes));

    /// <summary>The value in amperes.</summary>
    public double Amperes { get; }

    /// <summary>Zero current.</summary>
    public static Current Zero => default;

    /// <summary>Creates a current from amperes.</summary>
    public static Current FromAmperes(double value) => new(value);

    /// <summary>Creates a current from milliamperes.</summary>
    public static Current FromMilliamperes(double value) => new(value * 1e-3);

    /// <summary>Creates a current from microamperes.</summary>
    public static Current FromMicroamperes(double value) => new(value * 1e-6);

    /// <summary>Parses a current such as <c>10 mA</c>; throws <see cref="FormatException"/> on a wrong unit.</summary>
    public static Current Parse(string text) => new(QuantityParser.Parse(text, SiUnit.Ampere));

    /// <summary>The magnitude of the current.</summary>
    public Current Abs() => new(Math.Abs(Amperes));

    public static Voltage operator *(Current i, Resistance r) => new(i.Amperes * r.Ohms);

    public static Current operator *(double k, Current i) => new(k * i.Amperes);

    public static Current operator +(Current a, Current b) => new(a.Amperes + b.Amperes);

    public static Current operator -(Current a, Current b) => new(a.Amperes - b.Amperes);

    public static Current operator -(Current a) => new(-a.Amperes);

    public static bool operator <(Current a, Current b) => a.Amperes < b.Amperes;

    public static bool operator >(Current a, Current b) => a.Amperes > b.Amperes;

    public static bool operator <=(Current a, Current b) => a.Amperes <= b.Amperes;

    public static bool operator >=(Current a, Current b) => a.Amperes >= b.Amperes;

    /// <inheritdoc />
    public int CompareTo(Current other) => Amperes.CompareTo(other.Amperes);

    /// <inheritdoc />
    public override string ToString() => QuantityFormatter.Format(Amperes, SiUnit.Ampere);
}

/// <summary>An electric potential difference in volts.</summary>
public readonly record struct Voltage : IComparable<Voltage>
{
    /// <summary>Creates a voltage from a value in volts.</summary>
    public Voltage(double volts) => Volts = Guard.NotNaN(volts, nameof(volts));

    /// <summary>The value in volts.</summary>
    public double Volts { get; }

    /// <summary>Creates a voltage from volts.</summary>
    public static Voltage FromVolts(double value) => new(value);

    /// <summary>Creates a voltage from millivolts.</summary>
    public static Voltage FromMillivolts(double value) => new(value * 1e-3);

    /// <summary>Parses a voltage such as <c>2.5 V</c>.</summary>
    public static Voltage Parse(string text) => new(QuantityParser.Parse(text, SiUnit.Volt));

    public static Resistance operator /(Voltage v, Current i) => new(v.Volts / i.Amperes);

    public static Current operator /(Voltage v, Resistance r) => new(v.Volts / r.Ohms);

    public static Voltage operator +(Voltage a, Voltage b) => new(a.Volts + b.Volts);

    public static Voltage operator -(Voltage a, Voltage b) => new(a.Volts - b.Volts);

    public static bool operator <(Voltage a, Voltage b) => a.Volts < b.Volts;

    public static bool operator >(Voltage a, Voltage b) => a.Volts > b.Volts;

    public static bool operator <=(Voltage a, Voltage b) => a.Volts <= b.Volts;

    public static bool operator >=(Voltage a, Voltage b) => a.Volts >= b.Volts;

    /// <inheritdoc />
    public int CompareTo(Voltage other) => Volts.CompareTo(other.Volts);

    /// <inheritdoc />
    public override string ToString() => QuantityFormatter.Format(Volts, SiUnit.Volt);
}

/// <summary>An electrical resistance in ohms.</summary>
public readonly record struct Resistance : IComparable<Resistance>
{
    /// <summary>Creates a resistance from a value in ohms.</summary>
    public Resistance(double ohms) => Ohms = Guard.NotNaN(ohms, nameof(ohms));

    /// <summary>The value in ohms.</summary>
    public double Ohms { get; }

    /// <summary>Creates a resistance from ohms.</summary>
    public static Resistance FromOhms(double value) => new(value);

    /// <summary>Creates a resistance from milliohms.</summary>
    public static Resistance FromMilliohms(double value) => new(value * 1e-3);

    /// <summary>Parses a resistance such as <c>10 mΩ</c> or <c>10 mohm</c>.</summary>
    public static Resistance Parse(string text) => new(QuantityParser.Parse(text, SiUnit.Ohm));

    public static Resistance operator +(Resistance a, Resistance b) => new(a.Ohms + b.Ohms);

    public static bool operator <(Resistance a, Resistance b) => a.Ohms < b.Ohms;

    public static bool operator >(Resistance a, Resistance b) => a.Ohms > b.Ohms;

    public static bool operator <=(Resistance a, Resistance b) => a.Ohms <= b.Ohms;

    public static bool operator >=(Resistance a, Resistance b) => a.Ohms >= b.Ohms;

    /// <inheritdoc />
    public int CompareTo(Resistance other) => Ohms.CompareTo(other.Ohms);

    /// <inheritdoc />
    public override string ToString() => QuantityFormatter.Format(Ohms, SiUnit.Ohm);
}

/// <summary>A power in watts.</summary>
public readonly record struct Power(double Watts)
{
    /// <summary>Parses a power such as <c>150 W</c>.</summary>
    public static Power Parse(string text) => new(QuantityParser.Parse(text, SiUnit.Watt));

    /// <inheritdoc />
    public override string ToString() => QuantityFormatter.Format(Watts, SiUnit.Watt);
}

internal static class Guard
{
    public static double NotNaN(double value, string name) =>
        double.IsNaN(value) ? throw new ArgumentOutOfRangeException(name, "A quantity cannot be NaN.") : value;
}
