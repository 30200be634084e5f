using System.Globalization;
using System.Net;
using System.Text;
using IdentityQueue.Store.Schema;

namespace IdentityQueue.Cli.Report;

/// <summary>One bar or histogram column: its label, its value and its fill colour.</summary>
internal sealed record Bar(string Label, long Value, string Color);

/// <summary>One square of a strip chart: a family instance, its tooltip and its state.</summary>
internal sealed record StripCell(string Title, string State);

/// <summary>One square of a grid chart: a family instance in two parameters, at row value <c>Row</c> and column value <c>Column</c>.</summary>
internal sealed record GridCell(string Row, string Column, string Title, string State);

/// <summary>
/// Small charts as inline SVG text, for embedding in an HTML page (no namespace declaration, no scripts, no external
/// references). Every data mark is a <c>rect</c> with <c>class="mark"</c> and <c>data-*</c> attributes carrying its
/// label and value, so that a browser's DOM can be checked against the data. Pure functions of their arguments.
/// </summary>
internal static class SvgCharts
{
    /// <summary>Fill colours per result state: final states saturated, states in flight pale.</summary>
    public static readonly IReadOnlyDictionary<string, string> StateColors = new Dictionary<string, string>
    {
        [ResultStates.Pending] = "#b9c3cf",
        [ResultStates.Queued] = "#9aaec4",
        [ResultStates.Screening] = "#6f93bb",
        [ResultStates.Refuted] = "#c8553d",
        [ResultStates.Survived] = "#2f8f6b",
        [ResultStates.Undecided] = "#d9a21b",
        [ResultStates.Invalid] = "#7d6b91",
        [ResultStates.Failed] = "#7a1f14",
    };

    public static string ColorOf(ResultState state) => ColorOf(state.Text());

    public static string ColorOf(string state) => StateColors.TryGetValue(state, out var c) ? c : "#999999";

    private const int CharWidth = 7; // average width of a 12px sans-serif character, for laying out labels
    private const string Font = "font-size=\"12\"";

    /// <summary>Text for an HTML element or attribute value.</summary>
    public static string Encode(string text) => WebUtility.HtmlEncode(text);

    private static string N(double value) => Math.Round(value, 2).ToString("0.##", CultureInfo.InvariantCulture);

    /// <summary>Thousands separated, culture-invariant: 12,345.</summary>
    public static string Count(long value) => value.ToString("N0", CultureInfo.InvariantCulture);

    /// <summary>
    /// Horizontal bars, one row per bar, labels on the left and the value at the end of each bar. Marks carry
    /// <c>data-chart</c>, <c>data-label</c> and <c>data-value</c>.
    /// </summary>
    public static string HorizontalBars(string chart, string title, IReadOnlyList<Bar> bars, int width = 640)
    {
        const int rowHeight = 24, barHeight = 16, top = 6, gap = 8;
        var labelWidth = Math.Clamp(bars.Count == 0 ? 0 : bars.Max(b => b.Label.Length) * CharWidth + gap, 60, width / 2);
        var valueWidth = Math.Max(40, (bars.Count == 0 ? 1 : bars.Max(b => Count(b.Value).Length)) * CharWidth + gap);
        var plot = width - labelWidth - valueWidth;
        var max = bars.Count == 0 ? 0 : bars.Max(b => b.Value);
        var height = top * 2 + Math.Max(1, bars.Count) * rowHeight;
        var svg = Open(chart, title, width, height);
        svg.Append($"<line x1=\"{labelWidth}\" y1=\"{top - 2}\" x2=\"{labelWidth}\" y2=\"{height - top + 2}\" stroke=\"#8a8f98\" stroke-width=\"1\"/>");
        for (var i = 0; i < bars.Count; i++)
        {
            var b = bars[i];
            var y = top + i * rowHeight + (rowHeight - barHeight) / 2.0;
            var w = max == 0 ? 0 : plot * (double)b.Value / max;
            var label = Encode(b.Label);
            svg.Append($"<text x=\"{labelWidth - gap}\" y=\"{N(y + barHeight - 4)}\" text-anchor=\"end\" {Font} fill=\"#2b2f36\">{label}</text>");
            svg.Append($"<rect class=\"mark\" data-chart=\"{Encode(chart)}\" data-label=\"{label}\" data-value=\"{b.Value}\" " +
                $"x=\"{labelWidth}\" y=\"{N(y)}\" width=\"{N(w)}\" height=\"{barHeight}\" rx=\"2\" fill=\"{b.Color}\"><title>{label}: {Count(b.Value)}</title></rect>");
            svg.Append($"<text x=\"{N(labelWidth + w + 6)}\" y=\"{N(y + barHeight - 4)}\" {Font} fill=\"#2b2f36\">{Count(b.Value)}</text>");
        }
        return svg.Append("</svg>").ToString();
    }

    /// <summary>
    /// A histogram: one column per bin, left to right in the given order, with a count above each column, bin labels
    /// below (slanted when they do not fit), a few horizontal grid lines and a caption under the axis. Marks carry
    /// <c>data-chart</c>, <c>data-label</c> and <c>data-value</c>.
    /// </summary>
    public static string Columns(string chart, string title, IReadOnlyList<Bar> bins, string caption, int width = 1000)
    {
        const int top = 22, left = 48, right = 12, plotHeight = 190;
        var n = Math.Max(1, bins.Count);
        var column = (double)(width - left - right) / n;
        var longest = bins.Count == 0 ? 0 : bins.Max(b => b.Label.Length);
        var slanted = longest * CharWidth > column - 4;
        var labelBand = slanted ? (int)(longest * CharWidth * 0.72) + 16 : 22;
        var height = top + plotHeight + labelBand + 26;
        var baseY = top + plotHeight;
        var max = bins.Count == 0 ? 0 : bins.Max(b => b.Value);
        var (tickStep, axisMax) = NiceAxis(max);
        var svg = Open(chart, title, width, height);
        for (var t = 0L; t <= axisMax; t += tickStep)
        {
            var y = baseY - plotHeight * (double)t / axisMax;
            svg.Append($"<line x1=\"{left}\" y1=\"{N(y)}\" x2=\"{width - right}\" y2=\"{N(y)}\" stroke=\"{(t == 0 ? "#8a8f98" : "#e3e6ea")}\" stroke-width=\"1\"/>");
            svg.Append($"<text x=\"{left - 6}\" y=\"{N(y + 4)}\" text-anchor=\"end\" font-size=\"11\" fill=\"#5b616b\">{Count(t)}</text>");
        }
        for (var i = 0; i < bins.Count; i++)
        {
            var b = bins[i];
            var x = left + i * column;
            var h = axisMax == 0 ? 0 : plotHeight * (double)b.Value / axisMax;
            var w = Math.Max(1, column - Math.Min(6, column * 0.2));
            var label = Encode(b.Label);
            var cx = x + column / 2;
            svg.Append($"<rect class=\"mark\" data-chart=\"{Encode(chart)}\" data-label=\"{label}\" data-value=\"{b.Value}\" " +
                $"x=\"{N(x + (column - w) / 2)}\" y=\"{N(baseY - h)}\" width=\"{N(w)}\" height=\"{N(h)}\" fill=\"{b.Color}\"><title>{label}: {Count(b.Value)}</title></rect>");
            if (b.Value > 0)
                svg.Append($"<text x=\"{N(cx)}\" y=\"{N(baseY - h - 5)}\" text-anchor=\"middle\" font-size=\"11\" fill=\"#2b2f36\">{Count(b.Value)}</text>");
            svg.Append(slanted
                ? $"<text x=\"{N(cx)}\" y=\"{baseY + 14}\" text-anchor=\"end\" font-size=\"11\" fill=\"#2b2f36\" transform=\"rotate(-35 {N(cx)} {baseY + 14})\">{label}</text>"
                : $"<text x=\"{N(cx)}\" y=\"{baseY + 16}\" text-anchor=\"middle\" font-size=\"11\" fill=\"#2b2f36\">{label}</text>");
        }
        svg.Append($"<text x=\"{N(left + (width - left - right) / 2.0)}\" y=\"{height - 8}\" text-anchor=\"middle\" {Font} fill=\"#5b616b\">{Encode(caption)}</text>");
        return svg.Append("</svg>").ToString();
    }

    /// <summary>
    /// A strip of squares, one per cell in order, wrapping after <paramref name="perRow"/>; each square is coloured by
    /// its state and carries <c>data-state</c> and a tooltip.
    /// </summary>
    public static string Strip(string chart, string title, IReadOnlyList<StripCell> cells, int perRow = 40)
    {
        const int size = 10, gap = 2;
        var columns = Math.Clamp(cells.Count, 1, perRow);
        var rows = Math.Max(1, (cells.Count + perRow - 1) / perRow);
        var width = columns * (size + gap);
        var height = rows * (size + gap);
        var svg = Open(chart, title, width, height);
        for (var i = 0; i < cells.Count; i++)
        {
            var c = cells[i];
            var x = i % perRow * (size + gap);
            var y = i / perRow * (size + gap);
            svg.Append($"<rect class=\"mark\" data-chart=\"{Encode(chart)}\" data-state=\"{Encode(c.State)}\" x=\"{x}\" y=\"{y}\" width=\"{size}\" height=\"{size}\" rx=\"1.5\" " +
                $"fill=\"{ColorOf(c.State)}\"><title>{Encode(c.Title)}: {Encode(c.State)}</title></rect>");
        }
        return svg.Append("</svg>").ToString();
    }

    /// <summary>
    /// The mark drawn inside a state's square besides its colour, so that a grid or strip reads without colour too:
    /// ✓ survived, × refuted, ! invalid or failed, ? undecided, nothing for the states in flight.
    /// </summary>
    public static string SymbolOf(string state) => state switch
    {
        ResultStates.Survived => "✓",
        ResultStates.Refuted => "×",
        ResultStates.Invalid or ResultStates.Failed => "!",
        ResultStates.Undecided => "?",
        _ => "",
    };

    /// <summary>
    /// A grid of squares for a family in two parameters: one row per value of the first parameter (<paramref name="rows"/>,
    /// top to bottom), one column per value of the second (<paramref name="columns"/>, left to right), each cell coloured by
    /// its state and marked with <see cref="SymbolOf"/>; a cell with no instance is an empty outline. Each square is a
    /// <c>rect class="mark"</c> with <c>data-state</c>, <c>data-row</c>, <c>data-column</c> and a tooltip.
    /// </summary>
    public static string Grid(string chart, string title, string rowName, IReadOnlyList<string> rows, string columnName,
        IReadOnlyList<string> columns, IReadOnlyList<GridCell> cells)
    {
        const int size = 18, gap = 2, top = 34;
        var rowLabel = rows.Count == 0 ? 0 : rows.Max(r => r.Length);
        var left = Math.Max(40, (rowName.Length + 3 + rowLabel) * CharWidth + 8);
        var width = left + Math.Max(1, columns.Count) * (size + gap) + 4;
        var height = top + Math.Max(1, rows.Count) * (size + gap) + 4;
        var svg = Open(chart, title, width, height);
        svg.Append($"<text x=\"{left}\" y=\"12\" font-size=\"11\" fill=\"#5b616b\">{Encode(columnName)} →</text>");
        for (var j = 0; j < columns.Count; j++)
            svg.Append($"<text x=\"{N(left + j * (size + gap) + size / 2.0)}\" y=\"{top - 6}\" text-anchor=\"middle\" font-size=\"10\" fill=\"#2b2f36\">{Encode(columns[j])}</text>");
        for (var i = 0; i < rows.Count; i++)
            svg.Append($"<text x=\"{left - 6}\" y=\"{top + i * (size + gap) + 13}\" text-anchor=\"end\" font-size=\"11\" fill=\"#2b2f36\">{Encode(rowName)} = {Encode(rows[i])}</text>");
        var at = cells.GroupBy(c => (c.Row, c.Column)).ToDictionary(g => g.Key, g => g.First());
        for (var i = 0; i < rows.Count; i++)
            for (var j = 0; j < columns.Count; j++)
            {
                var x = left + j * (size + gap);
                var y = top + i * (size + gap);
                if (!at.TryGetValue((rows[i], columns[j]), out var c))
                {
                    svg.Append($"<rect x=\"{N(x + 0.5)}\" y=\"{N(y + 0.5)}\" width=\"{size - 1}\" height=\"{size - 1}\" rx=\"2\" fill=\"none\" stroke=\"#d6d9de\"/>");
                    continue;
                }
                svg.Append($"<rect class=\"mark\" data-chart=\"{Encode(chart)}\" data-state=\"{Encode(c.State)}\" data-row=\"{Encode(c.Row)}\" data-column=\"{Encode(c.Column)}\" " +
                    $"x=\"{x}\" y=\"{y}\" width=\"{size}\" height=\"{size}\" rx=\"2\" fill=\"{ColorOf(c.State)}\"><title>{Encode(c.Title)}: {Encode(c.State)}</title></rect>");
                var symbol = SymbolOf(c.State);
                if (symbol.Length > 0)
                    svg.Append($"<text x=\"{N(x + size / 2.0)}\" y=\"{y + 13}\" text-anchor=\"middle\" font-size=\"12\" fill=\"#ffffff\" aria-hidden=\"true\">{symbol}</text>");
            }
        return svg.Append("</svg>").ToString();
    }

    /// <summary>A grid step of 1, 2 or 5 × 10^k giving at most five steps up to at least <paramref name="max"/>, and that top.</summary>
    internal static (long Step, long Top) NiceAxis(long max)
    {
        if (max <= 0) return (1, 1);
        var step = 1L;
        while (true)
        {
            foreach (var m in new[] { 1L, 2L, 5L })
                if (step * m * 5 >= max) return (step * m, (max + step * m - 1) / (step * m) * (step * m));
            step *= 10;
        }
    }

    private static StringBuilder Open(string chart, string title, int width, int height) =>
        new StringBuilder().Append($"<svg class=\"chart\" data-chart=\"{Encode(chart)}\" role=\"img\" aria-label=\"{Encode(title)}\" ")
            .Append($"width=\"{width}\" height=\"{height}\" viewBox=\"0 0 {width} {height}\" font-family=\"inherit\"><title>{Encode(title)}</title>");
}
