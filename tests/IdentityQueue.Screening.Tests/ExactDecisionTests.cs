namespace IdentityQueue.Screening.Tests;

/// <summary>An identity without variables is decided by one exact evaluation: no trials, no error bound, both values shown.</summary>
public class ExactDecisionTests
{
    [Fact]
    public void TrueConstantIdentity_SurvivesExactlyWithoutTrialsOrErrorBound()
    {
        // Binomial theorem at x = y = 1: sum of binom(10, k) = 2^10 (common practice).
        var r = Some.Screen("sum(k in 0..10: binom(10, k)) = 2^10");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.Empty(r.Trials);
        Assert.Null(r.ErrorBoundLog2);
        Assert.True(r.Certified);
        Assert.Equal($"{ExactDecision.Prefix}: both sides are 1024; this is a proof, not screening evidence", r.Message);
    }

    [Fact]
    public void FalseConstantIdentity_IsRefutedWithBothValues()
    {
        // 2^5 = 32 (common practice).
        var r = Some.Screen("2^5 = 31");
        Assert.Equal(Verdict.Refuted, r.Verdict);
        Assert.Empty(r.Trials);
        Assert.Null(r.Witness);
        Assert.Equal($"{ExactDecision.Prefix}: 32 ≠ 31", r.Message);
    }

    [Fact]
    public void LargeExactValues_AreComparedInFull()
    {
        // sympy 1.11: factorial(30) = 265252859812191058636308480000000.
        Assert.Equal(Verdict.Survived, Some.Screen("fact(30) = 265252859812191058636308480000000").Verdict);
        var r = Some.Screen("fact(30) = 265252859812191058636308480000001");
        Assert.Equal(Verdict.Refuted, r.Verdict);
        Assert.Contains("265252859812191058636308480000000 ≠ 265252859812191058636308480000001", r.Message);
    }

    [Fact]
    public void ConstantMatrixIdentity_NamesTheFirstDifferingEntry()
    {
        // sympy 1.11: Matrix([[1, 2], [3, 4]])**2 = Matrix([[7, 10], [15, 22]]).
        Assert.Equal(Verdict.Survived, Some.Screen("[[1, 2], [3, 4]]^2 = [[7, 10], [15, 22]]").Verdict);
        var r = Some.Screen("[[1, 2], [3, 4]]^2 = [[7, 10], [15, 23]]");
        Assert.Equal(Verdict.Refuted, r.Verdict);
        Assert.Equal($"{ExactDecision.Prefix}: 22 ≠ 23 at entry [2,2]", r.Message);
    }

    [Fact]
    public void ConstantIdentityOverGFp_IsDecidedInThePrimeField()
    {
        // Lucas' theorem: binom(10, 3) ≡ binom(1,0)·binom(0,1)·binom(1,0) = 0 (mod 3), since 10 = 101₃ and 3 = 010₃
        // (Lucas 1878; common practice). binom(10, 3) = 120.
        var r = Some.Screen("binom(10, 3) = 0 over GF(3)");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.Empty(r.Trials);
        var f = Some.Screen("binom(10, 3) = 1 over GF(3)");
        Assert.Equal(Verdict.Refuted, f.Verdict);
        Assert.Equal($"{ExactDecision.Prefix}: 0 ≠ 1 in GF(3)", f.Message);
    }

    [Fact]
    public void IdentityWithVariables_IsScreenedAsBefore()
    {
        var r = Some.Screen("(x+1)^2 = x^2 + 2*x + 1");
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.NotEmpty(r.Trials);
        Assert.NotNull(r.ErrorBoundLog2);
    }
}
