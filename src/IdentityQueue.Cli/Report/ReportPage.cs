using System.Globalization;
using System.Text;
using IdentityQueue.Store.Schema;
using static IdentityQueue.Cli.Report.SvgCharts;

namespace IdentityQueue.Cli.Report;

/// <summary>
/// The report as one self-contained HTML page: inline CSS and inline SVG, no scripts, and a content security policy
/// that forbids loading anything, so the page never reaches the network. Every text from the store is HTML-encoded.
/// A pure function of the data.
/// </summary>
internal static class ReportPage
{
    /// <summary>Characters of a rejected line shown in the table (the store keeps up to 2,000).</summary>
    public const int RawShown = 240;

    /// <summary>Instances per row of a family's strip.</summary>
    public const int StripRow = 24;

    public static string Render(ReportData data, string store, string version, DateTime generatedUtc)
    {
        var html = new StringBuilder();
        var scope = data.Filter.Count == 0 ? "all catalogues" : string.Join(", ", data.Filter);
        html.Append($"""
            <!DOCTYPE html>
            <html lang="en">
            <head>
            <meta charset="utf-8">
            <meta name="viewport" content="width=device-width, initial-scale=1">
            <meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'">
            <title>Screening report: {Encode(Path.GetFileName(store))}</title>
            <style>{Css}</style>
            </head>
            <body>
            <header>
            <p class="kicker">IdentityQueue · screening report</p>
            <h1>{Encode(Path.GetFileName(store))}</h1>
            <p class="meta">Store <code>{Encode(store)}</code> · {Encode(scope)} · generated {generatedUtc.ToString("yyyy-MM-dd HH:mm", CultureInfo.InvariantCulture)} UTC by idq {Encode(version)}</p>
            </header>
            <main>
            <aside class="caveat"><strong>Evidence, not proof.</strong> Survivors are <em>very likely true</em>, not proven:
            a survivor's error bound 2<sup>−b</sup> bounds the chance that a false identity would have passed all of its random
            trials, and it is only as good as the degree bound behind it (computed from the structure of the expression).
            Refutations are proofs of falsity: each has a witness, a modulus and a point, that <code>idq recheck</code>
            verifies again from those alone.</aside>

            """);
        Tiles(html, data);
        States(html, data);
        Stages(html, data);
        Evidence(html, data);
        Time(html, data);
        Families(html, data);
        Refutations(html, data);
        EquivalenceSection.Append(html, data);
        Rejections(html, data);
        html.Append($"""
            </main>
            <footer>Every number here is a plain SQL query away: <code>idq sql "SELECT state, count(*) FROM verdicts GROUP BY state"</code>.
            The charts are inline SVG drawn by idq; the page loads nothing.</footer>
            </body>
            </html>

            """);
        return html.ToString();
    }

    private static void Tiles(StringBuilder html, ReportData data)
    {
        var other = data.Candidates - data.Total(ResultState.Refuted) - data.Total(ResultState.Survived);
        html.Append("<section class=\"tiles\">");
        Tile(html, "catalogues", data.Catalogues.Count, "catalogues");
        Tile(html, "candidates", data.Candidates, "candidates");
        Tile(html, ResultStates.Survived, data.Total(ResultState.Survived), "survived (very likely true)");
        Tile(html, ResultStates.Refuted, data.Total(ResultState.Refuted), "refuted, with witness");
        Tile(html, "other", other, "undecided, invalid, failed or open");
        Tile(html, "rejections", data.RejectionsTotal, "rejected at import");
        html.Append("</section>\n");
    }

    private static void Tile(StringBuilder html, string key, long value, string caption) =>
        html.Append($"<div class=\"tile tile-{key}\" data-tile=\"{key}\" data-value=\"{value}\"><span class=\"n\">{Count(value)}</span><span class=\"c\">{Encode(caption)}</span></div>");

    private static void Section(StringBuilder html, string id, string title, string lead)
    {
        html.Append($"<section id=\"{id}\">\n<h2>{Encode(title)}</h2>\n<p class=\"lead\">{lead}</p>\n");
    }

    private static void Empty(StringBuilder html, string text) => html.Append($"<p class=\"empty\">{Encode(text)}</p>\n");

    private static void States(StringBuilder html, ReportData data)
    {
        Section(html, "states", "Candidates by state", "Every candidate of the selected catalogues; one without a result yet counts as pending.");
        var bars = ReportData.States.Select(s => new Bar(s, data.Total(s), ColorOf(s))).ToList();
        html.Append("<div class=\"figure\">").Append(HorizontalBars("states", "Candidates by state", bars)).Append("</div>\n");
        html.Append("<table class=\"numbers\" data-table=\"states\"><thead><tr><th>catalogue</th>");
        foreach (var s in ReportData.States) html.Append($"<th><span class=\"dot\" style=\"background:{ColorOf(s)}\"></span>{s}</th>");
        html.Append("<th>total</th></tr></thead><tbody>");
        foreach (var c in data.Catalogues)
        {
            html.Append($"<tr data-key=\"{Encode(c.Name)}\"><th title=\"{Encode(c.Source ?? "")}\">{Encode(c.Name)}</th>");
            long total = 0;
            foreach (var s in ReportData.States)
            {
                var n = data.StateCounts.Where(x => x.Catalogue == c.Name && x.State == s).Sum(x => x.Count);
                total += n;
                html.Append($"<td data-state=\"{s}\" data-count=\"{n}\"{(n == 0 ? " class=\"zero\"" : "")}>{Count(n)}</td>");
            }
            html.Append($"<td class=\"total\">{Count(total)}</td></tr>");
        }
        html.Append("</tbody><tfoot><tr><th>all</th>");
        foreach (var s in ReportData.States) html.Append($"<td>{Count(data.Total(s))}</td>");
        html.Append($"<td class=\"total\">{Count(data.Candidates)}</td></tr></tfoot></table>\n");
        html.Append("<p class=\"note\">Catalogues: ");
        html.Append(string.Join("; ", data.Catalogues.Select(c =>
            $"<strong>{Encode(c.Name)}</strong> from <code>{Encode(c.Source ?? "(made by hand)")}</code>, imported {Encode(c.ImportedAt)}, seed {Encode(c.Seed)}")));
        html.Append(data.Catalogues.Count == 0 ? "none.</p>\n" : ".</p>\n");
        html.Append("</section>\n");
    }

    private static void Stages(StringBuilder html, ReportData data)
    {
        Section(html, "stages", "Refutations by escalation stage",
            "The trial whose nonzero value refuted each identity: its number and the size of its field. The first trials use the cheapest field worth 16 bits of evidence, so most false entries fall there.");
        if (data.Stages.Count == 0)
        {
            Empty(html, "No refutations.");
        }
        else
        {
            var bars = data.Stages.Select(s => new Bar($"trial {s.Seq} · {s.FieldBits}-bit field", s.Count, ColorOf(ResultState.Refuted))).ToList();
            html.Append("<div class=\"figure\">").Append(HorizontalBars("stages", "Refutations by escalation stage", bars)).Append("</div>\n");
            var first = data.Stages.Where(s => s.Seq == 1).Sum(s => s.Count);
            var all = data.Stages.Sum(s => s.Count);
            html.Append($"<p class=\"note\">{Count(first)} of {Count(all)} refutations ({Percent(first, all)}) came from the first trial.</p>\n");
        }
        html.Append("</section>\n");
    }

    private static void Evidence(StringBuilder html, ReportData data)
    {
        Section(html, "bounds", "Error bounds of the survivors",
            "Bits of evidence b per survivor: a false identity would have passed all of its trials with probability at most 2<sup>−b</sup>. " +
            "Very likely true, not proven; each bound is only as good as the degree bound behind it.");
        var survivors = data.EvidenceBins.Sum();
        if (data.ExactSurvivors > 0)
            html.Append("<p class=\"note\" data-exact=\"").Append(data.ExactSurvivors).Append("\">")
                .Append(data.ExactSurvivors).Append(" survivors were decided exactly (no variables, or a power series in q alone): they are true, ")
                .Append("have no error bound and are not in the chart.</p>\n");
        if (survivors == 0) Empty(html, data.ExactSurvivors > 0 ? "No survivors with an error bound." : "No survivors.");
        else
        {
            var bins = Trimmed(data.EvidenceBins, Bins.EvidenceBits, ColorOf(ResultState.Survived));
            html.Append("<div class=\"figure\">")
                .Append(Columns("bounds", "Error bounds of the survivors", bins, "bits of evidence b (error bound 2^-b); weakest on the left"))
                .Append("</div>\n");
        }
        html.Append("</section>\n");
    }

    private static void Time(StringBuilder html, ReportData data)
    {
        Section(html, "time", "Screening time per candidate",
            "The sum of the elapsed times of each candidate's trials (evaluation only; the queue and the store are not included).");
        if (data.TimedCandidates == 0) Empty(html, "No trials yet.");
        else
        {
            var bins = Trimmed(data.TimeBins, Bins.Microseconds, "#4a6fa5");
            html.Append("<div class=\"figure\">")
                .Append(Columns("time", "Screening time per candidate", bins, "time in trials per candidate"))
                .Append("</div>\n");
            html.Append($"<p class=\"note\">{Count(data.TimedCandidates)} candidates with trials, {Encode(Bins.Duration(data.TotalMicroseconds))} in all.</p>\n");
        }
        html.Append("</section>\n");
    }

    /// <summary>The bins from the first to the last nonempty one (empty ones between them stay, so the shape is honest).</summary>
    internal static List<Bar> Trimmed(IReadOnlyList<long> counts, Bins bins, string color)
    {
        var first = counts.ToList().FindIndex(c => c > 0);
        var last = counts.ToList().FindLastIndex(c => c > 0);
        if (first < 0) return [];
        return [.. Enumerable.Range(first, last - first + 1).Select(i => new Bar(bins.Label(i), counts[i], color))];
    }

    private static void Families(StringBuilder html, ReportData data)
    {
        Section(html, "families", "Families and where they fail",
            "One row per family line (from the <code>families</code> view), its instances in parameter order: " +
            $"<span class=\"dot\" style=\"background:{ColorOf(ResultState.Survived)}\"></span>survived, " +
            $"<span class=\"dot\" style=\"background:{ColorOf(ResultState.Refuted)}\"></span>refuted, " +
            $"<span class=\"dot\" style=\"background:{ColorOf(ResultState.Invalid)}\"></span>invalid, " +
            $"<span class=\"dot\" style=\"background:{ColorOf(ResultState.Undecided)}\"></span>undecided. " +
            "A family that holds for some parameters and fails for others is marked <span class=\"tag\">fails for some</span>; " +
            "where it holds and fails is said in words, with the smallest counterexample of its first failing instance. " +
            "A family in two parameters is drawn as a grid (rows: the first parameter's values, columns: the second's), " +
            "each square also marked ✓ survived, × refuted, ! invalid or failed, ? undecided.");
        if (data.Families.Count == 0)
        {
            Empty(html, "No family lines.");
            html.Append("</section>\n");
            return;
        }
        html.Append("<table class=\"families\" data-table=\"families\"><thead><tr><th>family</th><th>instances</th><th>survived</th><th>refuted</th><th>other</th><th>instances in order</th><th>first fails at</th><th>fails at</th></tr></thead><tbody>");
        string? group = null;
        foreach (var f in data.Families)
        {
            if (f.Catalogue != group)
            {
                group = f.Catalogue;
                html.Append($"<tr class=\"group\"><th colspan=\"8\">{Encode(group)}</th></tr>");
            }
            var mixed = f.Refuted > 0 && f.Survived > 0;
            html.Append($"<tr data-key=\"{Encode(f.Catalogue + "/" + f.Family)}\" data-instances=\"{f.Instances}\" data-refuted=\"{f.Refuted}\"{(mixed ? " class=\"mixed\"" : "")}>");
            html.Append($"<th>{Encode(f.Family)}{(mixed ? "<br><span class=\"tag\">fails for some</span>" : "")}</th>");
            html.Append($"<td>{Count(f.Instances)}</td><td>{Count(f.Survived)}</td><td>{Count(f.Refuted)}</td><td>{Count(f.Other)}</td>");
            html.Append("<td class=\"strip\">");
            html.Append($"<p class=\"words\">{Encode(f.Words)}</p>");
            html.Append(f.Members.Count == f.Instances ? Instances(f) : "<span class=\"empty\">not listed</span>");
            html.Append("</td>");
            html.Append(f.FirstFailure is { } firstFailure
                ? $"<td class=\"first\">{Encode(firstFailure)}</td>"
                : $"<td><code>{Encode(f.FirstRefuted ?? "")}</code></td>");
            var failing = f.Members.Where(m => m.State == ResultStates.Refuted).Select(m => m.Params).ToList();
            html.Append($"<td class=\"fails\">{Encode(ReportData.Compress(failing, max: 12))}</td></tr>");
        }
        html.Append("</tbody></table>\n");
        if (data.InstancesTruncated)
            html.Append($"<p class=\"note\">Only the first {Count(ReportData.MaxInstances)} family instances are drawn; query the <code>families</code> view for the rest.</p>\n");
        html.Append("</section>\n");
    }

    /// <summary>Distinct values per grid axis at most; a larger family in two parameters keeps its strip.</summary>
    public const int MaxGridAxis = 60;

    /// <summary>
    /// A family's instances: a grid for a family in two integer parameters (rows the first one's values, columns the
    /// second's, both ascending), a strip in parameter order otherwise.
    /// </summary>
    private static string Instances(FamilyInfo f)
    {
        if (GridAxes(f) is not { } axes)
            return Strip("family", $"{f.Family}: instances in parameter order", [.. f.Members.Select(m => new StripCell(m.Params, m.State))], StripRow);
        var (rows, columns) = axes;
        var refuted = f.Members.Where(m => m.State == ResultStates.Refuted).Select(m => m.Params).ToList();
        var title = $"{f.Family}: a grid of {f.Parameters[0]} (rows) by {f.Parameters[1]} (columns); {f.Words}" +
            (refuted.Count == 0 ? "" : $"; refuted at {ReportData.Compress(refuted, max: 12)}");
        var grid = Grid("family", title, f.Parameters[0], rows, f.Parameters[1], columns,
            [.. f.Members.Select(m => new GridCell(m.Values[0], m.Values[1], m.Params, m.State))]);
        var legend = string.Join(" ", ReportData.States.Where(s => f.Members.Any(m => m.State == s)).Select(s =>
            $"<span class=\"key\"><span class=\"dot\" style=\"background:{ColorOf(s)}\"></span>{Encode(SymbolOf(s))} {Encode(s)}</span>"));
        return $"{grid}<p class=\"legend\">{legend}</p>";
    }

    /// <summary>The sorted values of a two-parameter family's axes when every instance has two integer values, else null.</summary>
    internal static (List<string> Rows, List<string> Columns)? GridAxes(FamilyInfo f)
    {
        if (f.Parameters.Count != 2 || f.Members.Count == 0) return null;
        if (!f.Members.All(m => m.Values.Count == 2 && m.Values.All(v => long.TryParse(v, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out _))))
            return null;
        List<string> Axis(int i) => [.. f.Members.Select(m => long.Parse(m.Values[i], CultureInfo.InvariantCulture)).Distinct().Order()
            .Select(v => v.ToString(CultureInfo.InvariantCulture))];
        var rows = Axis(0);
        var columns = Axis(1);
        return rows.Count > MaxGridAxis || columns.Count > MaxGridAxis ? null : (rows, columns);
    }

    private static void Refutations(StringBuilder html, ReportData data)
    {
        Section(html, "refutations", "Where the refuted identities fail",
            "For each refuted entry: the smallest integer point found where its sides differ, with both sides' exact values " +
            "(the least one when every smaller point was tried), and the difference lhs − rhs when it was recovered " +
            "(or its degree and number of terms when too large to write out).");
        if (data.RefutationsTotal == 0)
        {
            Empty(html, "No refutations.");
            html.Append("</section>\n");
            return;
        }
        html.Append("<table class=\"refutations\" data-table=\"refutations\"><thead><tr><th>entry</th><th>identity</th><th>fails at</th><th>difference</th></tr></thead><tbody>");
        foreach (var r in data.Refutations)
        {
            html.Append($"<tr data-key=\"{r.Id.ToString(CultureInfo.InvariantCulture)}\"><th title=\"{Encode(r.Catalogue)}\">{Encode(r.Label)}</th>");
            html.Append($"<td><code>{Encode(r.Identity)}</code></td>");
            html.Append(r.Counterexample is null
                ? "<td class=\"empty\">not found within the budget</td>"
                : $"<td class=\"fails\" title=\"{Encode(r.Smallness ?? "")}\">{Encode(r.Counterexample)}</td>");
            html.Append(r.Difference is null ? "<td class=\"empty\">not recovered</td>" : $"<td><code>{Encode(r.Difference)}</code></td>");
            html.Append("</tr>");
        }
        html.Append("</tbody></table>\n");
        if (data.RefutationsTotal > data.Refutations.Count)
            html.Append($"<p class=\"note\">The first {Count(data.Refutations.Count)} of {Count(data.RefutationsTotal)} refutations; the rest are in the <code>counterexamples</code> and <code>differences</code> views.</p>\n");
        html.Append("</section>\n");
    }

    private static void Rejections(StringBuilder html, ReportData data)
    {
        Section(html, "rejections", "Rejected at import",
            "Entries that could not be imported, with the reason (position and problem); the rest of each file was imported.");
        if (data.RejectionsTotal == 0)
        {
            Empty(html, "No rejections.");
            html.Append("</section>\n");
            return;
        }
        html.Append("<table class=\"rejections\" data-table=\"rejections\"><thead><tr><th>source</th><th>line</th><th>raw</th><th>reason</th></tr></thead><tbody>");
        foreach (var r in data.Rejections)
        {
            var raw = r.Raw.Length <= RawShown ? r.Raw : r.Raw[..RawShown] + "…";
            html.Append($"<tr data-key=\"{Encode(r.Source + ":" + r.Line.ToString(CultureInfo.InvariantCulture))}\"><td class=\"source\" title=\"{Encode(r.Catalogue)}\">{Encode(r.Source)}</td>");
            html.Append($"<td>{r.Line.ToString(CultureInfo.InvariantCulture)}</td><td><code>{Encode(raw)}</code></td><td>{Encode(r.Reason)}</td></tr>");
        }
        html.Append("</tbody></table>\n");
        if (data.RejectionsTotal > data.Rejections.Count)
            html.Append($"<p class=\"note\">The first {Count(data.Rejections.Count)} of {Count(data.RejectionsTotal)} rejections; the rest are in the <code>rejection</code> table.</p>\n");
        html.Append("</section>\n");
    }

    private static string Percent(long part, long whole) =>
        whole == 0 ? "0%" : (100.0 * part / whole).ToString("0", CultureInfo.InvariantCulture) + "%";

    private const string Css = """

        :root { --ink: #22262d; --muted: #5b616b; --paper: #f4f1ea; --card: #fffdf9; --rule: #ddd6c8; --accent: #3d5a80; }
        * { box-sizing: border-box; }
        body { margin: 0; background: var(--paper); color: var(--ink); font: 14px/1.5 system-ui, -apple-system, "Segoe UI", "DejaVu Sans", sans-serif; }
        header { padding: 28px 40px 18px; border-bottom: 3px solid var(--accent); background: var(--card); }
        .kicker { margin: 0; text-transform: uppercase; letter-spacing: .12em; font-size: 11px; color: var(--accent); font-weight: 600; }
        h1 { margin: 4px 0 2px; font-size: 26px; font-weight: 650; }
        .meta { margin: 0; color: var(--muted); font-size: 12.5px; }
        main { max-width: 1120px; margin: 0 auto; padding: 18px 40px 30px; }
        .caveat { margin: 8px 0 18px; padding: 12px 16px; border-left: 4px solid #d9a21b; background: #fbf3dc; border-radius: 0 6px 6px 0; }
        .tiles { display: grid; grid-template-columns: repeat(6, 1fr); gap: 10px; margin-bottom: 18px; }
        .tile { background: var(--card); border: 1px solid var(--rule); border-radius: 8px; padding: 10px 12px; display: flex; flex-direction: column; }
        .tile .n { font-size: 22px; font-weight: 650; font-variant-numeric: tabular-nums; }
        .tile .c { color: var(--muted); font-size: 12px; }
        .tile-survived .n { color: #2f8f6b; } .tile-refuted .n { color: #c8553d; } .tile-rejections .n { color: #7d6b91; }
        section { background: var(--card); border: 1px solid var(--rule); border-radius: 8px; padding: 14px 20px 16px; margin-bottom: 16px; }
        section.tiles { background: none; border: 0; padding: 0; }
        h2 { margin: 0 0 2px; font-size: 17px; font-weight: 650; }
        .lead { margin: 0 0 10px; color: var(--muted); }
        .note { color: var(--muted); font-size: 12.5px; margin: 8px 0 0; }
        .empty { color: var(--muted); font-style: italic; }
        .figure { overflow-x: auto; }
        svg.chart { display: block; max-width: 100%; height: auto; }
        td.strip { min-width: 300px; }
        td.strip svg.chart { display: inline-block; max-width: none; }
        tr.group th { padding-top: 12px; color: var(--accent); font-size: 13px; border-bottom: 1px solid var(--rule); background: var(--card); }
        table { border-collapse: collapse; width: 100%; margin-top: 10px; font-size: 12.5px; }
        th, td { text-align: left; padding: 4px 8px; border-bottom: 1px solid #ece6da; vertical-align: top; }
        thead th { color: var(--muted); font-weight: 600; border-bottom: 2px solid var(--rule); white-space: nowrap; }
        tbody tr:nth-child(even) { background: #faf7f1; }
        table.numbers td, table.numbers tfoot td { text-align: right; font-variant-numeric: tabular-nums; }
        table.numbers td.zero { color: #b4b0a8; }
        table.numbers tfoot td, table.numbers tfoot th { border-top: 2px solid var(--rule); font-weight: 600; }
        .dot { display: inline-block; width: 9px; height: 9px; border-radius: 2px; margin-right: 4px; vertical-align: baseline; }
        .tag { display: inline-block; white-space: nowrap; padding: 0 6px; border-radius: 9px; background: #f6dcd5; color: #8c3a28; font-size: 11px; font-weight: 500; }
        table.families td:nth-child(n+2):nth-child(-n+5) { text-align: right; font-variant-numeric: tabular-nums; }
        table.families tbody th { white-space: nowrap; }
        td.fails { color: #8c3a28; }
        td.first { color: #8c3a28; font-size: 12px; }
        p.words { margin: 0 0 4px; }
        p.legend { margin: 4px 0 0; color: var(--muted); font-size: 11.5px; }
        p.legend .key { margin-right: 10px; white-space: nowrap; }
        td.source { word-break: break-all; max-width: 260px; color: var(--muted); }
        code { font-family: ui-monospace, "DejaVu Sans Mono", monospace; font-size: 12px; word-break: break-all; }
        footer { max-width: 1120px; margin: 0 auto; padding: 0 40px 30px; color: var(--muted); font-size: 12px; }

        """;
}
