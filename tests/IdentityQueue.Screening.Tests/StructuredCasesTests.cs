namespace IdentityQueue.Screening.Tests;

/// <summary>Determinant, Pfaffian, permanent and matrix identities from the literature.</summary>
public class StructuredCasesTests
{
    private static void Survives(string line)
    {
        var r = Some.Screen(line);
        Assert.True(r.Verdict == Verdict.Survived, $"{line}: {r.Verdict} {r.Message} witness {r.Witness}");
    }

    private static ScreenResult Refuted(string line)
    {
        var r = Some.Screen(line);
        Assert.True(r.Verdict == Verdict.Refuted, $"{line}: {r.Verdict} {r.Message}");
        Assert.True(r.Certified, "the witness was not confirmed");
        return r;
    }

    private const string A23 = "matrix(i in 1..2, j in 1..3: a[i,j])";
    private const string B32 = "matrix(i in 1..3, j in 1..2: b[i,j])";
    private const string Skew4 = "[[0, s12, s13, s14], [-s12, 0, s23, s24], [-s13, -s23, 0, s34], [-s14, -s24, -s34, 0]]";

    // Krattenthaler, Advanced Determinant Calculus (1999) eq. (2.1) [memory]: det[x_i^(j−1)] = Π_{i<j}(x_j − x_i).
    [Fact]
    public void Vandermonde_N2To12_Survives()
    {
        var results = Some.ScreenFamily("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[j] - x[i])) for n in 2..12");
        Assert.Equal(11, results.Count);
        Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
    }

    // The reversed product differs by (−1)^C(n,2): false for n = 2, 3, 6, 7 and true for n = 4, 5 (from the above).
    [Fact]
    public void VandermondeReversed_FollowsTheSignOfBinomialNTwo()
    {
        var results = Some.ScreenFamily("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[i] - x[j])) for n in 2..7");
        var verdicts = results.Select(r => r.Verdict).ToArray();
        Assert.Equal([Verdict.Refuted, Verdict.Refuted, Verdict.Survived, Verdict.Survived, Verdict.Refuted, Verdict.Refuted], verdicts);
    }

    // The degree bound of the Vandermonde determinant is exactly C(n,2) (the sum of the row-maximum degrees).
    [Fact]
    public void VandermondeDegreeBound_IsBinomialNTwo()
    {
        foreach (var c in Some.Instances("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = 0 for n in 2..12"))
        {
            var n = (int)Some.Param(c, "n");
            Assert.Equal(n * (n - 1) / 2, (int)c.Bounds.Degree);
        }
    }

    // Binet, Cauchy 1812; Horn & Johnson, Matrix Analysis §0.8.7 [memory]: det(AB) = Σ_S det(A[:,S]) det(B[S,:]).
    [Fact]
    public void BinetCauchy_Survives() => Survives(
        $"det({A23} * {B32}) = " +
        "det([[a[1,1], a[1,2]], [a[2,1], a[2,2]]]) * det([[b[1,1], b[1,2]], [b[2,1], b[2,2]]]) + " +
        "det([[a[1,1], a[1,3]], [a[2,1], a[2,3]]]) * det([[b[1,1], b[1,2]], [b[3,1], b[3,2]]]) + " +
        "det([[a[1,2], a[1,3]], [a[2,2], a[2,3]]]) * det([[b[2,1], b[2,2]], [b[3,1], b[3,2]]])");

    // Sylvester's determinant identity; Horn & Johnson Thm 1.3.22 [memory].
    [Fact]
    public void Sylvester_Survives() => Survives($"det(id(2) + {A23} * {B32}) = det(id(3) + {B32} * {A23})");

    // det(BA) ≡ 0 for a 3×3 product of rank ≤ 2, while det(AB) is not (common practice).
    [Fact]
    public void DeterminantOfNonSquareProductsSwapped_IsRefuted() => Refuted($"det({A23} * {B32}) = det({B32} * {A23})");

    // Cayley, Phil. Trans. 148 (1858): A² − tr(A)·A + det(A)·I = 0 for 2×2 A (a matrix identity, entrywise).
    [Fact]
    public void CayleyHamilton2x2_Survives() => Survives("[[a,b],[c,d]]^2 - tr([[a,b],[c,d]])*[[a,b],[c,d]] + det([[a,b],[c,d]])*id(2) = 0");

    // A matrix identity that fails in one entry names the entry.
    [Fact]
    public void MatrixIdentity_WitnessNamesTheEntry()
    {
        var r = Refuted("[[a,b],[c,d]] * [[e,f],[g,h]] = [[a*e+b*g, a*f+b*h], [c*e+d*g, c*f+d*g]]");
        Assert.Equal("[2,2]", r.Witness!.Entry);
    }

    // Cayley, J. reine angew. Math. 38 (1849): pf(S)² = det(S) for skew-symmetric S; the 4×4 Pfaffian written out.
    [Fact]
    public void Pfaffian4x4Squared_IsTheDeterminant()
    {
        Survives($"(s12*s34 - s13*s24 + s14*s23)^2 = det({Skew4})");
        Survives($"pf({Skew4}) = s12*s34 - s13*s24 + s14*s23");
        Survives($"pf({Skew4})^2 = det({Skew4})");
    }

    // The same source: an odd-order skew-symmetric determinant vanishes.
    [Fact]
    public void OddSkewDeterminant_IsZero() => Survives(
        "det([[0, a, b, c, d], [-a, 0, e, f, g], [-b, -e, 0, h, i], [-c, -f, -h, 0, j], [-d, -g, -i, -j, 0]]) = 0");

    // Ryser, Combinatorial Mathematics (1963) ch. 2: perm(M) = (−1)^n Σ_{S⊆[n]} (−1)^|S| Π_i Σ_{j∈S} m_ij, n = 3, written out.
    [Fact]
    public void RyserFormula_AgreesWithPerm() => Survives(
        "perm(matrix(i in 1..3, j in 1..3: m[i,j])) = " +
        "prod(i in 1..3: m[i,1]) + prod(i in 1..3: m[i,2]) + prod(i in 1..3: m[i,3])" +
        " - prod(i in 1..3: m[i,1] + m[i,2]) - prod(i in 1..3: m[i,1] + m[i,3]) - prod(i in 1..3: m[i,2] + m[i,3])" +
        " + prod(i in 1..3: m[i,1] + m[i,2] + m[i,3])");

    // perm = det is false over Q and true in characteristic 2, where −1 = 1 (common practice).
    [Fact]
    public void PermanentEqualsDeterminant_OnlyInCharacteristicTwo()
    {
        Refuted("perm(matrix(i in 1..3, j in 1..3: m[i,j])) = det(matrix(i in 1..3, j in 1..3: m[i,j]))");
        Survives("perm(matrix(i in 1..3, j in 1..3: m[i,j])) = det(matrix(i in 1..3, j in 1..3: m[i,j])) over GF(2)");
    }

    // det(A+B) = det A + det B fails for 2×2 (witness A = diag(1,0), B = diag(0,1)); common practice.
    [Fact]
    public void DeterminantOfASum_IsRefuted() => Refuted(
        "det([[a,b],[c,d]] + [[e,f],[g,h]]) = det([[a,b],[c,d]]) + det([[e,f],[g,h]])");

    // Cauchy's double alternant (Krattenthaler 1999, (2.7) [memory]):
    // det[1/(x_i + y_j)] = Π_{i<j}(x_j − x_i)(y_j − y_i) / Π_{i,j}(x_i + y_j); division inside the matrix.
    [Fact]
    public void CauchyDoubleAlternant_N4_Survives() => Survives(
        "det(matrix(i in 1..4, j in 1..4: 1/(x[i] + y[j]))) = " +
        "prod(i in 1..4: prod(j in i+1..4: (x[j] - x[i])*(y[j] - y[i]))) / prod(i in 1..4: prod(j in 1..4: x[i] + y[j]))");

    // A Vandermonde identity with n = 40 survives at 64 bits: the O(n³) evaluation keeps it cheap.
    [Fact]
    public void Vandermonde_N40_Survives() => Survives(
        "det(matrix(i in 1..40, j in 1..40: x[i]^(j-1))) = prod(i in 1..40: prod(j in i+1..40: x[j] - x[i]))");
}
