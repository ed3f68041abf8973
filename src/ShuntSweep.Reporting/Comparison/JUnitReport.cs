using System.Globalization;
using System.Text;
using System.Xml;
using System.Xml.Linq;

namespace ShuntSweep.Reporting.Comparison;

/// <summary>Writes a comparison as JUnit XML (the <c>testsuites/testsuite/testcase/failure</c> form CI dashboards read).</summary>
public static class JUnitReport
{
    /// <summary>The XML document of <paramref name="report"/>; one test case per check, classed by range.</summary>
    public static XDocument Build(ComparisonReport report, string suiteName, DateTimeOffset timestamp)
    {
        ArgumentNullException.ThrowIfNull(report);
        var tests = report.Checks.Count.ToString(CultureInfo.InvariantCulture);
        var failures = report.Failures.ToString(CultureInfo.InvariantCulture);
        var suite = new XElement("testsuite",
            new XAttribute("name", suiteName),
            new XAttribute("tests", tests),
            new XAttribute("failures", failures),
            new XAttribute("errors", "0"),
            new XAttribute("skipped", "0"),
            new XAttribute("timestamp", timestamp.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss", CultureInfo.InvariantCulture)));
        foreach (var c in report.Checks)
        {
            var testCase = new XElement("testcase",
                new XAttribute("classname", $"shuntsweep.compare.{c.Range}"),
                new XAttribute("name", c.Quantity),
                new XAttribute("time", "0"));
            if (!c.Passed)
            {
                testCase.Add(new XElement("failure", new XAttribute("message", c.Message), new XAttribute("type", "beyond-tolerance"), c.Message));
            }
            else
            {
                testCase.Add(new XElement("system-out", c.Message));
            }

            suite.Add(testCase);
        }

        return new XDocument(new XDeclaration("1.0", "utf-8", null),
            new XElement("testsuites", new XAttribute("name", "shuntsweep compare"), new XAttribute("tests", tests), new XAttribute("failures", failures), suite));
    }

    /// <summary>Writes the JUnit XML of <paramref name="report"/> to <paramref name="path"/> (UTF-8 without a byte-order mark), creating its folder.</summary>
    public static void Write(ComparisonReport report, string path, string suiteName, DateTimeOffset timestamp)
    {
        ArgumentNullException.ThrowIfNull(path);
        var full = Path.GetFullPath(path);
        if (Path.GetDirectoryName(full) is { Length: > 0 } folder)
        {
            Directory.CreateDirectory(folder);
        }

        var settings = new XmlWriterSettings { Encoding = new UTF8Encoding(false), Indent = true };
        using var writer = XmlWriter.Create(full, settings);
        Build(report, suiteName, timestamp).Save(writer);
    }
}
