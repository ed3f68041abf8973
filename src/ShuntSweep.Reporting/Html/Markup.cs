using System.Globalization;
using System.Net;
using System.Text;
using ShuntSweep.Analysis.Uncertainty;
using ShuntSweep.Core.Quantities;

namespace ShuntSweep.Reporting.Html;

/// <summary>Small HTML building blocks: escaped text, tables and the wording of numbers and verdicts.</summary>
internal static class Markup
{
    /// <summary>HTML-escaped text.</summary>
    public static string E(string? text) => WebUtility.HtmlEncode(text ?? string.Empty);

    /// <summary>A value with an SI prefix (at least three digits, so no exponent appears), or an em dash when it is not a finite number.</summary>
    public static string Q(double value, SiUnit unit, int significant = 4) =>
        double.IsFinite(value) ? QuantityFormatter.Format(value, unit, Math.Max(significant, 3)) : "—";

    /// <summary>An estimate as value ± U (k = …): its own expanded uncertainty, or the normal k at <paramref name="coverageProbability"/> for older results.</summary>
    public static string Expanded(ShuntSweep.Analysis.Results.Estimate estimate, SiUnit unit, double coverageProbability)
    {
        ArgumentNullException.ThrowIfNull(estimate);
        var (u, k) = estimate.Expansion(coverageProbability);
        return QuantityFormatter.FormatExpanded(estimate.Value, u, k, unit);
    }

    /// <summary>A value with its standard uncertainty (GUM 7.2.6 rounding).</summary>
    public static string Qu(double value, double uncertainty, SiUnit unit) => QuantityFormatter.Format(value, uncertainty, unit);

    /// <summary>A plain number in invariant form, or an em dash.</summary>
    public static string N(double value, int significant = 4) =>
        double.IsFinite(value) ? QuantityFormatter.Format(value, SiUnit.None, significant) : "—";

    /// <summary>A nullable plain number, an infinity sign when absent (degrees of freedom).</summary>
    public static string Dof(double? value) => value is { } v && double.IsFinite(v) ? v.ToString("0.#", CultureInfo.InvariantCulture) : "∞";

    /// <summary>Our words for a verdict.</summary>
    public static string Verdict(ConformityVerdict verdict) => verdict switch
    {
        ConformityVerdict.Pass => "within specification",
        ConformityVerdict.ConditionalPass => "within specification, inside the guard band",
        ConformityVerdict.ConditionalFail => "outside specification, inside the guard band",
        _ => "outside specification",
    };

    /// <summary>The CSS class that colours a verdict.</summary>
    public static string VerdictClass(ConformityVerdict verdict) => verdict switch
    {
        ConformityVerdict.Pass => "ok",
        ConformityVerdict.ConditionalPass => "near",
        ConformityVerdict.ConditionalFail => "near-out",
        _ => "out",
    };

    /// <summary>A verdict as a coloured tag.</summary>
    public static string VerdictTag(ConformityVerdict verdict) => $"<span class=\"tag {VerdictClass(verdict)}\">{E(Verdict(verdict))}</span>";

    /// <summary>A verdict as words led by a symbol that survives black-and-white printing: ✓ within, ◔/◕ inside the guard band, ✗ outside.</summary>
    public static string VerdictWord(ConformityVerdict verdict)
    {
        var symbol = verdict switch
        {
            ConformityVerdict.Pass => "✓",
            ConformityVerdict.ConditionalPass => "◔",
            ConformityVerdict.ConditionalFail => "◕",
            _ => "✗",
        };
        return $"<span class=\"word {VerdictClass(verdict)}\">{symbol} {E(Verdict(verdict))}</span>";
    }

    /// <summary>A current to the decimal place of the last of the two digits of <paramref name="expandedUncertainty"/> (GUM 7.2.6), so
    /// that the reference, the reading and their difference are read at one place.</summary>
    public static string AtPlaceOf(double amperes, double expandedUncertainty) =>
        double.IsFinite(expandedUncertainty) && expandedUncertainty > 0
            ? QuantityFormatter.FormatAtResolution(amperes, Math.Pow(10, Math.Floor(Math.Log10(expandedUncertainty)) - 1), SiUnit.Ampere)
            : Q(amperes, SiUnit.Ampere, 6);

    /// <summary>Appends a table: the header cells are escaped, the row cells are HTML already.</summary>
    public static void Table(StringBuilder html, string cssClass, IReadOnlyList<string> headers, IEnumerable<IReadOnlyList<string>> rows)
    {
        html.Append(CultureInfo.InvariantCulture, $"<table class=\"{cssClass}\"><thead><tr>");
        foreach (var h in headers)
        {
            html.Append("<th>").Append(E(h)).Append("</th>");
        }

        html.Append("</tr></thead><tbody>");
        foreach (var row in rows)
        {
            html.Append("<tr>");
            foreach (var cell in row)
            {
                html.Append("<td>").Append(cell).Append("</td>");
            }

            html.Append("</tr>");
        }

        html.Append("</tbody></table>\n");
    }

    /// <summary>Appends a two-column table of labels and HTML values.</summary>
    public static void Facts(StringBuilder html, IEnumerable<(string Label, string Html)> facts)
    {
        html.Append("<table class=\"facts\"><tbody>");
        foreach (var (label, value) in facts)
        {
            html.Append("<tr><th scope=\"row\">").Append(E(label)).Append("</th><td>").Append(value).Append("</td></tr>");
        }

        html.Append("</tbody></table>\n");
    }
}
