using System.Globalization;
using System.Text;
using System.Xml;
using System.Xml.Linq;

namespace ShuntSweep.Reporting.Comparison;

/// <summary>How one JUnit test case ended.</summary>
public enum JUnitOutcome
{
    /// <summary>The check held.</summary>
    Passed,

    /// <summary>The check did not hold (a <c>failure</c> element).</summary>
    Failed,

    /// <summary>The check could not be made (a <c>skipped</c> element), for example conformity without a specification.</summary>
    Skipped,
}

/// <summary>One JUnit test case: a check of a run or a comparison.</summary>
/// <param name="ClassName">The dotted group the case belongs to (dashboards nest by it).</param>
/// <param name="Name">The check's name.</param>
/// <param name="Outcome">How it ended.</param>
/// <param name="Message">What was found, in words.</param>
public sealed record JUnitCase(string ClassName, string Name, JUnitOutcome Outcome, string Message);

/// <summary>Writes checks as JUnit XML (the <c>testsuites/testsuite/testcase</c> form CI dashboards read; schema in <c>docs/schemas/junit.xsd</c>).</summary>
public static class JUnitReport
{
    /// <summary>The XML document of <paramref name="report"/>; one test case per check, classed by range.</summary>
    public static XDocument Build(ComparisonReport report, string suiteName, DateTimeOffset timestamp)
    {
        ArgumentNullException.ThrowIfNull(report);
        var cases = report.Checks.Select(c => new JUnitCase($"shuntsweep.compare.{c.Range}", c.Quantity, c.Passed ? JUnitOutcome.Passed : JUnitOutcome.Failed, c.Message));
        return Build("shuntsweep compare", suiteName, cases.ToList(), timestamp);
    }

    /// <summary>The XML document of one suite of <paramref name="cases"/> inside a <c>testsuites</c> element named <paramref name="name"/>.</summary>
    public static XDocument Build(string name, string suiteName, IReadOnlyList<JUnitCase> cases, DateTimeOffset timestamp)
    {
        ArgumentNullException.ThrowIfNull(cases);
        var tests = cases.Count.ToString(CultureInfo.InvariantCulture);
        var failures = cases.Count(c => c.Outcome == JUnitOutcome.Failed).ToString(CultureInfo.InvariantCulture);
        var suite = new XElement("testsuite",
            new XAttribute("name", suiteName),
            new XAttribute("tests", tests),
            new XAttribute("failures", failures),
            new XAttribute("errors", "0"),
            new XAttribute("skipped", cases.Count(c => c.Outcome == JUnitOutcome.Skipped).ToString(CultureInfo.InvariantCulture)),
            new XAttribute("timestamp", timestamp.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss", CultureInfo.InvariantCulture)));
        foreach (var c in cases)
        {
            var testCase = new XElement("testcase", new XAttribute("classname", c.ClassName), new XAttribute("name", c.Name), new XAttribute("time", "0"));
            testCase.Add(c.Outcome switch
            {
                JUnitOutcome.Failed => new XElement("failure", new XAttribute("message", c.Message), new XAttribute("type", "check-failed"), c.Message),
                JUnitOutcome.Skipped => new XElement("skipped", new XAttribute("message", c.Message)),
                _ => new XElement("system-out", c.Message),
            });
            suite.Add(testCase);
        }

        return new XDocument(new XDeclaration("1.0", "utf-8", null),
            new XElement("testsuites", new XAttribute("name", name), new XAttribute("tests", tests), new XAttribute("failures", failures), suite));
    }

    /// <summary>Writes the JUnit XML of <paramref name="report"/> to <paramref name="path"/> (UTF-8 without a byte-order mark), creating its folder.</summary>
    public static void Write(ComparisonReport report, string path, string suiteName, DateTimeOffset timestamp) => Write(Build(report, suiteName, timestamp), path);

    /// <summary>Writes <paramref name="document"/> to <paramref name="path"/> (UTF-8 without a byte-order mark), creating its folder.</summary>
    public static void Write(XDocument document, string path)
    {
        ArgumentNullException.ThrowIfNull(document);
        ArgumentNullException.ThrowIfNull(path);
        var full = Path.GetFullPath(path);
        if (Path.GetDirectoryName(full) is { Length: > 0 } folder)
        {
            Directory.CreateDirectory(folder);
        }

        var settings = new XmlWriterSettings { Encoding = new UTF8Encoding(false), Indent = true };
        using var writer = XmlWriter.Create(full, settings);
        document.Save(writer);
    }
}
