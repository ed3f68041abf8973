using System.Globalization;
using System.Text;
using ShuntSweep.Analysis.Results;
using ShuntSweep.Core.Quantities;
using ShuntSweep.Reporting.Plots;
using static ShuntSweep.Reporting.Html.Markup;

namespace ShuntSweep.Reporting.Html;

/// <summary>Writes the one-file HTML report of a run: every number comes from the result or the manifest, formatted, never recomputed.</summary>
internal static class ReportHtml
{
    /// <summary>The report's HTML text; without <paramref name="showPaths"/> files are named without their folders and the run directory is
    /// left out, so that the same run gives the same report wherever it was written.</summary>
    public static string Build(RunRecords run, IReadOnlyList<RenderedPlot> plots, DateTimeOffset generatedAt, string software, bool showPaths = true)
    {
        ArgumentNullException.ThrowIfNull(run);
        ArgumentNullException.ThrowIfNull(plots);
        var html = new StringBuilder(256 * 1024);
        var m = run.Manifest;
        var title = m is null ? "Burden-voltage characterisation" : $"Burden-voltage characterisation — {m.UutManufacturer} {m.UutModel} s/n {m.UutSerial}";
        html.Append("<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">")
            .Append("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">")
            .Append("<title>").Append(E(title)).Append("</title><style>").Append(ReportStyle.Css).Append(ReportStyle.PageFooter(run.ReportId)).Append("</style></head><body>\n");
        Header(html, run);
        html.Append("<main>\n<div class=\"certificate\" id=\"certificate\">\n");
        Outcome(html, run);
        VerdictBanner(html, run.Result);
        Record(html, run);
        Uut(html, run);
        Bench(html, run, showPaths);
        Ranges(html, run.Result);
        Conformity(html, run.Result);
        Safety(html, run);
        html.Append("</div>\n<div class=\"appendix\" id=\"appendix\"><h2 class=\"part\">Engineering appendix</h2>")
            .Append("<p class=\"note\">What the certificate above rests on: each range's points and fitted parameters, the model choice, the separation of fuse and shunt, the thermal holds, the plots, the uncertainty budgets point by point, the raw files and the run log.</p>\n");
        RangeDetails(html, run.Result);
        Models(html, run.Result);
        Decomposition(html, run.Result);
        Thermal(html, run.Result);
        PlotSection(html, plots);
        Budget(html, run.Result);
        Files(html, run, plots);
        RunLog(html, run);
        html.Append("</div>\n</main>\n<footer>Generated ")
            .Append(E(generatedAt.ToUniversalTime().ToString("yyyy-MM-dd HH:mm:ss 'UTC'", CultureInfo.InvariantCulture)))
            .Append(" by ").Append(E(software)).Append(showPaths ? $" from the records in {E(run.Directory)}" : " from the run's records")
            .Append(". Resistances are small-signal values (slope of drop against current at zero current).</footer>\n</body></html>\n");
        return html.ToString();
    }

    private static void Header(StringBuilder html, RunRecords run)
    {
        var m = run.Manifest;
        html.Append("<header class=\"band\" id=\"top\"><h1>Burden-voltage characterisation report");
        if (m?.Simulated == true)
        {
            html.Append("<span class=\"badge\" id=\"simulated\">simulated bench</span>");
        }

        html.Append("</h1><div class=\"sub\">");
        html.Append(m is null
            ? "UUT identity not recorded (result fitted from a journal alone)"
            : E($"{m.UutManufacturer} {m.UutModel} · serial {m.UutSerial}{(m.UutAssetId is { Length: > 0 } a ? $" · asset {a}" : string.Empty)} · started {m.Start.ToUniversalTime():yyyy-MM-dd HH:mm} UTC"));
        html.Append("</div></header>\n");
    }

    private static void Outcome(StringBuilder html, RunRecords run)
    {
        foreach (var note in run.Notes)
        {
            html.Append("<div class=\"banner\">").Append(E(note)).Append("</div>\n");
        }

        if (run.RunEnd is not { } end)
        {
            if (run.Events.Count > 0)
            {
                html.Append("<div class=\"banner stop\" id=\"outcome\">The event log has no end-of-run record: the run was cut off (a crash or power loss). The results cover the steps recorded before that.</div>\n");
            }

            return;
        }

        var how = RunEndWords.Describe(end.Field("end"));
        var off = end.Field("outputsConfirmedOff") == "true" ? "Outputs were confirmed off at the end." : "The outputs were NOT confirmed off at the end: check the bench before touching it.";
        var complete = end.Field("end") == "Completed";
        var css = complete ? "banner" : "banner stop";
        var headline = complete ? "Run completed" : $"Incomplete run ({how})";
        html.Append(CultureInfo.InvariantCulture, $"<div class=\"{css}\" id=\"outcome\"><strong>{E(headline)}</strong> — {E(end.Field("message"))} ({E(end.Field("stepsDone"))} of {E(run.Events.FirstOrDefault(e => e.Name is "run-start" or "run-resume")?.Field("steps") ?? "?")} plan steps done). {E(off)}</div>\n");
        if (run.Events.LastOrDefault(e => e.Name == "analysis-incomplete") is { } analysis)
        {
            html.Append("<div class=\"banner stop\" id=\"analysis-incomplete\"><strong>Analysis incomplete</strong> — ").Append(E(analysis.Field("notes"))).Append("</div>\n");
        }
    }

    private static void VerdictBanner(StringBuilder html, CharacterisationResult result)
    {
        var v = result.Verdict;
        var failing = result.Ranges.Where(r => Verdicts.Of(r) == RecordVerdict.Fail).Select(r => r.Name).ToList();
        var detail = v switch
        {
            RecordVerdict.Pass => "every judged range meets its accuracy and burden specification.",
            RecordVerdict.Fail => $"outside specification on {string.Join(", ", failing)}.",
            RecordVerdict.Incomplete => "the run did not measure everything it planned, so no statement of conformity is made for the UUT"
                + (failing.Count > 0 ? $"; measured outside specification on {string.Join(", ", failing)}." : "."),
            _ => "nothing in this run was judged against a specification.",
        };
        html.Append(CultureInfo.InvariantCulture, $"<div class=\"verdict {Verdicts.Token(v)}\" id=\"record-verdict\"><strong>Verdict: {E(Verdicts.Words(v))}</strong> — {E(detail)}</div>\n");
    }

    /// <summary>The range's verdict in words with what it rests on: the accuracy, the burden at full scale and the burden curve.</summary>
    private static string RangeVerdict(CharacterisationResult result, RangeResult r)
    {
        var parts = new List<string>();
        if (r.Conformity is { } c)
        {
            parts.Add($"accuracy: {Verdict(c.SimpleAcceptance)} (guard band: {Verdict(c.GuardBanded)}; TUR ≥ {N(c.MinimumTestUncertaintyRatio, 3)})");
        }

        if (r.Burden is { } b)
        {
            if (b.AtFullScale is { } fs)
            {
                parts.Add($"burden at full scale: {Q(b.AtFullScaleVolts, SiUnit.Volt, 4)} ± {Q(b.ExpandedUncertaintyVolts, SiUnit.Volt, 2)} against {Q(b.SpecifiedVolts, SiUnit.Volt)} specified, {Verdict(fs)}{(b.Extrapolated ? " (extrapolated beyond the largest current measured)" : string.Empty)}");
            }

            if (b.Curve is { } curve)
            {
                parts.Add($"burden limit curve: {b.CurvePointsAbove} of {b.CurvePoints} points above it, {Verdict(curve)}");
            }
        }

        if (r.UnsettledPoints > 0)
        {
            parts.Add($"{r.UnsettledPoints} unsettled point(s), used in the fit");
        }

        return $"<strong>{E(Verdicts.Words(Verdicts.Of(result, r)))}</strong>"
            + (parts.Count > 0 ? $"<br><span class=\"muted\">{E(string.Join("; ", parts))}</span>" : "<br><span class=\"muted\">no specification to judge against</span>");
    }

    private static void Record(StringBuilder html, RunRecords run)
    {
        var m = run.Manifest;
        if (m is null)
        {
            return;
        }

        static string Or(string? text) => string.IsNullOrWhiteSpace(text) ? "<span class=\"muted\">not stated</span>" : E(text);
        var c = m.Context;
        html.Append("<section id=\"record\"><h2>Calibration record</h2>");
        Facts(html,
        [
            ("Report id", $"<span id=\"report-id\">{E(run.ReportId)}</span>"),
            ("Laboratory", Or(c?.Laboratory)),
            ("Customer", Or(c?.Customer)),
            ("Operator", Or(c?.Operator)),
            ("Procedure", m.ProcedureId is null ? "<span class=\"muted\">no id: sequence " + E(Path.GetFileName(m.SequenceFile)) + "</span>" : E($"{m.ProcedureId}{(m.ProcedureVersion is { } v ? $", version {v}" : string.Empty)}")),
            ("Condition of the UUT", Or(c?.Condition)),
            ("Ambient temperature", c?.AmbientCelsius is { } t ? E(Q(t, SiUnit.Celsius, 3)) + (m.Simulated ? " <span class=\"muted\">(simulated)</span>" : string.Empty) : Or(null)),
            ("Relative humidity", c?.RelativeHumidityPercent is { } h ? E($"{N(h, 3)} %") : Or(null)),
            ("Measured", E(m.Start.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture))),
            ("Software", E(m.Software)),
        ]);
        if (m.Calibrations is { Count: > 0 } cals)
        {
            html.Append("<h3>Calibration of the bench instruments</h3>");
            Table(html, "data", ["role", "resource", "certificate", "calibration due", "on the day of the run"],
                cals.Select(k => (IReadOnlyList<string>)
                [
                    E(k.Role), E(k.Resource), k.Calibration is { } cal ? E(cal.Certificate) : Or(null),
                    k.Calibration is { } d ? E(d.Due.ToString("yyyy-MM-dd", CultureInfo.InvariantCulture)) : "—",
                    E(k.State switch
                    {
                        Core.Bench.CalibrationState.Current => "✓ within its calibration interval",
                        Core.Bench.CalibrationState.DueSoon => $"⚠ due in {k.DaysLeft} day(s)",
                        Core.Bench.CalibrationState.Overdue => $"✗ overdue by {-k.DaysLeft} day(s)",
                        _ => "– not recorded in the bench file",
                    }),
                ]));
        }
        else if (m.Simulated)
        {
            html.Append("<p class=\"note\">Simulated instruments: no calibration applies.</p>");
        }

        if (m.CalibrationOverride is { } reason)
        {
            html.Append("<div class=\"banner stop\" id=\"calibration-override\"><strong>Run with an instrument past its calibration due date.</strong> Reason given: ").Append(E(reason)).Append("</div>");
        }

        html.Append("<h3>Approval</h3>");
        if (run.Approval is { } a)
        {
            html.Append("<div class=\"approval\" id=\"approval\">");
            Facts(html,
            [
                ("Approved by", E(a.Approver) + (a.Role is { } r ? E($", {r}") : string.Empty)),
                ("Approved at", E(a.Time.ToUniversalTime().ToString("yyyy-MM-dd'T'HH:mm:ss'Z'", CultureInfo.InvariantCulture))),
                ("Sealed", "SHA-256 of " + E(string.Join(", ", Approval.Sealed)) + " in approval.json; <code>shuntsweep verify</code> detects any later change."),
            ]);
            html.Append("</div>");
        }
        else
        {
            html.Append("<p id=\"approval\"><strong>Not yet approved.</strong> <span class=\"muted\">Approve it with shuntsweep endorse DIR --by NAME, which seals the record's files.</span></p>");
        }

        html.Append("</section>\n");
    }

    private static void Uut(StringBuilder html, RunRecords run)
    {
        html.Append("<section id=\"uut\"><h2>Unit under test</h2>");
        var m = run.Manifest;
        if (m is null)
        {
            html.Append("<p class=\"note\">No manifest: the UUT's identity was not recorded with this result.</p></section>\n");
            return;
        }

        Facts(html,
        [
            ("Manufacturer", E(m.UutManufacturer)),
            ("Model", E(m.UutModel)),
            ("Serial number", E(m.UutSerial)),
            ("Asset id", E(m.UutAssetId ?? "—")),
        ]);
        if (run.Uut is { } uut)
        {
            html.Append("<h3>Ranges as specified</h3>");
            Table(html, "data", ["range", "jack", "full scale", "resolution", "accuracy ±(% of reading + counts)", "nominal shunt", "specified burden at full scale"],
                uut.Ranges.Select(r => (IReadOnlyList<string>)
                [
                    E(r.Name), E(r.Jack), E(r.FullScale.ToString()), E(r.Resolution.ToString()),
                    E($"{N(r.Accuracy.FractionOfReading * 100, 4)} % + {r.Accuracy.Counts} counts"),
                    r.NominalShunt is { } ns ? E(ns.ToString()) : "—",
                    r.BurdenAtFullScale is { } b ? E(b.ToString()) : "—",
                ]));
        }

        html.Append("</section>\n");
    }

    private static void Bench(StringBuilder html, RunRecords run, bool showPaths)
    {
        string FileName(string path) => showPaths ? path : Path.GetFileName(path);
        html.Append("<section id=\"bench\"><h2>Bench and instruments</h2>");
        var m = run.Manifest;
        if (m is null)
        {
            html.Append("<p class=\"note\">No manifest: the bench and instruments were not recorded with this result.</p></section>\n");
            return;
        }

        Facts(html,
        [
            ("Bench", E(m.BenchName) + (m.Simulated ? " <span class=\"tag near\">simulated</span>" : string.Empty)),
            ("Bench file", $"{E(FileName(m.BenchFile))}<br><span class=\"muted\">SHA-256 {E(m.BenchSha256)}</span>"),
            ("Sequence file", $"{E(FileName(m.SequenceFile))}<br><span class=\"muted\">SHA-256 {E(m.SequenceSha256)}</span>"),
            ("Started", E(m.Start.ToString("yyyy-MM-dd HH:mm:ss zzz", CultureInfo.InvariantCulture))),
            ("Simulation seed", E(m.Seed.ToString(CultureInfo.InvariantCulture))),
            ("Software", E(m.Software)),
        ]);
        html.Append("<h3>Instruments that answered</h3>");
        Table(html, "data", ["role", "identity"], m.Instruments.OrderBy(kv => kv.Key, StringComparer.Ordinal).Select(kv => (IReadOnlyList<string>)[E(kv.Key), E(kv.Value)]));
        html.Append("</section>\n");
    }

    private static void Safety(StringBuilder html, RunRecords run)
    {
        html.Append("<section id=\"safety\"><h2>Safety notes</h2><ul class=\"safety\">");
        foreach (var note in SafetyNotes.General)
        {
            html.Append("<li>").Append(E(note)).Append("</li>");
        }

        html.Append("</ul>");
        if (run.Uut is { } uut)
        {
            html.Append("<h3>Jacks of this UUT</h3>");
            Table(html, "data", ["jack", "fuse rating", "category marked"],
                uut.Jacks.Select(j => (IReadOnlyList<string>)[E(j.Name), E(j.FuseRating.ToString()), E(j.Category ?? "not stated")]));
        }

        html.Append("</section>\n");
    }

    private static void Ranges(StringBuilder html, CharacterisationResult result)
    {
        html.Append("<section id=\"ranges\"><h2>Results per range</h2>");
        Table(html, "data",
            ["range", "jack", "full scale", "model", "resistance ± U (k)", "offset ± U (k)", "burden at full scale", "drop per ampere at full scale", "fitted up to", "points (outliers)", "verdict"],
            result.Ranges.Select(r => (IReadOnlyList<string>)
            [
                $"<strong>{E(r.Name)}</strong>",
                E(r.Jack),
                E(Q(r.FullScaleA, SiUnit.Ampere)),
                E(r.Model),
                E(Expanded(r.ResistanceOhms, SiUnit.Ohm, result.CoverageProbability)) + (r.ResistanceMethod.Length > 0 ? $"<br><span class=\"muted\">{E(r.ResistanceMethod)}</span>" : string.Empty),
                E(Expanded(r.OffsetVolts, SiUnit.Volt, result.CoverageProbability)),
                E(Q(r.BurdenAtFullScaleVolts, SiUnit.Volt)),
                E(r.FullScaleA != 0 ? $"{N(r.BurdenAtFullScaleVolts / r.FullScaleA, 4)} V/A" : "—"),
                E(Q(r.FittedUpToA, SiUnit.Ampere)) + (double.IsFinite(r.ReadingLimitA) ? $"<br><span class=\"muted\">reading overloads from {E(Q(r.ReadingLimitA, SiUnit.Ampere))}</span>" : string.Empty),
                E($"{r.Points.Count} ({r.Points.Count(p => p.Outlier)})"),
                RangeVerdict(result, r),
            ]));
        html.Append("<p class=\"note\">Resistance is the small-signal slope of drop against current at zero current: the chosen model's own, or an Akaike-weighted average where another surviving hypothesis is within 2 AICc units (the method is named under the value, and its uncertainty then covers the choice of model); the burden at full scale is what the chosen model predicts there. ")
            .Append("Each ± U is the expanded uncertainty stored in result.json, with its coverage factor k from Student's t at the effective degrees of freedom.</p>");
        html.Append("</section>\n");
    }

    private static void RangeDetails(StringBuilder html, CharacterisationResult result)
    {
        html.Append("<section id=\"range-details\"><h2>Range details</h2>");
        var outliers = result.Ranges.SelectMany(r => r.Points.Where(p => p.Outlier).Select(p => (r, p))).ToList();
        if (outliers.Count > 0)
        {
            html.Append("<h3>Flagged points (kept in the fit)</h3>");
            Table(html, "data", ["range", "step", "current", "drop", "residual", "studentised residual"],
                outliers.Select(o => (IReadOnlyList<string>)
                [
                    E(o.r.Name), E(o.p.Step.ToString(CultureInfo.InvariantCulture)), E(Q(o.p.CurrentA, SiUnit.Ampere)), E(Q(o.p.DropVolts, SiUnit.Volt)),
                    E(Q(o.p.ResidualVolts, SiUnit.Volt, 3)), E(N(o.p.StudentisedResidual, 3)),
                ]));
        }

        var unsettled = result.Ranges.SelectMany(r => r.Points.Where(p => p.Unsettled).Select(p => (r, p))).ToList();
        if (unsettled.Count > 0)
        {
            html.Append("<h3 id=\"unsettled\">Points that had not settled (used in the fit)</h3><p class=\"note\">The drop was still moving when the point's maximum wait ran out. Each such point is in the fit, weighted by the scatter its samples show; its residual tells whether it pulled the fit.</p>");
            Table(html, "data", ["range", "step", "current", "drop", "residual", "studentised residual"],
                unsettled.Select(o => (IReadOnlyList<string>)
                [
                    E(o.r.Name), E(o.p.Step.ToString(CultureInfo.InvariantCulture)), E(Q(o.p.CurrentA, SiUnit.Ampere)), E(Q(o.p.DropVolts, SiUnit.Volt)),
                    E(Q(o.p.ResidualVolts, SiUnit.Volt, 3)), E(N(o.p.StudentisedResidual, 3)),
                ]));
        }

        foreach (var r in result.Ranges.Where(r => r.Parameters is { Count: > 0 }))
        {
            html.Append(CultureInfo.InvariantCulture, $"<h3>Fitted parameters of {E(r.Name)} ({E(r.Model)})</h3>");
            Table(html, "data", ["parameter", "value", "standard uncertainty", "unit", "meaning"],
                r.Parameters!.Select(p => (IReadOnlyList<string>)[E(p.Name), E(N(p.Value, 6)), E(N(p.StandardUncertainty, 2)), E(p.Unit), E(p.Meaning)]));
            if (r.Correlation is { Count: > 1 } correlation && correlation.Count == r.Parameters!.Count)
            {
                html.Append("<p class=\"note\">Correlation of the parameter estimates:</p>");
                Table(html, "data", ["", .. r.Parameters!.Select(p => p.Name)],
                    correlation.Select((row, i) => (IReadOnlyList<string>)[E(r.Parameters![i].Name), .. row.Select(c => E(N(c, 3)))]));
            }
        }

        html.Append("</section>\n");
    }

    private static void Models(StringBuilder html, CharacterisationResult result)
    {
        var compared = result.Ranges.Where(r => r.ModelComparison is not null).ToList();
        if (compared.Count == 0)
        {
            return;
        }

        html.Append("<section id=\"model-comparison\"><h2>Model choice</h2>");
        foreach (var r in compared)
        {
            var mc = r.ModelComparison!;
            html.Append(CultureInfo.InvariantCulture, $"<h3>{E(r.Name)}: {E(mc.Chosen)}{(mc.RunnerUp is { } ru ? $", runner-up {E(ru)}" : string.Empty)}</h3><p class=\"note\">{E(mc.Rule)}</p>");
            Table(html, "data", ["model", "parameters", "fitted", "χ²", "residual SD", "AICc", "BIC", "F-test against", "p"],
                mc.Candidates.Select(c => (IReadOnlyList<string>)
                [
                    c.Model == mc.Chosen ? $"<strong>{E(c.Model)}</strong>" : E(c.Model),
                    E(c.ParameterCount.ToString(CultureInfo.InvariantCulture)),
                    c.Fitted ? "yes" : $"no <span class=\"muted\">{E(c.Reason)}</span>",
                    E(N(c.ChiSquare, 5)), E(Q(c.ResidualStdDevVolts, SiUnit.Volt, 3)), E(N(c.Aicc, 5)), E(N(c.Bic, 5)),
                    E(c.NestedOver ?? "—"), E(N(c.FTestPValue, 3)),
                ]));
        }

        html.Append("</section>\n");
    }

    private static void Decomposition(StringBuilder html, CharacterisationResult result)
    {
        if (result.Decomposition is not { Count: > 0 } jacks)
        {
            return;
        }

        html.Append("<section id=\"decomposition\"><h2>Fuse and shunt separated, per jack</h2>");
        foreach (var jack in jacks)
        {
            html.Append(CultureInfo.InvariantCulture, $"<h3>Jack {E(jack.Jack)} (ranges {E(string.Join(", ", jack.Ranges))})</h3>");
            if (jack.Separations.Count == 0)
            {
                html.Append("<p class=\"note\">No hypothesis could separate the common series part on this jack.</p>");
                continue;
            }

            Table(html, "data", ["hypothesis", "common series part ± u", "shunts ± u", "χ² / ν", "p", "consistent", "also found"],
                jack.Separations.Select(s => (IReadOnlyList<string>)
                [
                    E(s.Hypothesis),
                    E($"{Qu(s.CommonSeriesOhms.Value, s.CommonSeriesOhms.StandardUncertainty, SiUnit.Ohm)}"),
                    string.Join("<br>", s.ShuntOhms.Select(kv => E($"{kv.Key}: {Qu(kv.Value.Value, kv.Value.StandardUncertainty, SiUnit.Ohm)}"))),
                    E($"{N(s.ChiSquare, 5)} / {s.DegreesOfFreedom}"),
                    E(s.DegreesOfFreedom > 0 ? N(s.PValue, 4) : "no check possible"),
                    s.Consistent switch
                    {
                        true => "<span class=\"tag ok\">yes</span>",
                        false => "<span class=\"tag out\">no</span>",
                        null => "<span class=\"tag near\">unchecked</span>",
                    },
                    s.Extra is { Count: > 0 } extra ? string.Join("<br>", extra.Select(kv => E($"{kv.Key}: {N(kv.Value.Value, 5)} ± {N(kv.Value.StandardUncertainty, 2)}"))) : "—",
                ]));
        }

        html.Append("</section>\n");
    }

    private static void Thermal(StringBuilder html, CharacterisationResult result)
    {
        var holds = result.Ranges.SelectMany(r => (r.Thermal ?? []).Select(h => (r, h))).ToList();
        if (holds.Count == 0)
        {
            return;
        }

        html.Append("<section id=\"thermal\"><h2>Thermal holds</h2>");
        Table(html, "data", ["range", "step", "current", "duration", "model", "settled drop ± u", "terms: amplitude, time constant, element", "residual SD"],
            holds.Select(x => (IReadOnlyList<string>)
            [
                E(x.r.Name), E(x.h.Step.ToString(CultureInfo.InvariantCulture)), E(Q(x.h.CurrentA, SiUnit.Ampere)), E(Q(x.h.DurationSeconds, SiUnit.Second, 3)), E(x.h.Model),
                E($"{Qu(x.h.SettledDropVolts.Value, x.h.SettledDropVolts.StandardUncertainty, SiUnit.Volt)}"),
                string.Join("<br>", x.h.Terms.Select(t => E($"{Qu(t.AmplitudeVolts.Value, t.AmplitudeVolts.StandardUncertainty, SiUnit.Volt)}, τ = {Qu(t.TimeConstantSeconds.Value, t.TimeConstantSeconds.StandardUncertainty, SiUnit.Second)}, {t.AttributedTo}"))),
                E(Q(x.h.ResidualStdDevVolts, SiUnit.Volt, 3)),
            ]));
        html.Append("</section>\n");
    }

    private static void PlotSection(StringBuilder html, IReadOnlyList<RenderedPlot> plots)
    {
        html.Append("<section id=\"plots\"><h2>Plots</h2>");
        foreach (var p in plots)
        {
            html.Append(CultureInfo.InvariantCulture, $"<figure id=\"plot-{E(p.Name)}\"><img alt=\"{E(p.Caption)}\" src=\"data:image/png;base64,{Convert.ToBase64String(p.Png)}\">")
                .Append(CultureInfo.InvariantCulture, $"<figcaption>{E(p.Caption)} <a href=\"plots/{E(p.Name)}.svg\">SVG</a> · <a href=\"plots/{E(p.Name)}.png\">PNG</a></figcaption></figure>\n");
        }

        if (plots.Count == 0)
        {
            html.Append("<p class=\"note\">The result has no points to plot.</p>");
        }

        html.Append("</section>\n");
    }

    private static void Budget(StringBuilder html, CharacterisationResult result)
    {
        html.Append("<section id=\"budget\"><h2>Uncertainty budget</h2>");
        var judged = result.Ranges.Where(r => r.ReadingError is { Count: > 0 }).ToList();
        if (judged.Count == 0)
        {
            html.Append("<p class=\"note\">The UUT's readings were not taken in this run, so there is no reading-error budget. The standard uncertainties of the fitted parameters are listed with each range above.</p></section>\n");
            return;
        }

        html.Append(CultureInfo.InvariantCulture, $"<p class=\"note\">Reading error = UUT reading − reference current, evaluated by the law of propagation of uncertainty (JCGM 100:2008) with ν_eff from Welch–Satterthwaite and k from the t distribution at p = {E(N(result.CoverageProbability * 100, 3))} %. Each range shows the budget of its least conforming point; every point follows.</p>");
        foreach (var r in judged)
        {
            var points = r.ReadingError!;
            var worst = points.MinBy(p => p.Statement.ProbabilityOfConformance)!;
            var b = worst.Budget;
            html.Append(CultureInfo.InvariantCulture, $"<h3>{E(r.Name)}: budget at step {worst.Step} ({E(Q(worst.ReferenceA, SiUnit.Ampere))})</h3>");
            Table(html, "data budget", ["input", "estimate", "standard uncertainty u(xᵢ)", "sensitivity cᵢ", "contribution |cᵢ|·u(xᵢ)", "νᵢ", "distribution"],
                b.Lines.Select(l => (IReadOnlyList<string>)
                [
                    E(l.Name), E(N(l.Value, 6)), E(Q(l.StandardUncertainty, SiUnit.Ampere, 3)), E(N(l.Sensitivity, 4)), E(Q(l.Contribution, SiUnit.Ampere, 3)), E(Dof(l.DegreesOfFreedom)),
                    E(l.Distribution.ToString().ToLowerInvariant()),
                ]));
            Facts(html,
            [
                ("Error y", E(Q(b.Value, SiUnit.Ampere, 4))),
                ("Combined standard uncertainty u_c(y)", E(Q(b.CombinedStandardUncertainty, SiUnit.Ampere, 3))),
                ("Effective degrees of freedom ν_eff", E(Dof(b.EffectiveDegreesOfFreedom))),
                ("Coverage factor k", E(N(b.CoverageFactor, 4))),
                ("Expanded uncertainty U", E($"{QuantityFormatter.FormatUncertainty(b.ExpandedUncertainty, SiUnit.Ampere)} (p = {N(b.CoverageProbability * 100, 3)} %)")),
                ("Monte Carlo cross-check (JCGM 101)", worst.MonteCarlo is { } mc
                    ? E($"{mc.Trials} trials: u = {Q(mc.StandardUncertainty, SiUnit.Ampere, 3)}, interval [{Q(mc.Low, SiUnit.Ampere, 3)}, {Q(mc.High, SiUnit.Ampere, 3)}]; ") + (mc.AgreesWithGum ? "<span class=\"tag ok\">agrees with the GUM budget</span>" : "<span class=\"tag near\">differs from the GUM budget: the decision uses the Monte Carlo interval</span>")
                    : "not run"),
            ]);
            html.Append(CultureInfo.InvariantCulture, $"<h3>{E(r.Name)}: every point, burden first</h3>");
            var drops = r.Points.ToDictionary(p => p.Step, p => p.DropVolts);
            Table(html, "data points", ["step", "current through the UUT", "burden (drop across the jacks)", "UUT reading", "reading error ± U", "allowed ±L (TUR)", "chance |error| ≤ L", "verdict"],
                points.Select(p => (IReadOnlyList<string>)
                [
                    E(p.Step.ToString(CultureInfo.InvariantCulture)),
                    E(AtPlaceOf(p.ReferenceA, p.Statement.ExpandedUncertainty)),
                    E(drops.TryGetValue(p.Step, out var drop) ? Q(drop, SiUnit.Volt, 5) : "—"),
                    E(AtPlaceOf(p.ReadingA, p.Statement.ExpandedUncertainty)),
                    E(p.DecidedOn == "monte-carlo" && p.MonteCarlo is { StandardUncertainty: > 0 } mcp
                        ? QuantityFormatter.FormatExpanded(p.ErrorA, p.Statement.ExpandedUncertainty, p.Statement.ExpandedUncertainty / mcp.StandardUncertainty, SiUnit.Ampere) + " (Monte Carlo)"
                        : QuantityFormatter.FormatExpanded(p.ErrorA, p.Statement.ExpandedUncertainty, p.Budget.CoverageFactor, SiUnit.Ampere)),
                    E($"{Q(p.Statement.ToleranceLimit, SiUnit.Ampere, 3)} ({N(p.Statement.TestUncertaintyRatio, 3)})"),
                    E(QuantityFormatter.FormatPercent(p.Statement.ProbabilityOfConformance, 3)),
                    VerdictWord(p.Statement.SimpleAcceptance) + (p.Statement.GuardBanded != p.Statement.SimpleAcceptance ? $"<br><span class=\"muted\">guard band: {VerdictWord(p.Statement.GuardBanded)}</span>" : string.Empty),
                ]));
        }

        html.Append("</section>\n");
    }

    private static void Conformity(StringBuilder html, CharacterisationResult result)
    {
        html.Append("<section id=\"conformity\"><h2>Statement of conformity</h2>");
        if (result.Conformity is not { } c)
        {
            html.Append("<p>No statement of conformity is made: the run did not read the UUT against a reference with a stated accuracy.</p></section>\n");
            return;
        }

        if (Verdicts.IsIncomplete(result))
        {
            html.Append("<p class=\"banner stop\">The run is incomplete: no statement of conformity is made for the UUT. What follows is what the points measured showed.</p>");
        }

        html.Append(CultureInfo.InvariantCulture, $"<p id=\"verdict\">Over {c.Points} judged points the UUT's reading error is {VerdictTag(c.SimpleAcceptance)} under simple acceptance, and {VerdictTag(c.GuardBanded)} with the guard band. The smallest test uncertainty ratio is {E(N(c.MinimumTestUncertaintyRatio, 3))}.</p>");
        html.Append("<h3>Decision rule</h3><ul>")
            .Append("<li><strong>Simple acceptance</strong> (ILAC-G8:09/2019, guard band w = 0, risk shared): a point conforms when |error| ≤ L, L = the specification ±(% of reading + counts) at that reading.</li>")
            .Append("<li><strong>Guard-banded</strong> (w = U): within specification when |error| ≤ L − U; within specification inside the guard band when L − U &lt; |error| ≤ L; outside specification inside the guard band when L &lt; |error| ≤ L + U; outside specification beyond L + U.</li>")
            .Append(CultureInfo.InvariantCulture, $"<li>U is the expanded uncertainty of the error at a coverage probability of {E(N(result.CoverageProbability * 100, 3))} %; TUR = L / U. The UUT's verdict is its worst point's.</li></ul>");
        Table(html, "data", ["range", "points", "simple acceptance", "guard band w = U", "smallest TUR"],
            result.Ranges.Where(r => r.Conformity is not null).Select(r => (IReadOnlyList<string>)
            [
                E(r.Name), E(r.Conformity!.Points.ToString(CultureInfo.InvariantCulture)), VerdictTag(r.Conformity.SimpleAcceptance), VerdictTag(r.Conformity.GuardBanded),
                E(N(r.Conformity.MinimumTestUncertaintyRatio, 3)),
            ]));
        html.Append("</section>\n");
    }

    private static void Files(StringBuilder html, RunRecords run, IReadOnlyList<RenderedPlot> plots)
    {
        html.Append("<section id=\"files\"><h2>Raw data files</h2><p class=\"note\">Next to this report in the run directory; the links open the files themselves.</p><ul>");
        foreach (var (file, what) in new[]
        {
            (RunRecords.JournalFile, "every sample: setpoint, reference, UUT reading, drop, supply and load voltages, time"),
            (RunRecords.EventsFile, "what happened during the run, in order"),
            (Core.Records.RunManifest.FileName, "sequence and bench by SHA-256, instrument identities, seed"),
            (RunRecords.ResultFile, "the analysis result this report shows"),
            (RunRecords.TrafficFile, "every message exchanged with the instruments"),
            (RunReport.ExportFolder + "/" + Export.ResultCsv.PointsFile, "every range's points as CSV (units in the headers): current, drop, its uncertainty, residual, outlier flag"),
            (RunReport.ExportFolder + "/" + Export.ResultCsv.CurveFile, "every range's fitted curve as CSV: drop, its uncertainty, V/I and dV/dI on a fine grid of currents"),
        })
        {
            html.Append(run.Has(file)
                ? $"<li><a href=\"{E(file)}\">{E(file)}</a> — {E(what)}</li>"
                : $"<li>{E(file)} — <span class=\"muted\">not in this run directory</span></li>");
        }

        if (plots.Count > 0)
        {
            html.Append("<li>plots/ — every plot as ").Append(string.Join(", ", plots.Select(p => $"<a href=\"plots/{E(p.Name)}.svg\">{E(p.Name)}</a>"))).Append(" (SVG, and PNG beside it)</li>");
        }

        html.Append("</ul></section>\n");
    }

    private static void RunLog(StringBuilder html, RunRecords run)
    {
        var notable = run.Events.Where(e => e.Name != "step-done").ToList();
        if (notable.Count == 0)
        {
            return;
        }

        const int Shown = 200;
        html.Append("<section id=\"run-log\"><h2>Run log</h2>")
            .Append(CultureInfo.InvariantCulture, $"<p class=\"note\">{run.Events.Count(e => e.Name == "step-done")} measurement and hold steps journalled (operator steps are not journalled); the other events follow{(notable.Count > Shown ? $" (first {Shown} of {notable.Count})" : string.Empty)}.</p>");
        Table(html, "data", ["elapsed", "event", "details"],
            notable.Take(Shown).Select(e => (IReadOnlyList<string>)
            [
                E(Q(e.ElapsedSeconds, SiUnit.Second, 4)), E(e.Name),
                E(string.Join("; ", e.Fields.Where(kv => kv.Key != "detail").Select(kv => $"{kv.Key}: {kv.Value}"))),
            ]));
        html.Append("</section>\n");
    }
}
