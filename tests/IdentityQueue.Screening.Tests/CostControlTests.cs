using System.Diagnostics;
using IdentityQueue.Algebra.Evaluate;
using Xunit.Abstractions;

namespace IdentityQueue.Screening.Tests;

/// <summary>
/// The time budget and the cost estimate (issue 12): operation counts of the kernels, the estimate against measured trial
/// times, a monster settled before it runs, a trial cancelled inside its kernel when the budget runs out, and a stop that
/// keeps the finished trials.
/// </summary>
[Collection(nameof(TimedAlone))]
public sealed class CostControlTests(ITestOutputHelper log)
{
    /// <summary>
    /// The factor the estimate of one trial is checked within, both ways. The rates are measured in-process on a machine
    /// shared with other builds, and early in a process the JIT has not yet optimised the kernels, so a tighter factor
    /// would test the machine's load rather than the model.
    /// </summary>
    private const double EstimateFactor = 10;

    /// <summary>perm(A) = perm(Aᵀ) for every square matrix [memory]: true, so every trial vanishes.</summary>
    private static string PermanentIdentity(int n) =>
        $"perm(matrix(i in 1..{n}, j in 1..{n}: a[i,j])) = perm(transpose(matrix(i in 1..{n}, j in 1..{n}: a[i,j])))";

    [Fact]
    public void PermanentCount_FollowsGlynnAndRyser()
    {
        // Glynn (2010): 2^(n−1) sign patterns, each n double updates of the column sums and n products (3n + 1 with the
        // accumulation); Ryser (1963): 2^n subsets, n updates and n products each. Counts as in the kernels' comments.
        Assert.Equal(Math.Pow(2, 29) * 91, TrialCost.PermanentCount(30, oddCharacteristic: true));
        Assert.Equal(Math.Pow(2, 30) * 61, TrialCost.PermanentCount(30, oddCharacteristic: false));
        var cost = TrialCost.Of(Some.Compiled(PermanentIdentity(30)).Program, oddCharacteristic: true);
        Assert.Equal(2 * Math.Pow(2, 29) * 91, cost.PermanentOperations); // two permanents, lhs and rhs
        Assert.Equal("permanent of order 30", cost.Largest);
        Assert.Equal("2^37", TrialCost.Log2Text(cost.FieldOperations)); // 2^36.5, rounded
        // a determinant of order n: n³/3 multiply-adds of Gaussian elimination (common practice)
        var det = TrialCost.Of(Some.Compiled("det(matrix(i in 1..90, j in 1..90: a[i,j])) = 0").Program, oddCharacteristic: true);
        Assert.Equal(2.0 * 90 * 90 * 90 / 3, det.EliminationOperations, 6);
        Assert.Equal("determinant of order 90", det.Largest);
    }

    public static TheoryData<string, string> Kernels => new()
    {
        { "permanent of order 17, 31-bit block", PermanentIdentity(17) },
        { "determinant of order 160, 31-bit block", "det(matrix(i in 1..160, j in 1..160: a[i,j])) = det(transpose(matrix(i in 1..160, j in 1..160: a[i,j])))" },
        { "a long product, 62-bit block", "prod(k in 1..150000: x + k) = prod(k in 1..150000: k + x)" },
        { "permanent of order 14, 127-bit rung", "perm(matrix(i in 1..14, j in 1..14: a[i,j]^(2^52))) = perm(transpose(matrix(i in 1..14, j in 1..14: a[i,j]^(2^52))))" },
        { "permanent of order 12 over GF(7), extension field", "perm(matrix(i in 1..12, j in 1..12: a[i,j])) = perm(transpose(matrix(i in 1..12, j in 1..12: a[i,j]))) over GF(7)" },
    };

    /// <summary>
    /// The estimate of one trial (a whole block on the 31- and 62-bit rungs, as the screen runs it) against the fastest of
    /// five measured runs of that trial, within <see cref="EstimateFactor"/> either way. The fastest, not the median: other
    /// processes on a shared machine only ever slow a run down, so the fastest is the one closest to the kernel's own cost
    /// (the first run also pays for the JIT). The ratios go to the test log.
    /// </summary>
    [Theory]
    [MemberData(nameof(Kernels))]
    public void Estimate_IsWithinTheStatedFactorOfMeasuredTrials(string kernel, string line)
    {
        var identity = Some.Compiled(line);
        var options = new ScreeningOptions { Seed = Some.Seed };
        var estimate = Screener.Estimate(identity, options);
        Assert.NotNull(estimate.Rung);
        Assert.True(estimate.Cost.FieldOperations >= CostModel.CheapOperations, $"{kernel}: too cheap to be calibrated for");
        var rung = estimate.Rung!;
        var block = BlockTrialRunner.Handles(identity, rung) ? BlockProgram.Prepare(identity.Program) : null;
        var times = new List<double>();
        for (var run = 0; run < 5; run++)
        {
            // a long program's register file is a large-object allocation per trial, which may set off a full collection of
            // everything the test process holds; collect first, so that the run times the trial and not the test host's heap
            GC.Collect();
            GC.WaitForPendingFinalizers();
            var clock = Stopwatch.StartNew();
            var trial = block is null
                ? TrialRunner.Run(identity, rung, 1, (ulong)run + 1)
                : BlockTrialRunner.Run(identity, block, rung, 1, [(ulong)run + 1])[0];
            times.Add(clock.Elapsed.TotalSeconds);
            Assert.Equal(TrialOutcome.Zero, trial.Outcome); // a true identity
        }
        var measured = times.Min();
        var ratio = estimate.OneTrial.TotalSeconds / measured;
        log.WriteLine($"{kernel}: {TrialCost.Log2Text(estimate.Cost.FieldOperations)} operations on the {rung} rung, estimated {estimate.OneTrial.TotalSeconds:F4} s, " +
            $"measured {measured:F4} s (fastest of 5), estimate/measured = {ratio:F2}");
        Assert.InRange(ratio, 1 / EstimateFactor, EstimateFactor);
    }

    [Fact]
    public void Monster_IsUndecidedBeforeAnyTrial_WithTheEstimateAndTheBudget()
    {
        var clock = Stopwatch.StartNew();
        var result = Screener.Screen(Some.Compiled(PermanentIdentity(30)), new ScreeningOptions { Seed = Some.Seed }, 1);
        log.WriteLine($"{clock.Elapsed.TotalSeconds:F2} s: {result.Message}");
        Assert.Equal(Verdict.Undecided, result.Verdict);
        Assert.Empty(result.Trials);
        Assert.StartsWith("one trial needs about 2^37 field operations (permanent of order 30), about ", result.Message);
        Assert.Contains("the budget allows about 2^", result.Message);
        Assert.EndsWith("in 60 s (TimePerCandidate)", result.Message);
    }

    [Fact]
    public void Budget_RunningOutInsideATrial_CancelsItAndKeepsTheTrialsDone()
    {
        // A cost model that calls every trial cheap lets the order-26 permanent start (a minute or more of work here); the
        // budget of half a second must end it from inside the kernel. The trial given as prior evidence is kept.
        var identity = Some.Compiled(PermanentIdentity(26));
        var first = PriorZeroTrial();
        var created = TimeBudget.Create(0.5);
        Assert.True(created.Success);
        var budget = created.Value;
        var options = new ScreeningOptions { Seed = Some.Seed, Budget = budget, Costs = CostModel.Fixed(RungSpeed.Uniform(1e-6)) };
        var clock = Stopwatch.StartNew();
        var result = Screener.Screen(identity, options, 1, [first]);
        var elapsed = clock.Elapsed;
        log.WriteLine($"ended after {elapsed.TotalSeconds:F2} s: {result.Message}");
        Assert.Equal(Verdict.Undecided, result.Verdict);
        Assert.Contains("the time budget (TimePerCandidate = 0.5 s) ran out during a trial on the 62-bit prime rung", result.Message); // the prior trial climbed the 31-bit rung
        Assert.EndsWith("the 1 trials done are kept", result.Message);
        Assert.Equal([first], result.Trials);
        // ended by the budget, not by the end of the computation (a minute or more): a generous margin
        Assert.True(elapsed < TimeSpan.FromSeconds(15), $"the trial was not cancelled: {elapsed.TotalSeconds:F1} s");
    }

    /// <summary>A zero trial on the 31-bit rung, standing for evidence gathered before (the screen reads only its outcome, field and bound).</summary>
    private static TrialRecord PriorZeroTrial()
    {
        var first = Screener.Screen(Some.Compiled(PermanentIdentity(3)), new ScreeningOptions { Seed = Some.Seed }, 1).Trials[0];
        Assert.Equal(TrialOutcome.Zero, first.Outcome);
        return first;
    }

    [Fact]
    public void Stop_CancelsTheRunningTrial_AndReturnsPendingWithTheFinishedTrials()
    {
        var identity = Some.Compiled(PermanentIdentity(26));
        var options = new ScreeningOptions { Seed = Some.Seed, Costs = CostModel.Fixed(RungSpeed.Uniform(1e-6)) };
        // a prior zero trial: its evidence must come back with the stopped result
        var first = PriorZeroTrial();
        using var stop = new CancellationTokenSource(TimeSpan.FromMilliseconds(300));
        var clock = Stopwatch.StartNew();
        var result = Screener.Screen(identity, options, 1, [first], stop.Token);
        log.WriteLine($"stopped after {clock.Elapsed.TotalSeconds:F2} s: {result.Message}");
        Assert.Equal(Verdict.Pending, result.Verdict);
        Assert.Equal([first], result.Trials);
        Assert.StartsWith("stopped before a verdict", result.Message);
        Assert.True(clock.Elapsed < TimeSpan.FromSeconds(15), "the trial was not cancelled");
    }

    [Fact]
    public void TimeBudget_IsValidatedWhereItEnters()
    {
        var zero = TimeBudget.Create(0);
        Assert.False(zero.Success);
        Assert.Contains("--time-per-candidate must be between 0.1 and 604800 seconds, got 0", zero.Error.Message);
        Assert.False(TimeBudget.Create(double.NaN).Success);
        Assert.False(TimeBudget.Create(1e9).Success);
        var budget = TimeBudget.Create(90);
        Assert.True(budget.Success);
        Assert.Equal(TimeSpan.FromSeconds(90), budget.Value.PerCandidate);
        Assert.Equal(TimeSpan.FromSeconds(60), default(TimeBudget).PerCandidate);
        Assert.Equal("60 s", TimeBudget.Default.ToString());
    }
}

/// <summary>
/// Tests that time kernels against the cost model's estimate: they run alone, not beside the other test classes, which
/// would share the two cores with them and slow one measurement down more than the other.
/// </summary>
[CollectionDefinition(nameof(TimedAlone), DisableParallelization = true)]
public sealed class TimedAlone;
