namespace IdentityQueue.Screening.Tests;

/// <summary>
/// Published identities (true: must survive at 64 bits) and published near misses (false: must be refuted with a witness
/// that is confirmed exactly over Q). Every verdict here was also confirmed by symbolic expansion outside the project.
/// </summary>
public class ReferenceCasesTests
{
    private static void Survives(string line, int targetBits = 64)
    {
        var r = Some.Screen(line, targetBits);
        Assert.True(r.Verdict == Verdict.Survived, $"{line}: {r.Verdict} {r.Message} witness {r.Witness}");
        Assert.True(r.ErrorBoundLog2 <= -targetBits, $"error bound 2^{r.ErrorBoundLog2}");
        Assert.All(r.Trials, t => Assert.NotEqual(TrialOutcome.Nonzero, t.Outcome));
    }

    private static ScreenResult Refuted(string line, bool certified = true)
    {
        var r = Some.Screen(line);
        Assert.True(r.Verdict == Verdict.Refuted, $"{line}: {r.Verdict} {r.Message}");
        Assert.NotNull(r.Witness);
        Assert.Equal(TrialOutcome.Nonzero, r.Witness!.Outcome);
        if (certified) Assert.True(r.Certified, "the witness was not confirmed exactly");
        var recheck = WitnessChecker.Recheck(Some.Compiled(line), r.Witness.Field, r.Witness.Point);
        Assert.True(recheck.Refutes);
        Assert.Equal(r.Witness.Difference, recheck.Difference);
        return r;
    }

    // Brahmagupta (628); Fibonacci, Liber Quadratorum (1225).
    [Fact]
    public void TwoSquares_Survives() => Survives("(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2");

    // Euler, letter to Goldbach, 4 May 1748; Hardy & Wright §20.5 [memory].
    [Fact]
    public void FourSquares_Survives() => Survives(FourSquares);

    private const string FourSquares =
        "(a1^2+a2^2+a3^2+a4^2)*(b1^2+b2^2+b3^2+b4^2) = (a1*b1-a2*b2-a3*b3-a4*b4)^2 + (a1*b2+a2*b1+a3*b4-a4*b3)^2" +
        " + (a1*b3-a2*b4+a3*b1+a4*b2)^2 + (a1*b4+a2*b3-a3*b2+a4*b1)^2";

    // Degen c. 1818; Cayley 1845 (the eight bilinear forms of the octonion product, written out).
    [Fact]
    public void EightSquares_Survives() => Survives(
        "sum(i in 1..8: a[i]^2) * sum(i in 1..8: b[i]^2) = " +
        "(a[1]*b[1] - a[2]*b[2] - a[3]*b[3] - a[4]*b[4] - a[5]*b[5] - a[6]*b[6] - a[7]*b[7] - a[8]*b[8])^2 + " +
        "(a[1]*b[2] + a[2]*b[1] + a[3]*b[4] - a[4]*b[3] + a[5]*b[6] - a[6]*b[5] - a[7]*b[8] + a[8]*b[7])^2 + " +
        "(a[1]*b[3] - a[2]*b[4] + a[3]*b[1] + a[4]*b[2] + a[5]*b[7] + a[6]*b[8] - a[7]*b[5] - a[8]*b[6])^2 + " +
        "(a[1]*b[4] + a[2]*b[3] - a[3]*b[2] + a[4]*b[1] + a[5]*b[8] - a[6]*b[7] + a[7]*b[6] - a[8]*b[5])^2 + " +
        "(a[1]*b[5] - a[2]*b[6] - a[3]*b[7] - a[4]*b[8] + a[5]*b[1] + a[6]*b[2] + a[7]*b[3] + a[8]*b[4])^2 + " +
        "(a[1]*b[6] + a[2]*b[5] - a[3]*b[8] + a[4]*b[7] - a[5]*b[2] + a[6]*b[1] - a[7]*b[4] + a[8]*b[3])^2 + " +
        "(a[1]*b[7] + a[2]*b[8] + a[3]*b[5] - a[4]*b[6] - a[5]*b[3] + a[6]*b[4] + a[7]*b[1] - a[8]*b[2])^2 + " +
        "(a[1]*b[8] - a[2]*b[7] + a[3]*b[6] + a[4]*b[5] - a[5]*b[4] - a[6]*b[3] + a[7]*b[2] + a[8]*b[1])^2");

    // Lagrange 1773 [memory].
    [Fact]
    public void LagrangeIdentity_ThreeVariables_Survives() => Survives(
        "sum(i in 1..3: x[i]^2) * sum(i in 1..3: y[i]^2) - sum(i in 1..3: x[i]*y[i])^2 = sum(i in 1..3: sum(j in i+1..3: (x[i]*y[j] - x[j]*y[i])^2))");

    // Newton's identity in four variables; Macdonald, Symmetric Functions (1995) I (2.11') [memory].
    [Fact]
    public void NewtonPowerSumP4_Survives() => Survives(
        $"{P(4)} = ({E1})^4 - 4*({E1})^2*({E2}) + 2*({E2})^2 + 4*({E1})*({E3}) - 4*{E4}");

    private static string P(int k) => $"sum(i in 1..4: x[i]^{k})";
    private const string E1 = "sum(i in 1..4: x[i])";
    private const string E2 = "sum(i in 1..4: sum(j in i+1..4: x[i]*x[j]))";
    private const string E3 = "sum(i in 1..4: sum(j in i+1..4: sum(k in j+1..4: x[i]*x[j]*x[k])))";
    private const string E4 = "x[1]*x[2]*x[3]*x[4]";

    // The q-binomial theorem, n = 4; Andrews, The Theory of Partitions (1976), Thm 3.3.
    [Fact]
    public void QBinomialTheorem_N4_Survives() => Survives(
        "prod(i in 0..3: 1 + q^i*t) = sum(k in 0..4: q^(k*(k-1)/2) * qbinom(4, k, q) * t^k)");

    // Frobenius: (x+y)^p = x^p + y^p in characteristic p; Lidl & Niederreiter, Finite Fields, Thm 1.46 [memory].
    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(5)]
    [InlineData(7)]
    public void Frobenius_SurvivesOverGFp(int p) => Survives($"(x+y)^{p} = x^{p} + y^{p} over GF({p})");

    // The same identity is false over Q: for p = 5 the difference 5x^4y + 10x^3y^2 + … has content 5 (common practice).
    [Fact]
    public void Frobenius_IsRefutedOverQ() => Refuted("(x+y)^5 = x^5 + y^5");

    // A polynomial identity, not one of functions: x^7 − x vanishes on all of GF(7) but is a nonzero polynomial
    // (reference-cases, facts about the bound), so it must be sampled in an extension and refuted.
    [Fact]
    public void FermatLittle_IsRefutedAsAPolynomialOverGF7()
    {
        var r = Refuted("x^7 = x over GF(7)");
        Assert.NotNull(r.Witness!.Field.DefiningPolynomial);
        Assert.True(r.Witness.Field.ExtensionDegree > 1);
        Assert.Equal(7, (int)r.Witness.Field.Modulus);
    }

    // An identity over GF(p^k) with integer coefficients embeds in a larger extension (common practice).
    [Fact]
    public void FrobeniusOverGF2To8_SurvivesAndPowerDifferenceIsRefuted()
    {
        Survives("(x+y)^4 = x^4 + y^4 over GF(2^8)");
        var r = Refuted("x^256 = x over GF(2^8)");
        Assert.Equal(0, r.Witness!.Field.ExtensionDegree % 8);
    }

    // Chu–Vandermonde; Graham, Knuth & Patashnik, Concrete Mathematics (5.27) [memory].
    [Fact]
    public void ChuVandermonde_N3To5_Survives()
    {
        var results = Some.ScreenFamily("sum(k in 0..n: binom(x,k)*binom(y,n-k)) = binom(x+y, n) for n in 3..5");
        Assert.Equal(3, results.Count);
        Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
    }

    // (x²−1)/(x−1) = x + 1; the point x = 1 is undefined and must be resampled, never counted (common practice).
    [Fact]
    public void RemovablePole_Survives() => Survives("(x^2-1)/(x-1) = x + 1");

    // Lander & Parkin, Bull. AMS 72 (1966) 1079: the counterexample to Euler's sum-of-powers conjecture.
    [Fact]
    public void LanderParkinCounterexample_SurvivesExactly()
    {
        var r = Some.Screen("27^5 + 84^5 + 110^5 + 133^5 = 144^5");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.Equal($"{ExactDecision.Prefix}: both sides are 61917364224; this is a proof, not screening evidence", r.Message);
    }

    // Hurwitz, Göttingen Nachr. (1898): no bilinear three-square identity; here the difference is (a2b3 − a3b2)².
    [Fact]
    public void ThreeSquares_IsRefuted() => Refuted(
        "(a1^2+a2^2+a3^2)*(b1^2+b2^2+b3^2) = (a1*b1-a2*b2-a3*b3)^2 + (a1*b2+a2*b1)^2 + (a1*b3+a3*b1)^2");

    // From the two-square identity: the difference is 4abcd, nonzero outside characteristic 2.
    [Fact]
    public void TwoSquaresWithSignFlipped_IsRefuted() => Refuted("(a^2+b^2)*(c^2+d^2) = (a*c+b*d)^2 + (a*d+b*c)^2");

    // From the four-square identity: −a3b2 → +a3b2 in the last square; difference 4·a3·b2·(a1b4+a2b3+a4b1).
    [Fact]
    public void FourSquaresWithOneSignFlipped_IsRefuted() => Refuted(FourSquares.Replace("a2*b3-a3*b2+a4*b1", "a2*b3+a3*b2+a4*b1"));

    // Newton off by one: p3 − e1p2 + e2p1 − e3 equals 2e3, not 0 (Macdonald (1995) I (2.11') [memory]).
    [Fact]
    public void NewtonOffByOne_IsRefuted() => Refuted($"{P(3)} - ({E1})*{P(2)} + ({E2})*{P(1)} - ({E3}) = 0");

    // The correct Newton identity p3 − e1p2 + e2p1 − 3e3 = 0 (same source).
    [Fact]
    public void NewtonP3_Survives() => Survives($"{P(3)} - ({E1})*{P(2)} + ({E2})*{P(1)} - 3*({E3}) = 0");

    // s_(3) = h_3, the complete homogeneous symmetric polynomial, not e_3 (Macdonald (1995) I §3 [memory]).
    [Fact]
    public void SchurNearMiss_IsRefuted() => Refuted(
        "sum(i in 1..3: sum(j in i..3: sum(k in j..3: x[i]*x[j]*x[k]))) = x[1]*x[2]*x[3]");
}
