using System.Text.Json;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// Matrices as researchers build them: the Pfaffian of a matrix that is skew-symmetric as values, 0×0 matrices, entries of
/// matrix expressions, inverse, adjugate, minors by row and column lists, diag, id and zero. Right-hand sides from
/// Debian's python3-sympy (tests/fixtures/matrix-identities.jsonl, made by make_matrix_fixture.py) and published formulas.
/// </summary>
public class MatrixConstructTests
{
    private sealed record Case(string Label, string Lhs, string Rhs, string Source);

    public static TheoryData<string> FixtureLabels() => new(Fixture().Select(c => c.Label));

    private static IEnumerable<Case> Fixture()
    {
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "matrix-identities.jsonl");
        var options = new JsonSerializerOptions { PropertyNameCaseInsensitive = true };
        foreach (var line in File.ReadLines(path))
            if (line.Length > 0) yield return JsonSerializer.Deserialize<Case>(line, options)!;
    }

    // sympy's answers (the source of each is in the fixture line): each identity survives, and with the right-hand side
    // doubled it is refuted.
    [Theory]
    [MemberData(nameof(FixtureLabels))]
    public void SympyAnswers_Survive_AndDoubledAnswersAreRefuted(string label)
    {
        var c = Fixture().Single(x => x.Label == label);
        var r = Some.Screen($"{c.Lhs} = {c.Rhs}");
        Assert.True(r.Verdict == Verdict.Survived, $"{label}: {r.Verdict} {r.Message} {r.Witness?.Entry}");
        var f = Some.Screen($"{c.Lhs} = 2*({c.Rhs})");
        Assert.True(f.Verdict == Verdict.Refuted, $"{label} doubled: {f.Verdict} {f.Message}");
    }

    // Cayley (1849): pf(A)² = det(A) for a skew-symmetric A; here A = S − Sᵀ for a generic S of order 6, skew-symmetric only
    // as values (no entry is written as the negative of another), so the condition is checked at every trial point.
    [Fact]
    public void PfaffianOfSMinusSTransposed_OfOrder6_SquaresToTheDeterminant()
    {
        const string s = "matrix(i in 1..6, j in 1..6: s[i,j])";
        var compiled = Some.Compiled($"pf({s} - transpose({s}))^2 = det({s} - transpose({s}))");
        Assert.Equal(21, compiled.Program.ConditionNames.Length); // 6 diagonal entries and 15 pairs
        Assert.Equal(Verdict.Survived, Screener.Screen(compiled, new ScreeningOptions { Seed = Some.Seed }, 1).Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen($"pf({s} - transpose({s}))^2 = det({s} - transpose({s})) + s[1,2]").Verdict);
    }

    // A matrix that is not skew-symmetric: the candidate is invalid, with the failed condition and its trial as witness.
    [Fact]
    public void PfaffianOfANonSkewMatrix_IsInvalidWithItsOwnWitness()
    {
        var r = Some.Screen("pf([[0, a], [b, 0]]) = a");
        Assert.Equal(Verdict.Invalid, r.Verdict);
        Assert.NotNull(r.Witness);
        Assert.Equal("pf's argument at line 1, column 4: entry [1,2] + entry [2,1]", r.Witness!.Entry);
        Assert.StartsWith("pf's argument at line 1, column 4: entry [1,2] + entry [2,1] must be 0", r.Message);
        // re-check the witness by hand: a + b mod p is the stored value (common practice)
        var p = r.Witness.Field.Modulus;
        var point = r.Witness.Point.ToDictionary(v => v.Name, v => v.Coordinates[0]);
        Assert.Equal((point["a"] + point["b"]) % p, r.Witness.Difference![0]);
    }

    // A constant that breaks skew-symmetry is found when compiling.
    [Fact]
    public void PfaffianWithANonzeroConstantDiagonal_IsRejectedAtCompileTime()
    {
        var compiled = Algebra.Compile.IdentityCompiler.Compile(Some.Entry("pf([[1, a], [-a, 0]]) = a"));
        Assert.False(compiled.Success);
        Assert.Contains("entry [1,1] is 1, not 0", compiled.Error!.Message);
    }

    // Desnanot–Jacobi (Dodgson's condensation; Dodgson, Proc. Royal Soc. 15 (1866) 150–155; Bressoud, Proofs and
    // Confirmations (1999) §3.5 [memory]): det M · det M(1,n;1,n) = det M(1;1)·det M(n;n) − det M(1;n)·det M(n;1).
    // At n = 2 the inner minor is 0×0, with determinant 1.
    [Fact]
    public void DesnanotJacobi_HoldsFromOrder2_WithTheEmptyMinor()
    {
        const string m = "matrix(i in 1..n, j in 1..n: x[i,j])";
        var results = Some.ScreenFamily(
            $"det({m})*minor({m}, [2..n-1], [2..n-1]) = minor({m}, [2..n], [2..n])*minor({m}, [1..n-1], [1..n-1]) - minor({m}, [2..n], [1..n-1])*minor({m}, [1..n-1], [2..n]) for n in 2..6");
        Assert.Equal(5, results.Count);
        Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
        // with the sign of the last term flipped it is false from n = 2 on (a 2×2: ad + bc ≠ ad − bc)
        var wrong = Some.ScreenFamily(
            $"det({m})*minor({m}, [2..n-1], [2..n-1]) = minor({m}, [2..n], [2..n])*minor({m}, [1..n-1], [1..n-1]) + minor({m}, [2..n], [1..n-1])*minor({m}, [1..n-1], [2..n]) for n in 2..4");
        Assert.All(wrong, r => Assert.Equal(Verdict.Refuted, r.Verdict));
    }

    // Hankel determinants of the Catalan numbers C_k = binom(2k, k)/(k+1) are 1 for every order, including order 0
    // (Aigner, "Catalan-like numbers and determinants", JCTA 87 (1999) [memory]); with C_(i+j+1) they are 1 too, and
    // with C_(i+j+2) they are n + 1 [memory].
    [Fact]
    public void CatalanHankelDeterminants_IncludingOrderZero()
    {
        const string c = "binom(2*(i+j+s), i+j+s)/(i+j+s+1)";
        foreach (var (shift, rhs) in new[] { ("0", "1"), ("1", "1"), ("2", "n + 1") })
        {
            var results = Some.ScreenFamily($"det(matrix(i in 0..n-1, j in 0..n-1: {c.Replace("s", shift)})) = {rhs} for n in 0..7");
            Assert.Equal(8, results.Count);
            Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
        }
    }

    // 0×0 matrices: det = pf = perm = 1 (the empty product; Minc, Permanents (1978) for perm [memory]); tr = 0.
    [Theory]
    [InlineData("det(zero(0)) = 1")]
    [InlineData("pf(zero(0)) = 1")]
    [InlineData("perm(zero(0)) = 1")]
    [InlineData("perm(matrix(i in 1..0, j in 1..0: x[i,j])) = 1")]
    [InlineData("tr(id(0)) = 0")]
    [InlineData("zero(0)*zero(0, 3) = zero(0, 3)")]
    public void EmptyMatrices_FollowTheEmptyProductConvention(string line) =>
        Assert.Equal(Verdict.Survived, Some.Screen(line).Verdict);

    // inv(M)·M = I and adj(M)·M = det(M)·I (common practice); inv is undefined where det(M) = 0, so points there are resampled.
    [Fact]
    public void InverseAndAdjugate_SatisfyTheDefiningIdentities()
    {
        const string m = "matrix(i in 1..4, j in 1..4: x[i,j])";
        Assert.Equal(Verdict.Survived, Some.Screen($"inv({m})*{m} = id(4)").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen($"adj({m})*{m} = det({m})*id(4)").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen($"det(inv({m})) = 1/det({m})").Verdict);
        Assert.Equal(Verdict.Refuted, Some.Screen($"adj({m}) = inv({m})").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen("adj([[a]]) = [[1]]").Verdict);
        // the inverse of a singular matrix is undefined at every point: no evidence, undecided
        Assert.Equal(Verdict.Undecided, Some.Screen("inv([[a, a], [b, b]]) = id(2)").Verdict);
    }

    // id and zero of a given order: the neutral elements of + and * (common practice); diag multiplies entrywise.
    [Fact]
    public void IdentityZeroAndDiag_AreNeutralAndMultiplyEntrywise()
    {
        Assert.Equal(Verdict.Survived, Some.Screen("id(3)*matrix(i in 1..3, j in 1..2: x[i,j]) + zero(3, 2) = matrix(i in 1..3, j in 1..2: x[i,j])").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen("diag(a, b)*diag(c, d) = diag(a*c, b*d)").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen("det(diag(matrix(k in 1..5, j in 1..1: x[k]))) = prod(k in 1..5: x[k])").Verdict);
    }

    [Theory]
    [InlineData("(id(2))[3,1] = 0", "the entry [3,1] is outside a 2×2 matrix")]
    [InlineData("minor(id(3), [1, 2], [1]) = 0", "minor needs as many rows as columns")]
    [InlineData("submatrix(id(3), [4], [1]) = 0", "the row index 4 is outside 1..3")]
    [InlineData("diag([[a, b], [c, d]]) = 0", "diag of one matrix needs a row or a column vector")]
    [InlineData("inv([[0]]) = id(1)", "inv of a matrix whose determinant is 0")]
    [InlineData("inv([[1, 2], [2, 4]]) = id(2)", "inv of a matrix whose determinant is 0")]
    public void BadMatrixConstructs_AreCompileErrorsThatSayWhy(string line, string message)
    {
        var compiled = Algebra.Compile.IdentityCompiler.Compile(Some.Entry(line));
        Assert.False(compiled.Success);
        Assert.Contains(message, compiled.Error!.Message);
    }

    [Theory]
    [InlineData("minor(id(3), 1, [1]) = 0", "argument 2 of minor is a list of row or column indices")]
    [InlineData("zero(1, 2, 3) = 0", "zero takes 1 to 2 arguments, got 3")]
    [InlineData("(id(2))[1] = 0", "needs 2 indexs")]
    public void BadMatrixSyntax_IsAParseErrorThatSaysWhy(string line, string message)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.False(parsed.Success);
        Assert.Contains(message, parsed.Error!.Message);
    }

    // The printer writes the new forms so that they parse back to the same text (index lists, ranges, entries).
    [Theory]
    [InlineData("minor(M, [1, 3..n], []) + entry(A*B, 1, 2) + diag(a, b)")]
    public void NewForms_PrintAndParseBack(string text)
    {
        var parsed = CatalogueParser.ParseIdentity($"{text} = 0");
        Assert.True(parsed.Success, parsed.Error?.ToString());
        Assert.Equal(text, ExprPrinter.Print(parsed.Value.Left));
    }
}
