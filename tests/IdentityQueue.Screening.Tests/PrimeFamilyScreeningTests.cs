namespace IdentityQueue.Screening.Tests;

/// <summary>Congruences checked for every prime of a range: <c>over GF(p) for p prime in A..B</c>.</summary>
public class PrimeFamilyScreeningTests
{
    // Wilson's theorem: (p − 1)! ≡ −1 (mod p) for every prime p (Hardy & Wright, Thm 80 [memory]). Constant in each
    // field, so decided exactly.
    [Fact]
    public void Wilson_HoldsForEveryPrimeUpTo200()
    {
        var results = Some.ScreenFamily("fact(p-1) = -1 over GF(p) for p prime in 2..200");
        Assert.Equal(46, results.Count); // π(200) = 46 (OEIS A000720)
        Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
        Assert.All(results, r => Assert.StartsWith(ExactDecision.Prefix, r.Message));
    }

    // Frobenius: (x + y)^p = x^p + y^p in characteristic p (Lidl & Niederreiter, Finite Fields, Thm 1.46 [memory]);
    // with exponent p + 1 it fails for every p.
    [Fact]
    public void Frobenius_HoldsForEveryPrime_AndItsShiftFailsForEvery()
    {
        Assert.All(Some.ScreenFamily("(x+y)^p = x^p + y^p over GF(p) for p prime in 2..60"), r => Assert.Equal(Verdict.Survived, r.Verdict));
        Assert.All(Some.ScreenFamily("(x+y)^(p+1) = x^(p+1) + y^(p+1) over GF(p) for p prime in 2..60"), r => Assert.Equal(Verdict.Refuted, r.Verdict));
    }

    // Wolstenholme (1862): for p ≥ 5, H_(p−1) ≡ 0 (mod p²) and Σ 1/k² ≡ 0 (mod p) over k = 1..p−1 (Hardy & Wright,
    // Thm 115–116 [memory]); in GF(p) both sums vanish from p = 5 on, and the sum of 1/k² fails at p = 3 (1 + 1/4 ≡ 2).
    [Fact]
    public void Wolstenholme_ModP_HoldsFromFive_AndTheSquareSumFailsAtThree()
    {
        var harmonic = Some.ScreenFamily("sum(k in 1..p-1: 1/k) = 0 over GF(p) for p prime in 3..100");
        Assert.All(harmonic, r => Assert.Equal(Verdict.Survived, r.Verdict));
        var squares = Some.ScreenFamily("sum(k in 1..p-1: 1/k^2) = 0 over GF(p) for p prime in 3..100");
        Assert.Equal(Verdict.Refuted, squares[0].Verdict);
        Assert.Equal($"{ExactDecision.Prefix}: 2 ≠ 0 in GF(3)", squares[0].Message);
        Assert.All(squares.Skip(1), r => Assert.Equal(Verdict.Survived, r.Verdict));
    }

    // Lucas' theorem with two base-p digits: binom(ap + b, cp + d) ≡ binom(a, c)·binom(b, d) (mod p) for 0 ≤ b, d < p
    // (Lucas, Amer. J. Math. 1 (1878) [memory]; Granville, "Binomial coefficients modulo prime powers" (1997)).
    [Fact]
    public void Lucas_HoldsForEveryDigitPair_AndFailsWithTheDigitsSwapped()
    {
        var results = Some.ScreenFamily("binom(a*p + b, c*p + d) = binom(a, c)*binom(b, d) over GF(p) for p prime in 2..7, a in 0..3, b in 0..p-1, c in 0..a, d in 0..p-1");
        Assert.All(results, r => Assert.Equal(Verdict.Survived, r.Verdict));
        // binom(2p + 1, p) ≡ binom(2, 1)·binom(1, 0) = 2, not binom(2, 0)·binom(1, 1) = 1, for p ≥ 3
        Assert.All(Some.ScreenFamily("binom(2*p + 1, p) = 1 over GF(p) for p prime in 3..40"), r => Assert.Equal(Verdict.Refuted, r.Verdict));
    }

    // Fermat's little theorem is a statement about functions, not polynomials: x^p = x is refuted as a polynomial identity
    // over GF(p) (README, catalogue syntax), for every p.
    [Fact]
    public void FermatAsAPolynomialIdentity_IsRefutedForEveryPrime() =>
        Assert.All(Some.ScreenFamily("x^p = x over GF(p) for p prime in 2..30"), r => Assert.Equal(Verdict.Refuted, r.Verdict));
}
