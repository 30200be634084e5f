using IdentityQueue.Screening.HandOff;

namespace IdentityQueue.Screening.Tests.HandOff;

/// <summary>The LaTeX and Markdown tables of survivors with their evidence.</summary>
public sealed class EvidenceTableTests
{
    private static readonly HandOffCandidate[] Rows =
    [
        new(3, "vdm[n=3]", "vdm", "{\"n\":3}", "det(matrix(i in 1..n, j in 1..n: x[i]^(j - 1)))", "prod(i in 1..n: prod(j in i + 1..n: x[j] - x[i]))", "Q", "survived", "3", -70.25, 5),
        new(9, "two_squares #1", null, null, "(a^2 + b^2)*(c^2 + d^2)", "(a*c - b*d)^2 + (a*d + b*c)^2", "Q", "survived", "4", -66.0, 3),
    ];

    [Fact]
    public void Latex_IsALongtableWithEscapedTextMathIdentitiesAndTheCaution()
    {
        var tex = EvidenceTable.Latex(Rows, "survived");
        Assert.Contains(@"\begin{longtable}", tex);
        Assert.Contains(@"\end{longtable}", tex);
        Assert.Contains("very likely true, not proven; the error bound is only as good as the degree bound", tex);
        Assert.Contains(@"\texttt{two\_squares \#1}", tex);
        Assert.Contains(@"$n=3$", tex);
        Assert.Contains(@"$\det \left(x_{i}^{j - 1}\right)", tex);
        Assert.Contains(@"$2^{-70.2}$", tex);
        Assert.Contains(@"$2^{-66.0}$", tex);
        var rows = tex.Split('\n').Where(l => l.StartsWith(@"\texttt{", StringComparison.Ordinal)).ToList();
        Assert.Equal(2, rows.Count);
        Assert.All(rows, r => Assert.EndsWith(@" \\", r));
        Assert.Equal(7, rows[0].Split(" & ").Length);
    }

    [Fact]
    public void Latex_FallsBackToTypewriterTextForAnUnparsableSide()
    {
        var tex = EvidenceTable.Latex([Rows[0] with { Lhs = "(x +" }], "survived");
        Assert.Contains(@"\texttt{(x + = prod", tex);
    }

    [Fact]
    public void Markdown_IsAPipeTableWithTheEvidenceAndTheCaution()
    {
        var md = EvidenceTable.Markdown(Rows, "survived");
        var lines = md.Split('\n');
        Assert.Contains("| Label | Family | Parameters | Identity | Degree bound | Trials | Error bound |", lines);
        Assert.Contains("| `vdm[n=3]` | `vdm` | n=3 | `det(matrix(i in 1..n, j in 1..n: x[i]^(j - 1))) = prod(i in 1..n: prod(j in i + 1..n: x[j] - x[i]))` | 3 | 5 | 2^-70.2 |", lines);
        Assert.Contains("very likely true, not proven", md);
    }

    [Fact]
    public void ErrorBound_IsRoundedUp_NeverShownStrongerThanStored()
    {
        Assert.Equal("-70.2", Rows[0].ErrorBoundExponent);
        Assert.Equal("-64.0", (Rows[0] with { ErrorBoundLog2 = -64.04 }).ErrorBoundExponent);
        Assert.Null((Rows[0] with { ErrorBoundLog2 = null }).ErrorBoundExponent);
    }
}
