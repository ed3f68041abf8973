namespace ShuntSweep.Simulation.Physics;

/// <summary>A jack's fuse: a self-heating silver- or copper-like element that opens at its melting point or when the pre-arcing I²t is exceeded.</summary>
/// <remarks>The I²t integral runs while the current exceeds the rated current and restarts once it falls back; this stands for the adiabatic
/// regime of short overloads, the thermal model for the slow one. Once open the fuse stays open until <see cref="Reclose"/>.</remarks>
internal sealed class Fuse(ThermalElement element, double ratedCurrent, double ambientCelsius, double meltingCelsius, double preArcingI2t)
{
    /// <summary>The fuse element.</summary>
    public ThermalElement Element { get; } = element;

    /// <summary>The rated current, in amperes.</summary>
    public double RatedCurrent { get; } = ratedCurrent;

    /// <summary>The melting temperature of the element, in °C.</summary>
    public double MeltingCelsius { get; } = meltingCelsius;

    /// <summary>The pre-arcing I²t, in A²s.</summary>
    public double PreArcingI2t { get; } = preArcingI2t;

    /// <summary>True once the fuse has opened.</summary>
    public bool IsOpen { get; private set; }

    /// <summary>The I²t accumulated during the present overload, in A²s.</summary>
    public double OverloadI2t { get; private set; }

    /// <summary>The element's temperature, in °C.</summary>
    public double Celsius => ambientCelsius + Element.Rise;

    /// <summary>Advances the element by <paramref name="seconds"/> carrying <paramref name="amperes"/>; the fuse opens when either limit is passed.</summary>
    public void Advance(double amperes, double seconds)
    {
        if (IsOpen)
        {
            Element.Advance(0, seconds);
            return;
        }

        Element.Advance(amperes * amperes * Element.Resistance, seconds);
        OverloadI2t = Math.Abs(amperes) > RatedCurrent ? OverloadI2t + (amperes * amperes * seconds) : 0;
        if (Celsius >= MeltingCelsius || OverloadI2t >= PreArcingI2t)
        {
            Open();
        }
    }

    /// <summary>Opens the fuse (it blew, or a fault was injected).</summary>
    public void Open() => IsOpen = true;

    /// <summary>Puts a new fuse in: closed, cold, no overload history.</summary>
    public void Reclose()
    {
        IsOpen = false;
        OverloadI2t = 0;
        Element.Cool();
    }
}
