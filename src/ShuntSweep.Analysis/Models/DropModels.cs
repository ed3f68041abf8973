namespace ShuntSweep.Analysis.Models;

/// <summary>The registry of drop models: every candidate the analysis compares, and lookup by the name stored in <c>result.json</c>.</summary>
internal static class DropModels
{
    /// <summary>All candidate models, simplest first (the order breaks ties in model choice).</summary>
    public static IReadOnlyList<IDropModel> All(double diodeTemperatureKelvin) =>
    [
        new OhmicModel(),
        new AmplifiedShuntModel(),
        new SelfHeatingModel(),
        new SelfHeatingCubicModel(),
        new HeatedElementModel(),
        new FeedbackKneeModel(),
        new ClampDiodeModel(diodeTemperatureKelvin),
        new ClampDiodeOnsetModel(diodeTemperatureKelvin),
    ];

    /// <summary>The model called <paramref name="name"/>; throws with the known names otherwise.</summary>
    public static IDropModel Create(string name, double diodeTemperatureKelvin)
    {
        var all = All(diodeTemperatureKelvin);
        return all.FirstOrDefault(m => m.Name == name)
            ?? throw new InvalidDataException($"Unknown drop model '{name}'; known models: {string.Join(", ", all.Select(m => m.Name))}.");
    }
}
