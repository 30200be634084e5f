namespace IdentityQueue.Screening.Tests;

public class ScreenerTests
{
    [Fact]
    public void SameSeed_GivesTheSameTrials()
    {
        var a = Some.Screen("(x+y)^3 = x^3 + 3*x^2*y + 3*x*y^2 + y^3", seed: 7);
        var b = Some.Screen("(x+y)^3 = x^3 + 3*x^2*y + 3*x*y^2 + y^3", seed: 7);
        Assert.Equal(a.Trials.Select(t => (t.Field.Modulus, t.PointSeed)), b.Trials.Select(t => (t.Field.Modulus, t.PointSeed)));
        var c = Some.Screen("(x+y)^3 = x^3 + 3*x^2*y + 3*x*y^2 + y^3", seed: 8);
        Assert.NotEqual(a.Trials[0].Field.Modulus, c.Trials[0].Field.Modulus);
    }

    [Fact]
    public void ErrorBound_IsTheSumOfTheTrialBounds()
    {
        var r = Some.Screen("(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2", targetBits: 200);
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.Equal(r.Trials.Sum(t => t.BoundLog2 ?? 0), r.ErrorBoundLog2!.Value, 6);
        Assert.True(r.ErrorBoundLog2 <= -200);
    }

    // The first trials use the cheapest field where a trial is worth at least 16 bits, as one block of independent trials
    // (each its own random prime) of at most 16; survivors that need more move up one rung per stage.
    [Fact]
    public void Escalation_StartsCheapAndMovesUp()
    {
        var r = Some.Screen("(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2", targetBits: 1200);
        Assert.Equal(Verdict.Survived, r.Verdict);
        var bits = r.Trials.Select(t => (int)t.Field.Modulus.GetBitLength()).ToArray();
        Assert.Equal(Enumerable.Repeat(31, 16), bits.Take(16));
        Assert.Equal(Enumerable.Repeat(62, 8), bits.Skip(16).Take(8));
        Assert.All(bits.Skip(24), b => Assert.Equal(127, b));
        Assert.True(bits.Length > 24);
        Assert.Equal(r.Trials.Count, r.Trials.Select(t => t.Field.Modulus).Distinct().Count());
        Assert.All(r.Trials, t => Assert.True(t.BoundLog2 <= -16));
    }

    // A stage runs as many trials as reach the target if all vanish, so a cheap survivor needs one stage.
    [Fact]
    public void FirstStage_RunsJustEnoughTrialsForTheTarget()
    {
        var r = Some.Screen("(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2", targetBits: 64);
        Assert.Equal(Verdict.Survived, r.Verdict);
        Assert.All(r.Trials, t => Assert.Equal(31, (int)t.Field.Modulus.GetBitLength()));
        var perTrial = -r.Trials[0].BoundLog2!.Value;
        Assert.Equal((int)Math.Ceiling(64 / perTrial), r.Trials.Count);
    }

    // The trials of a block are those that running each trial alone gives: same prime, point, outcome and bound.
    [Theory]
    [InlineData("(x+y)^5 = x^5 + 5*x^4*y + 10*x^3*y^2 + 10*x^2*y^3 + 5*x*y^4 + y^5", 64)]
    [InlineData("(x+y)^5 = x^5 + 5*x^4*y + 10*x^3*y^2 + 10*x^2*y^3 + 5*x*y^4 + y^4", 64)]
    [InlineData("det([[a, b], [c, d]]) * perm([[a, b], [c, d]]) = (a*d)^2 - (b*c)^2", 400)]
    [InlineData("1/(x - y) + 1/(y - x) = 0", 300)]
    [InlineData("[[x, 1], [0, x]]^3 = [[x^3, 3*x^2], [0, x^3]]", 200)]
    [InlineData("[[x, 1], [0, x]]^3 = [[x^3, 3*x], [0, x^3]]", 200)]
    public void BlockTrials_EqualTrialsRunOneByOne(string line, int targetBits)
    {
        var c = Some.Compiled(line);
        var r = Screener.Screen(c, new ScreeningOptions { Target = EvidenceTarget.Create(targetBits).Value, Seed = 42 }, 17);
        var rungs = FieldLadder.Rungs(c.Field, Algebra.Limits.Default.MaxFieldBits);
        foreach (var t in r.Trials)
        {
            var rung = rungs.Single(g => g.PrimeBits == (int)t.Field.Modulus.GetBitLength());
            Assert.Equal(rung.Key, FieldLadder.RungOf(c, t.Field));
            var alone = TrialRunner.Run(c, rung, t.Seq, t.PointSeed);
            Assert.Equal(alone.Field, t.Field);
            Assert.Equal(alone.Outcome, t.Outcome);
            Assert.Equal(alone.Point.Select(p => (p.Name, string.Join(",", p.Coordinates))), t.Point.Select(p => (p.Name, string.Join(",", p.Coordinates))));
            Assert.Equal(alone.Difference is null ? null : string.Join(",", alone.Difference), t.Difference is null ? null : string.Join(",", t.Difference));
            Assert.Equal(alone.Entry, t.Entry);
            Assert.Equal(alone.BoundLog2, t.BoundLog2);
            Assert.Equal(Screener.TrialSeed(42, 17, t.Seq), t.PointSeed);
        }
    }

    // A large degree bound skips the rungs where a trial would buy fewer than 16 bits.
    [Fact]
    public void LargeDegree_StartsInALargerField()
    {
        var r = Some.Screen("(x+1)^(2^20) = (x+1)^(2^20)");
        Assert.Equal(62, (int)r.Trials[0].Field.Modulus.GetBitLength());
        Assert.Equal(Verdict.Survived, r.Verdict);
    }

    // Evidence accumulates: continuing with a higher target adds trials after the earlier ones and redoes none.
    [Fact]
    public void HigherTarget_AddsTrialsOnly()
    {
        var c = Some.Compiled("(x+y)^2 = x^2 + 2*x*y + y^2");
        var first = Screener.Screen(c, new ScreeningOptions { Target = EvidenceTarget.Create(64).Value, Seed = 3 }, 9);
        var more = Screener.Screen(c, new ScreeningOptions { Target = EvidenceTarget.Create(300).Value, Seed = 3 }, 9, first.Trials);
        Assert.Equal(first.Trials, more.Trials.Take(first.Trials.Count));
        Assert.True(more.Trials.Count > first.Trials.Count);
        Assert.True(more.ErrorBoundLog2 <= -300);
        Assert.Equal(Enumerable.Range(1, more.Trials.Count), more.Trials.Select(t => t.Seq));
    }

    [Fact]
    public void DenominatorThatVanishesIdentically_IsUndecidedWithAReason()
    {
        var r = Some.Screen("1/(x - x) = 1");
        Assert.Equal(Verdict.Undecided, r.Verdict);
        Assert.Contains("denominator", r.Message);
        Assert.All(r.Trials, t => Assert.Equal(TrialOutcome.Undefined, t.Outcome));
    }

    // In GF(2) itself the pole x = 1 of (x² − 1)/(x − 1) is hit half the time: such points are recorded as undefined, with no bound.
    [Fact]
    public void UndefinedPoints_AreRecordedWithoutEvidence()
    {
        var c = Some.Compiled("(x^2 - 1)/(x - 1) = x + 1 over GF(2)");
        var tiny = new Rung(0, 1, 1);
        var trials = Enumerable.Range(1, 64).Select(i => TrialRunner.Run(c, tiny, i, Screener.TrialSeed(5, 1, i))).ToList();
        Assert.Contains(trials, t => t.Outcome == TrialOutcome.Undefined);
        Assert.Contains(trials, t => t.Outcome == TrialOutcome.Zero);
        Assert.All(trials.Where(t => t.Outcome == TrialOutcome.Undefined), t => Assert.Null(t.BoundLog2));
        Assert.DoesNotContain(trials, t => t.Outcome == TrialOutcome.Nonzero);
    }

    [Fact]
    public void DegreeTooLargeForEveryField_IsUndecided()
    {
        var options = new ScreeningOptions { Limits = Algebra.Limits.Default with { MaxFieldBits = 62 } };
        var u = Screener.Screen(Some.Compiled("x^(2^60) = x^(2^60)"), options, 1);
        Assert.Equal(Verdict.Undecided, u.Verdict);
        Assert.Contains("degree bound", u.Message);
        Assert.Empty(u.Trials);
    }
}

public class StagedScreeningTests
{
    // The first pass gives every candidate its cheap stage; continuing later gives the same trials as one go.
    [Theory]
    [InlineData(64)]
    [InlineData(700)]
    public void StagedScreening_EqualsOneRun(int targetBits)
    {
        var c = Some.Compiled("(a+b)^3 = a^3 + 3*a^2*b + 3*a*b^2 + b^3");
        var options = new ScreeningOptions { Seed = 11, Target = EvidenceTarget.Create(targetBits).Value };
        var stage1 = Screener.Screen(c, options with { MaxNewStages = 1 }, 5);
        var stage2 = Screener.Screen(c, options, 5, stage1.Trials);
        var once = Screener.Screen(c, options, 5);
        Assert.Equal(targetBits > 400 ? Verdict.Pending : Verdict.Survived, stage1.Verdict);
        Assert.All(stage1.Trials, t => Assert.Equal(31, (int)t.Field.Modulus.GetBitLength()));
        Assert.Equal(Verdict.Survived, stage2.Verdict);
        Assert.Equal(once.Trials.Select(t => (t.Seq, t.PointSeed, t.Field.Modulus)), stage2.Trials.Select(t => (t.Seq, t.PointSeed, t.Field.Modulus)));
        Assert.Equal(once.ErrorBoundLog2, stage2.ErrorBoundLog2);
    }

    [Fact]
    public void FirstStage_RefutesFalseCandidates()
    {
        var r = Screener.Screen(Some.Compiled("(a+b)^3 = a^3 + b^3"), new ScreeningOptions { Seed = 1, MaxNewStages = 1 }, 5);
        Assert.Equal(Verdict.Refuted, r.Verdict);
    }
}

public class CharacteristicPTests
{
    // 1/7! has no meaning in GF(7): binom(x, 7) is not a polynomial over GF(7) (common practice).
    [Fact]
    public void ConstantWithADenominatorDivisibleByP_IsInvalid()
    {
        var r = Some.Screen("binom(x, 7) = 0 over GF(7)");
        Assert.Equal(Verdict.Invalid, r.Verdict);
        Assert.Contains("not defined in GF(7)", r.Message);
        Assert.Equal(Verdict.Invalid, Some.Screen("x/7 = 0 over GF(7)").Verdict);
        Assert.Equal(Verdict.Survived, Some.Screen("x/2 + x/2 = x over GF(7)").Verdict);
    }

    // A large characteristic needs no extension on the first rungs: the trial runs in GF(p) itself, with no defining polynomial.
    [Fact]
    public void LargeCharacteristic_SamplesInThePrimeFieldItself()
    {
        var r = Some.Screen("x^3 = x over GF(170141183460469231731687303715884105727)");
        Assert.Equal(Verdict.Refuted, r.Verdict);
        Assert.Null(r.Witness!.Field.DefiningPolynomial);
        Assert.True(r.Certified);
    }
}
