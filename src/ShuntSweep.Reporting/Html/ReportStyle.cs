namespace ShuntSweep.Reporting.Html;

/// <summary>The report's inline style sheet: our own palette (deep teal, amber, slate), readable on screen and on A4 paper.</summary>
internal static class ReportStyle
{
    public const string Css = """
        :root { --ink:#1b2b34; --muted:#5b6b75; --line:#d5dde2; --band:#0f4c5c; --accent:#d9822b; --paper:#ffffff; --wash:#f3f6f8; }
        * { box-sizing: border-box; }
        body { margin:0; background:var(--wash); color:var(--ink); font: 14px/1.45 "DejaVu Sans", "Liberation Sans", Arial, sans-serif; }
        header.band { background:var(--band); color:#fff; padding:22px 36px 18px; border-bottom:5px solid var(--accent); }
        header.band h1 { margin:0 0 4px; font-size:24px; letter-spacing:.3px; }
        header.band .sub { opacity:.9; font-size:15px; }
        header.band .badge { display:inline-block; margin-left:10px; padding:1px 9px; border-radius:10px; background:var(--accent); color:#1b2b34; font-size:12px; font-weight:bold; vertical-align:middle; }
        main { max-width:1040px; margin:0 auto; padding:18px 28px 40px; }
        section { background:var(--paper); border:1px solid var(--line); border-radius:6px; padding:14px 20px 16px; margin:16px 0; }
        h2 { margin:2px 0 10px; font-size:18px; color:var(--band); border-bottom:2px solid var(--wash); padding-bottom:5px; }
        h3 { margin:14px 0 6px; font-size:15px; color:var(--ink); }
        p.note, .muted { color:var(--muted); }
        table { border-collapse:collapse; width:100%; margin:6px 0 10px; font-size:13px; }
        th, td { border-bottom:1px solid var(--line); padding:4px 7px; text-align:left; vertical-align:top; }
        thead th { background:#e7eef1; color:var(--band); font-weight:bold; }
        table.facts th { width:32%; color:var(--muted); font-weight:normal; }
        td.num, table.data td { font-variant-numeric: tabular-nums; }
        .tag { display:inline-block; padding:0 7px; border-radius:9px; font-size:12px; font-weight:bold; white-space:nowrap; }
        .tag.ok { background:#d8efe3; color:#19633c; }
        .tag.near { background:#fff1d6; color:#8a5a00; }
        .tag.near-out { background:#ffe2cc; color:#8f3b00; }
        .tag.out { background:#f8d7d3; color:#8e1f14; }
        .word { font-weight:bold; white-space:nowrap; }
        .word.out { color:#8e1f14; } .word.near-out { color:#8f3b00; } .word.near { color:#6d4a00; } .word.ok { color:#19633c; }
        table.points td:nth-child(3) { font-weight:bold; }
        .banner { border-left:6px solid var(--accent); background:#fff7ec; padding:10px 14px; margin:10px 0; }
        .banner.stop { border-color:#b5443b; background:#fdeeee; }
        .verdict { border:2px solid var(--ink); padding:8px 14px; margin:10px 0; font-size:15px; background:var(--paper); }
        .verdict.fail, .verdict.incomplete { border-style:double; border-width:4px; }
        ul.safety li { margin:3px 0; }
        figure { margin:12px 0 18px; page-break-inside:avoid; break-inside:avoid; }
        figure img { width:100%; max-width:900px; height:auto; border:1px solid var(--line); border-radius:4px; background:#fff; }
        figcaption { color:var(--muted); font-size:13px; margin-top:4px; }
        a { color:#0f6e7a; }
        footer { max-width:1040px; margin:0 auto; padding:0 28px 30px; color:var(--muted); font-size:12px; }
        h2.part { font-size:21px; border-bottom:3px solid var(--accent); margin-top:28px; }
        @page { size: A4; margin: 14mm 12mm 16mm; }
        @media print {
          body { background:#fff; font-size:10.5px; }
          table { font-size:10px; margin:4px 0 6px; }
          th, td { padding:2px 5px; }
          h2 { font-size:15px; margin:2px 0 6px; }
          header.band { padding:12px 18px 10px; }
          header.band { -webkit-print-color-adjust:exact; print-color-adjust:exact; }
          main { max-width:none; padding:0; }
          section { border:none; border-top:1px solid var(--line); border-radius:0; padding:8px 0; break-inside:auto; }
          h2, h3 { break-after:avoid-page; break-inside:avoid; }
          h2 + *, h3 + * { break-before:avoid-page; }
          tr, figure { break-inside:avoid; }
          thead { display:table-header-group; }
          .appendix { break-before:page; }
          footer { padding:0; }
          .tag, thead th { -webkit-print-color-adjust:exact; print-color-adjust:exact; }
        }
        """;

    /// <summary>The printed page's footer: the report id (when the run has one) on the left, "page x of y" on the right (CSS paged-media margin boxes).</summary>
    public static string PageFooter(string? reportId) =>
        "@page { @bottom-left { content: \"" + (reportId is null ? "Burden-voltage report" : "Report " + CssString(reportId)) + "\"; font: 9px \"DejaVu Sans\", sans-serif; color: #5b6b75; } "
        + "@bottom-right { content: \"page \" counter(page) \" of \" counter(pages); font: 9px \"DejaVu Sans\", sans-serif; color: #5b6b75; } }";

    private static string CssString(string text) =>
        string.Concat(text.Select(c => c is '"' or '\\' or < ' ' ? $"\\{(int)c:x} " : c.ToString()));
}
