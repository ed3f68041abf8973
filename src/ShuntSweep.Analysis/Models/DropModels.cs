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

/// <summary>Which physical hypothesis a model name in <c>result.json</c> stands for, so equivalent descriptions compare equal.</summary>
public static class ModelHypotheses
{
    /// <summary>The hypothesis of the model called <paramref name="modelName"/> (<c>self-heating-cubic</c> is <c>self-heating</c>); an unknown name is its own.</summary>
    public static string Of(string modelName) =>
        DropModels.All(296.15).FirstOrDefault(m => m.Name == modelName)?.Hypothesis ?? modelName;

    /// <summary>Whether two model names describe the same hypothesis.</summary>
    public static bool Equivalent(string a, string b) => string.Equals(Of(a), Of(b), StringComparison.Ordinal);
}
