using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Syntax;

/// <summary>
/// <c>let</c> lines: a definition is used by the lines after it in the same file, written out into the entry's tree (so the
/// printed sides stand alone), with call-by-name substitution that never lets a bound variable capture a name.
/// </summary>
public class DefinitionTests
{
    private static (DefinitionScope Scope, List<IdentityEntry> Entries, List<Diagnostic> Errors) File(params string[] lines)
    {
        var scope = new DefinitionScope();
        var entries = new List<IdentityEntry>();
        var errors = new List<Diagnostic>();
        for (var i = 0; i < lines.Length; i++)
        {
            var result = CatalogueParser.ParseLine(lines[i], i + 1, null, scope);
            if (!result.Success) errors.Add(result.Error!);
            else if (result.Value is { } entry) entries.Add(entry);
        }
        return (scope, entries, errors);
    }

    private static string Printed(string definitions, string line)
    {
        var (_, entries, errors) = File(definitions.Split('\n').Append(line).ToArray());
        Assert.Empty(errors);
        var entry = Assert.Single(entries);
        return ExprPrinter.Print(entry.Left);
    }

    private static Diagnostic Error(params string[] lines)
    {
        var (_, _, errors) = File(lines);
        return Assert.Single(errors);
    }

    [Fact]
    public void Use_IsWrittenOutWithItsArguments()
    {
        Assert.Equal("sum(i in 0..n - 1: x^i*y^(n - 1 - i))", Printed("let h(k, x, y) = sum(i in 0..k: x^i*y^(k - i))", "h(n - 1, x, y) = 0"));
        // The argument keeps its tree: (a + b) stays one operand of '^'.
        Assert.Equal("(a + b)^2*c", Printed("let sq(t) = t^2", "sq(a + b)*c = 0"));
        // A definition without parameters is a name.
        Assert.Equal("[[a, b], [c, d]]^2 - tr([[a, b], [c, d]])*[[a, b], [c, d]]", Printed("let A = [[a, b], [c, d]]", "A^2 - tr(A)*A = 0"));
    }

    [Fact]
    public void Definitions_MayUseEarlierOnes()
    {
        Assert.Equal("(x + 1)^2 + (x + 1)^2", Printed("let f(t) = t + 1\nlet g(t) = f(t)^2", "g(x) + g(x) = 0"));
    }

    [Fact]
    public void BoundVariableOfTheBody_IsRenamedAgainstTheArguments()
    {
        // Without renaming, h(i)'s argument i would be captured by the body's sum over i.
        Assert.Equal("sum(i_1 in 1..3: i_1*x) + i", Printed("let f(t) = sum(i in 1..3: i*x) + t", "f(i) = 0"));
        Assert.Equal("sum(i in 1..3: sum(i_1 in 1..i: x[i_1]))", Printed("let s(m) = sum(i in 1..m: x[i])", "sum(i in 1..3: s(i)) = 0"));
    }

    [Fact]
    public void IndexedParameter_TakesAVariableName()
    {
        Assert.Equal("a[1]*a[2]", Printed("let e2(v) = v[1]*v[2]", "e2(a) = 0"));
        Assert.Contains("must be a variable name", Error("let e2(v) = v[1]*v[2]", "e2(a + b) = 0").Message);
    }

    [Fact]
    public void ScopeIsTheFile_AndOrderMatters()
    {
        var (scope, _, errors) = File("x*f(1) = 0", "let f(t) = t");
        Assert.Equal(1, scope.Count);
        Assert.Contains("unknown function 'f'", Assert.Single(errors).Message);
        // Another file (another scope) does not see it.
        Assert.False(CatalogueParser.ParseLine("f(1) = 0", 1, null, new DefinitionScope()).Success);
    }

    [Theory]
    [InlineData("line 2, column 5: 'f' is already defined on line 1", "let f(t) = t", "let f(u) = u")]
    [InlineData("line 1, column 12: 'f' is used in its own definition", "let f(n) = f(n - 1) + 1")]
    [InlineData("line 1, column 5: 'det' is a reserved word", "let det(m) = m")]
    [InlineData("line 2, column 1: 'f' (defined on line 1) takes 2 arguments, got 1", "let f(a, b) = a*b", "f(x) = 0")]
    [InlineData("line 2, column 1: 'c' (defined on line 1) has no parameters", "let c = 3", "c(1) = 0")]
    [InlineData("line 2, column 5: 'c' is defined by a let line and cannot be a bound variable", "let c = 3", "sum(c in 1..2: x) = 0")]
    [InlineData("line 2, column 11: 'c' is defined by a let line and cannot be a family parameter", "let c = 3", "x = x for c in 1..2")]
    [InlineData("line 2, column 16: the definition of 'g' uses the variable 'k'", "let g = x^k", "sum(k in 1..2: g) = 0")]
    [InlineData("line 2, column 1: the definition of 'g' uses the variable 'n', which here would be the family parameter", "let g = binom(x, 2)*n", "g = 0 for n in 1..3")]
    [InlineData("line 2, column 12: the definition of 'g' uses the variable 'q', which here would be the parameter 'q'", "let g = q^2", "let f(q) = g + q")]
    [InlineData("line 1, column 1: a definition (let NAME = EXPR) can only stand", "let f = 1")]
    public void BadDefinitionsAndUses_NameTheLineColumnAndProblem(string expected, params string[] lines)
    {
        if (lines.Length == 1 && lines[0] == "let f = 1")
        {
            // Without a file scope (a .jsonl field, a stored side) a let line is refused.
            var result = CatalogueParser.ParseLine(lines[0], 1);
            Assert.StartsWith(expected, result.Error!.ToString());
            return;
        }
        Assert.StartsWith(expected, Error(lines).ToString());
    }

    [Fact]
    public void Expansion_IsBoundedByMaxExpandedNodes()
    {
        // f_i(t) holds 2^(2^i) copies of t: f4 (65,536 copies, about 131,000 nodes) is the first over the limit of 100,000.
        var lines = new List<string> { "let f0(t) = t*t" };
        for (var i = 1; i <= 20; i++) lines.Add($"let f{i}(t) = f{i - 1}(f{i - 1}(t))");
        lines.Add("f20(x) = 0");
        var (scope, _, errors) = File([.. lines]);
        Assert.Contains("the limit MaxExpandedNodes", errors[0].Message);
        // The refused definition is not defined, so the lines after it that use it say so.
        Assert.All(errors.Skip(1), e => Assert.Contains("unknown function", e.Message));
        Assert.Equal(4, scope.Count);
    }

    [Fact]
    public void JacobiTrudi_WithDefinitions_CompilesToTheSchurPolynomial()
    {
        // Jacobi–Trudi: s_λ = det(h_{λ_i − i + j}), and s_λ = a_{λ+δ}/a_δ (bialternant) — Macdonald, "Symmetric functions and Hall
        // polynomials", I (3.4) and (5.4) [memory]. λ = (3, 1, 0) in three variables; h_k is written once and used nine times.
        var (_, entries, errors) = File(
            "let h(k) = sum(a in 0..k: sum(b in 0..k - a: x[1]^a*x[2]^b*x[3]^(k - a - b)))",
            "let lam(i) = when(i = 1, 3, when(i = 2, 1, 0))",
            "det(matrix(i in 1..3, j in 1..3: h(lam(i) - i + j))) = det(matrix(i in 1..3, j in 1..3: x[j]^(lam(i) + 3 - i)))/det(matrix(i in 1..3, j in 1..3: x[j]^(3 - i)))");
        Assert.Empty(errors);
        var compiled = IdentityCompiler.Compile(Assert.Single(entries));
        Assert.True(compiled.Success, compiled.Error?.ToString());
        // s_(3,1) has degree 4; the bialternant's numerator has degree |λ| + |δ| = 7 and the denominator 3.
        Assert.Equal(new BigInteger(10), compiled.Value!.Bounds.Degree);
    }
}
