using YamlDotNet.RepresentationModel;

namespace ShuntSweep.Simulation.Hosting;

/// <summary>Writes the bench file a client uses to drive a bench served by <c>sim serve</c>: the simulated bench file with each <c>SIM::</c>
/// resource replaced by the TCP resource it is served on and the <c>simulation</c> section left out, so the client sees instruments, not a simulator.</summary>
public static class ServedBenchFile
{
    /// <summary>Writes to <paramref name="target"/> the bench file for <paramref name="sourceBench"/> served at <paramref name="endpoints"/>
    /// (simulated instrument name, VISA resource string).</summary>
    /// <remarks>A UUT given by path is rewritten to an absolute path, so the written file works from any folder.</remarks>
    public static void Write(string sourceBench, IEnumerable<(string Name, string Resource)> endpoints, string target)
    {
        ArgumentNullException.ThrowIfNull(sourceBench);
        ArgumentNullException.ThrowIfNull(endpoints);
        ArgumentNullException.ThrowIfNull(target);
        var served = endpoints.ToDictionary(e => e.Name, e => e.Resource, StringComparer.OrdinalIgnoreCase);
        var yaml = new YamlStream();
        using (var reader = new StreamReader(sourceBench))
        {
            yaml.Load(reader);
        }

        var root = (YamlMappingNode)yaml.Documents[0].RootNode;
        root.Children.Remove(new YamlScalarNode("simulation"));
        if (root.Children.TryGetValue(new YamlScalarNode("uut"), out var uut) && uut is YamlScalarNode { Value: { } uutPath })
        {
            root.Children[new YamlScalarNode("uut")] = new YamlScalarNode(Path.GetFullPath(Path.Combine(Path.GetDirectoryName(Path.GetFullPath(sourceBench)) ?? ".", uutPath)));
        }

        if (root.Children.TryGetValue(new YamlScalarNode("instruments"), out var instruments) && instruments is YamlMappingNode roles)
        {
            foreach (var (_, settings) in roles.Children)
            {
                if (settings is YamlMappingNode map && map.Children.TryGetValue(new YamlScalarNode("resource"), out var resource)
                    && resource is YamlScalarNode { Value: { } r } && r.StartsWith("SIM::", StringComparison.OrdinalIgnoreCase)
                    && served.TryGetValue(r["SIM::".Length..], out var tcp))
                {
                    map.Children[new YamlScalarNode("resource")] = new YamlScalarNode(tcp);
                }

                // A profile file is named relative to the bench file; the written file may live elsewhere.
                if (settings is YamlMappingNode m && m.Children.TryGetValue(new YamlScalarNode("profile"), out var profile)
                    && profile is YamlScalarNode { Value: { } p } && p.EndsWith(".yaml", StringComparison.OrdinalIgnoreCase) && !Path.IsPathRooted(p))
                {
                    m.Children[new YamlScalarNode("profile")] = new YamlScalarNode(Path.GetFullPath(Path.Combine(Path.GetDirectoryName(Path.GetFullPath(sourceBench)) ?? ".", p)));
                }
            }
        }

        var full = Path.GetFullPath(target);
        if (Path.GetDirectoryName(full) is { Length: > 0 } folder)
        {
            Directory.CreateDirectory(folder);
        }

        using var writer = new StreamWriter(full);
        writer.WriteLine($"# The bench '{Path.GetFileName(sourceBench)}' as served by 'shuntsweep sim serve': its instruments over TCP, valid while that server runs.");
        yaml.Save(writer, assignAnchors: false);
    }
}
