using System.Globalization;
using System.Text;
using IdentityQueue.Store;
using IdentityQueue.Store.Read;
using static IdentityQueue.Cli.Report.SvgCharts;

namespace IdentityQueue.Cli.Report;

/// <summary>The report's equivalence groups (#15 point 4): the first <see cref="EquivalenceSection.MaxGroups"/> groups and the totals.</summary>
/// <param name="Groups">The groups listed, by representative id.</param>
/// <param name="GroupCount">Groups in all.</param>
/// <param name="MemberCount">Members in all (entries after the first of their group).</param>
internal sealed record EquivalenceInfo(IReadOnlyList<EquivalenceGroupRow> Groups, long GroupCount, long MemberCount)
{
    public static readonly EquivalenceInfo None = new([], 0, 0);

    /// <summary>The groups of the selected catalogues, through the store's read model.</summary>
    public static EquivalenceInfo Load(StoreConnection store, IReadOnlyList<string> catalogues)
    {
        var (groups, groupCount, memberCount) = EquivalenceReads.Groups(store, catalogues, EquivalenceSection.MaxGroups);
        return new EquivalenceInfo(groups, groupCount, memberCount);
    }
}

/// <summary>The section "Same identity, written differently": a pure function of <see cref="ReportData.Equivalence"/>.</summary>
internal static class EquivalenceSection
{
    /// <summary>Groups listed in the report (the view <c>equivalents</c> has them all).</summary>
    public const int MaxGroups = 50;

    public static void Append(StringBuilder html, ReportData data)
    {
        var info = data.Equivalence;
        html.Append("<section id=\"equivalents\">\n<h2>Same identity, written differently</h2>\n<p class=\"lead\">")
            .Append("Entries whose fingerprints agree (both sides evaluated at fixed random points of the catalogue's seed modulo ")
            .Append("two large primes, sides swapped counting as the same) are one identity up to the chance given (Schwartz–Zippel). ")
            .Append("The first entry of a group is screened; the others share its result, marked as shared. ")
            .Append("From the <code>equivalents</code> view.</p>\n");
        if (info.GroupCount == 0)
        {
            html.Append("<p class=\"empty\">No entry is the same identity as another.</p>\n</section>\n");
            return;
        }
        html.Append("<table class=\"equivalents\" data-table=\"equivalents\"><thead><tr><th>screened</th><th>state</th><th>the same identity written as</th></tr></thead><tbody>");
        foreach (var g in info.Groups)
        {
            html.Append(CultureInfo.InvariantCulture, $"<tr data-key=\"{g.RepresentativeId}\" data-members=\"{g.Members.Count}\"><th title=\"{Encode(g.Catalogue)}\">{Encode(g.RepresentativeLabel)}</th>");
            html.Append($"<td>{Encode(g.State)}</td><td>");
            html.Append(string.Join(", ", g.Members.Select(m =>
                Encode(m.Label) + (m.Swapped ? " <span class=\"tag\">swapped</span>" : "") + (m.Shared ? "" : " <span class=\"tag\">not shared</span>")
                + (m.FalseMatchBits is { } k ? $" <span class=\"note\">≤ 2<sup>−{k.ToString(CultureInfo.InvariantCulture)}</sup></span>" : ""))));
            html.Append("</td></tr>");
        }
        html.Append("</tbody></table>\n");
        html.Append(CultureInfo.InvariantCulture, $"<p class=\"note\">{info.GroupCount} group{(info.GroupCount == 1 ? "" : "s")}, {info.MemberCount} entr{(info.MemberCount == 1 ? "y shares" : "ies share")} a result")
            .Append(info.Groups.Count < info.GroupCount ? $"; the first {info.Groups.Count} are listed, the rest are in the <code>equivalents</code> view" : "")
            .Append(". Chance bounds are of a false match per entry.</p>\n</section>\n");
    }
}
