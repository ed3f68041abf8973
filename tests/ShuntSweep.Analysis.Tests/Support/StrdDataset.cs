using System.Globalization;
using System.Text.RegularExpressions;

namespace ShuntSweep.Analysis.Tests.Support;

/// <summary>A NIST StRD dataset read from its .dat file in data/reference/nist-strd: data, certified values and start values.</summary>
internal sealed partial class StrdDataset
{
    private StrdDataset(string name, double[] x, double[] y, double[] certified, double[] certifiedSd, double residualSd, double[][] starts)
    {
        Name = name;
        X = x;
        Y = y;
        Certified = certified;
        CertifiedSd = certifiedSd;
        ResidualSd = residualSd;
        Starts = starts;
    }

    public string Name { get; }

    public double[] X { get; }

    public double[] Y { get; }

    public double[] Certified { get; }

    public double[] CertifiedSd { get; }

    public double ResidualSd { get; }

    /// <summary>Start 1 and start 2 of a nonlinear dataset (empty for linear ones).</summary>
    public double[][] Starts { get; }

    public static StrdDataset Load(string name)
    {
        var lines = File.ReadAllLines(Path.Combine(AppContext.BaseDirectory, "reference", "nist-strd", name + ".dat"));
        var certified = new List<double>();
        var sd = new List<double>();
        var start1 = new List<double>();
        var start2 = new List<double>();
        var residualSd = double.NaN;
        var dataStart = -1;
        for (var i = 0; i < lines.Length; i++)
        {
            var line = lines[i];
            var nonlinear = NonlinearParameter().Match(line);
            var linear = LinearParameter().Match(line);
            if (nonlinear.Success)
            {
                start1.Add(Num(nonlinear.Groups[1].Value));
                start2.Add(Num(nonlinear.Groups[2].Value));
                certified.Add(Num(nonlinear.Groups[3].Value));
                sd.Add(Num(nonlinear.Groups[4].Value));
            }
            else if (linear.Success)
            {
                certified.Add(Num(linear.Groups[1].Value));
                sd.Add(Num(linear.Groups[2].Value));
            }
            else if (line.Contains("Standard Deviation", StringComparison.Ordinal) && ResidualSdLine().Match(line) is { Success: true } m)
            {
                residualSd = Num(m.Groups[1].Value);
            }
            else if (DataHeader().IsMatch(line))
            {
                dataStart = i + 1;
            }
        }

        var x = new List<double>();
        var y = new List<double>();
        foreach (var line in lines.Skip(dataStart))
        {
            var parts = line.Split(' ', StringSplitOptions.RemoveEmptyEntries);
            if (parts.Length == 2)
            {
                y.Add(Num(parts[0]));
                x.Add(Num(parts[1]));
            }
        }

        var starts = start1.Count > 0 ? new[] { start1.ToArray(), start2.ToArray() } : [];
        return new StrdDataset(name, [.. x], [.. y], [.. certified], [.. sd], residualSd, starts);
    }

    /// <summary>The log relative error −log₁₀(|q − c|/|c|) (number of agreeing digits), as NIST scores StRD results; capped at 15.</summary>
    public static double Digits(double computed, double certified)
    {
        if (computed == certified)
        {
            return 15;
        }

        var lre = certified == 0 ? -Math.Log10(Math.Abs(computed)) : -Math.Log10(Math.Abs(computed - certified) / Math.Abs(certified));
        return Math.Min(lre, 15);
    }

    private static double Num(string s) => double.Parse(s, NumberStyles.Float, CultureInfo.InvariantCulture);

    [GeneratedRegex(@"^\s*b\d+\s*=\s*(\S+)\s+(\S+)\s+(\S+)\s+(\S+)\s*$")]
    private static partial Regex NonlinearParameter();

    [GeneratedRegex(@"^\s*B\d+\s+(\S+)\s+(\S+)\s*$")]
    private static partial Regex LinearParameter();

    [GeneratedRegex(@"Standard Deviation:?\s+(\S+)\s*$")]
    private static partial Regex ResidualSdLine();

    [GeneratedRegex(@"^Data:\s+y\s+x\s*$")]
    private static partial Regex DataHeader();
}
