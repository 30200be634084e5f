using System.Text;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// Tables of screened candidates with their evidence, ready for a paper's appendix: LaTeX (a <c>longtable</c>, identities
/// as math) and Markdown (a pipe table, identities as code). Columns: label, family, parameters, identity, degree bound
/// D, trials, error bound 2^x, and, when some candidate is a refutation with details, where it fails (the smallest
/// counterexample and the recovered difference lhs − rhs, in words); the caption and the closing note carry the caution.
/// Stateless; thread-safe.
/// </summary>
public static class EvidenceTable
{
    private const string Columns = "Label & Family & Parameters & Identity & $D$ & Trials & Error bound";

    private const string FailsColumn = "Where it fails";

    /// <summary>A LaTeX fragment (needs <c>\usepackage{longtable,amsmath,amssymb}</c>); <paramref name="selection"/> names the states shown.</summary>
    public static string Latex(IReadOnlyList<HandOffCandidate> candidates, string selection)
    {
        var details = candidates.Any(c => c.HasRefutationDetails);
        var columns = details ? $"{Columns} & {FailsColumn} \\\\" : $"{Columns} \\\\";
        var text = new StringBuilder();
        text.AppendLine("% Written by idq export --format tex. Needs \\usepackage{longtable,amsmath,amssymb}.");
        text.AppendLine(details
            ? "\\begin{longtable}{@{}l l l p{0.3\\textwidth} r r l p{0.3\\textwidth}@{}}"
            : "\\begin{longtable}{@{}l l l p{0.42\\textwidth} r r l@{}}");
        text.AppendLine($"\\caption{{{Count(candidates.Count)} identities ({LatexPrinter.Escape(selection)}) screened by random evaluation over finite fields: very likely true, not proven; the error bound is only as good as the degree bound $D$.}}\\\\");
        text.AppendLine("\\hline");
        text.AppendLine(columns);
        text.AppendLine("\\hline");
        text.AppendLine("\\endfirsthead");
        text.AppendLine("\\hline");
        text.AppendLine(columns);
        text.AppendLine("\\hline");
        text.AppendLine("\\endhead");
        text.AppendLine("\\hline");
        text.AppendLine($"\\multicolumn{{{(details ? 8 : 7)}}}{{@{{}}p{{0.95\\textwidth}}@{{}}}}{{\\footnotesize {LatexPrinter.Escape(SmtLibWriter.Caution)} An identity with error bound $2^{{x}}$ would have survived, were it false, with probability at most $2^{{x}}$, given the degree bound $D$ of lhs $-$ rhs.}}\\\\");
        text.AppendLine("\\endlastfoot");
        foreach (var c in candidates)
        {
            var cells = new[]
            {
                $"\\texttt{{{LatexPrinter.Escape(c.Label)}}}",
                c.Family is null ? "" : $"\\texttt{{{LatexPrinter.Escape(c.Family)}}}",
                ParamsMath(c),
                IdentityLatex(c),
                c.DegreeBound is null ? "" : $"${LatexPrinter.Escape(c.DegreeBound)}$",
                c.Trials.ToString(System.Globalization.CultureInfo.InvariantCulture),
                c.ErrorBoundExponent is { } e ? $"$2^{{{e}}}$" : LatexPrinter.Escape(c.State ?? ""),
            };
            if (details) cells = [.. cells, FailsLatex(c)];
            text.Append(string.Join(" & ", cells)).AppendLine(" \\\\");
        }
        text.AppendLine("\\end{longtable}");
        return text.ToString();
    }

    /// <summary>A Markdown pipe table followed by the caution; <paramref name="selection"/> names the states shown.</summary>
    public static string Markdown(IReadOnlyList<HandOffCandidate> candidates, string selection)
    {
        var text = new StringBuilder();
        text.AppendLine($"{Count(candidates.Count)} identities ({selection}) screened by idq.");
        text.AppendLine();
        var details = candidates.Any(c => c.HasRefutationDetails);
        text.AppendLine("| Label | Family | Parameters | Identity | Degree bound | Trials | Error bound |" + (details ? $" {FailsColumn} |" : ""));
        text.AppendLine("| --- | --- | --- | --- | ---: | ---: | --- |" + (details ? " --- |" : ""));
        foreach (var c in candidates)
        {
            var cells = new[]
            {
                Code(c.Label),
                c.Family is null ? "" : Code(c.Family),
                Cell(c.ParamsText),
                Code(c.Identity),
                Cell(c.DegreeBound ?? ""),
                c.Trials.ToString(System.Globalization.CultureInfo.InvariantCulture),
                c.ErrorBoundExponent is { } e ? $"2^{e}" : Cell(c.State ?? ""),
            };
            if (details) cells = [.. cells, string.Join("; ", new[] { c.CounterexampleText, c.DifferenceText }.OfType<string>().Select(Code))];
            text.Append("| ").Append(string.Join(" | ", cells)).AppendLine(" |");
        }
        text.AppendLine();
        text.AppendLine($"*{SmtLibWriter.Caution} An error bound 2^x means that a false identity would have survived with probability at most 2^x, given the degree bound of lhs − rhs.*");
        return text.ToString();
    }

    private static string Count(int n) => n.ToString(System.Globalization.CultureInfo.InvariantCulture);

    /// <summary>The identity as LaTeX math; the catalogue text in <c>\texttt</c> when a side does not parse.</summary>
    private static string IdentityLatex(HandOffCandidate c)
    {
        var left = CatalogueParser.ParseExpression(c.Lhs);
        var right = CatalogueParser.ParseExpression(c.Rhs);
        var field = CatalogueParser.ParseField(c.Field);
        if (!left.Success || !right.Success || !field.Success) return $"\\texttt{{{LatexPrinter.Escape(c.Identity)}}}";
        try
        {
            return $"${LatexPrinter.Print(left.Value, right.Value, field.Value)}$";
        }
        catch (InsufficientExecutionStackException)
        {
            return $"\\texttt{{{LatexPrinter.Escape(c.Identity)}}}";
        }
    }

    /// <summary>The refutation details as text cells of a paragraph column, the counterexample first.</summary>
    private static string FailsLatex(HandOffCandidate c) =>
        string.Join(" \\newline ", new[] { c.CounterexampleText, c.DifferenceText }.OfType<string>().Select(t => $"\\texttt{{{LatexPrinter.Escape(t)}}}"));

    private static string ParamsMath(HandOffCandidate c)
    {
        var text = c.ParamsText;
        return text.Length == 0 ? "" : $"${LatexPrinter.Escape(text).Replace(", ", ",\\ ")}$";
    }

    private static string Cell(string s) => s.Replace("|", "\\|").Replace('\n', ' ').Replace('\r', ' ');

    private static string Code(string s) => s.Contains('`') ? Cell(s) : $"`{Cell(s)}`";
}
