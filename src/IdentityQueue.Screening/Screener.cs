using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// The screening policy (SPEC §5): trials on the escalation ladder until the accumulated error bound reaches
/// the evidence target (survived), a trial is nonzero (refuted), or a budget runs out (undecided, with the reason).
/// Earlier trials of the same candidate count as evidence and are not redone, so a run with a higher target only adds
/// trials. Stateless; thread-safe.
/// </summary>
public static class Screener
{
    /// <summary>The seed of trial <paramref name="seq"/> of a candidate: a pure function of the run seed, the candidate key and seq.</summary>
    public static ulong TrialSeed(ulong runSeed, ulong candidateKey, int seq) =>
        Xoshiro256.Mix(Xoshiro256.Mix(runSeed, candidateKey), (ulong)seq);

    /// <summary>
    /// Screens one compiled candidate, continuing after <paramref name="priorTrials"/> (empty for a fresh candidate), within
    /// <see cref="ScreeningOptions.Budget"/>: a trial (or block of trials) whose estimated time does not fit what is left of
    /// the budget is not started, and one running when the budget runs out is cancelled inside its kernels; either way the
    /// candidate is undecided with the trials done kept as evidence. When <paramref name="cancellation"/> fires (the
    /// process is stopping) the running trial is cancelled and the result is <see cref="Verdict.Pending"/> with the trials
    /// finished so far, so that the candidate can be returned to pending with them.
    /// </summary>
    public static ScreenResult Screen(CompiledIdentity identity, ScreeningOptions options, ulong candidateKey,
        IReadOnlyList<TrialRecord>? priorTrials = null, CancellationToken cancellation = default)
    {
        var trials = new List<TrialRecord>(priorTrials ?? []);
        var bounds = identity.Bounds;
        if (UndefinedConstant(identity) is { } constant)
            return new ScreenResult(Verdict.Invalid, bounds.Degree, bounds.HeightLog2, null, trials, null, false,
                $"the constant {constant} is not defined in {identity.Field}: its denominator is divisible by {identity.Field.Characteristic}");
        if (ExactDecision.TryDecide(identity, options.Policy) is { } exact) return exact;
        var accumulated = 0.0;
        var consecutiveUndefined = 0;
        var climbed = new HashSet<int>(); // the rungs with a zero trial: the ladder's position
        foreach (var t in trials)
        {
            if (t.Outcome == TrialOutcome.Nonzero) return Refuted(identity, options, trials, t, cancellation);
            if (t.Outcome == TrialOutcome.Zero) { accumulated += t.BoundLog2 ?? 0; consecutiveUndefined = 0; climbed.Add(FieldLadder.RungOf(identity, t.Field)); }
            else consecutiveUndefined++;
        }
        var rungs = FieldLadder.Rungs(identity.Field, options.Limits.MaxFieldBits);
        var budget = options.Budget.PerCandidate;
        var started = options.Clock.GetTimestamp();
        var cost = TrialCost.Of(identity.Program, OddCharacteristic(identity));
        // A timer cancels a trial that is still running when the budget runs out; a cheap program's trials end long before
        // that, so the budget is looked at between its trials only, and its screen pays for no timer.
        using var timeUp = cost.FieldOperations < CostModel.CheapOperations ? null : new CancellationTokenSource(budget, options.Clock);
        using var linked = timeUp is null ? null : CancellationTokenSource.CreateLinkedTokenSource(cancellation, timeUp.Token);
        var token = linked?.Token ?? cancellation;
        var seq = trials.Count == 0 ? 1 : trials[^1].Seq + 1;
        var newStages = 0; // blocks of trials on one rung that gave at least one zero trial
        BlockProgram? block = null; // prepared once, shared by every block of trials of this candidate
        while (!options.Target.IsMetBy(accumulated))
        {
            if (newStages == options.MaxNewStages)
                return new ScreenResult(Verdict.Pending, bounds.Degree, bounds.HeightLog2, accumulated, trials, null, false, null);
            var rung = FieldLadder.Choose(identity, rungs, climbed.Count, options.Policy.MinBitsPerTrial);
            if (rung is null)
                return Undecided(identity, trials, accumulated,
                    $"the degree bound {bounds.Degree} is too large: a trial in the largest field allowed (MaxFieldBits = {options.Limits.MaxFieldBits}) buys only {FieldLadder.BestBits(identity, rungs):F1} bits, fewer than {options.Policy.MinBitsPerTrial}");
            if (trials.Count >= options.Policy.MaxTrials)
                return Undecided(identity, trials, accumulated, $"the trial budget (MaxTrials = {options.Policy.MaxTrials}) ran out at 2^{accumulated:F1} of the target {options.Target}");
            if (cancellation.IsCancellationRequested) return Stopped(identity, trials, accumulated);
            var left = budget - options.Clock.GetElapsedTime(started);
            if (left <= TimeSpan.Zero)
                return Undecided(identity, trials, accumulated, $"the time budget (TimePerCandidate = {options.Budget}) ran out at 2^{accumulated:F1} of the target {options.Target}");
            var blocked = BlockTrialRunner.Handles(identity, rung);
            var oneTrial = options.Costs.TrialTime(identity, rung, cost);
            if (oneTrial > left)
                return Undecided(identity, trials, accumulated, TooCostly(cost, oneTrial, rung, options.Budget, left, trials.Count));
            TrialRecord[] stage;
            try
            {
                if (blocked)
                {
                    var lanes = StageLanes(identity, rung, options, accumulated, trials.Count);
                    // A block costs its padded lanes: fewer lanes when all of them would not fit what is left.
                    while (lanes > 1 && options.Costs.TrialTime(identity, rung, cost, lanes) > left) lanes--;
                    var seeds = new ulong[lanes];
                    for (var l = 0; l < lanes; l++) seeds[l] = TrialSeed(options.Seed, candidateKey, seq + l);
                    block ??= BlockProgram.Prepare(identity.Program);
                    stage = BlockTrialRunner.Run(identity, block, rung, seq, seeds, token);
                }
                else stage = [TrialRunner.Run(identity, rung, seq, TrialSeed(options.Seed, candidateKey, seq), token)];
            }
            catch (OperationCanceledException) when (token.IsCancellationRequested)
            {
                if (cancellation.IsCancellationRequested) return Stopped(identity, trials, accumulated);
                return Undecided(identity, trials, accumulated,
                    $"the time budget (TimePerCandidate = {options.Budget}) ran out during a trial on the {rung} rung (estimated at {Seconds(oneTrial)}) " +
                    $"at 2^{accumulated:F1} of the target {options.Target}; the {trials.Count} trials done are kept");
            }
            var stageZero = false;
            foreach (var trial in stage)
            {
                trials.Add(trial);
                seq++;
                switch (trial.Outcome)
                {
                    case TrialOutcome.Nonzero:
                        return Refuted(identity, options, trials, trial, token);
                    case TrialOutcome.Undefined:
                        if (++consecutiveUndefined >= options.Policy.MaxConsecutiveUndefined)
                            return Undecided(identity, trials, accumulated,
                                $"lhs − rhs was undefined (a denominator vanished) at {consecutiveUndefined} random points in a row: a denominator may be identically zero");
                        break;
                    default:
                        consecutiveUndefined = 0;
                        stageZero = true;
                        accumulated += trial.BoundLog2 ?? 0;
                        climbed.Add(rung.Key);
                        break;
                }
                if (options.Target.IsMetBy(accumulated)) break;
            }
            if (stageZero) newStages++;
        }
        return new ScreenResult(Verdict.Survived, bounds.Degree, bounds.HeightLog2, accumulated, trials, null, false, null);
    }

    /// <summary>
    /// The estimate of the candidate's first trial, before any runs: its cost in field operations, the rung it would run on
    /// (null when no rung buys enough evidence) and its time there (a whole block on the 31- and 62-bit rungs over Q).
    /// </summary>
    public static TrialEstimate Estimate(CompiledIdentity identity, ScreeningOptions options)
    {
        var cost = TrialCost.Of(identity.Program, OddCharacteristic(identity));
        var rung = FieldLadder.Choose(identity, FieldLadder.Rungs(identity.Field, options.Limits.MaxFieldBits), 0, options.Policy.MinBitsPerTrial);
        if (rung is null) return new TrialEstimate(cost, null, TimeSpan.Zero, null);
        var oneTrial = options.Costs.TrialTime(identity, rung, cost);
        var message = oneTrial > options.Budget.PerCandidate ? TooCostly(cost, oneTrial, rung, options.Budget, options.Budget.PerCandidate, 0) : null;
        return new TrialEstimate(cost, rung, oneTrial, message);
    }

    /// <summary>
    /// "one trial needs about 2^35 field operations (permanent of order 30), about 190 s on the 31-bit prime rung here; the
    /// budget allows about 2^33 in 60 s (TimePerCandidate)".
    /// </summary>
    private static string TooCostly(TrialCost cost, TimeSpan oneTrial, Rung rung, TimeBudget budget, TimeSpan left, int trialsDone)
    {
        var allowed = cost.FieldOperations * left.TotalSeconds / Math.Max(oneTrial.TotalSeconds, 1e-9);
        var budgetText = trialsDone == 0 ? $"in {budget} (TimePerCandidate)" : $"in the {Seconds(left)} left of {budget} (TimePerCandidate)";
        return $"one trial needs about {TrialCost.Log2Text(cost.FieldOperations)} field operations ({cost.Largest}), about {Seconds(oneTrial)} on the {rung} rung here; " +
            $"the budget allows about {TrialCost.Log2Text(allowed)} {budgetText}" + (trialsDone > 0 ? $"; the {trialsDone} trials done are kept" : "");
    }

    private static string Seconds(TimeSpan t) => t.TotalSeconds >= 10 ? $"{t.TotalSeconds:F0} s" : $"{t.TotalSeconds:0.##} s";

    private static bool OddCharacteristic(CompiledIdentity identity) => identity.Field.IsRationals || !identity.Field.Characteristic.IsEven;

    /// <summary>The process is stopping: the trials finished so far, and the candidate goes back to pending.</summary>
    private static ScreenResult Stopped(CompiledIdentity identity, List<TrialRecord> trials, double accumulated) =>
        new(Verdict.Pending, identity.Bounds.Degree, identity.Bounds.HeightLog2, accumulated, trials, null, false,
            $"stopped before a verdict, after {trials.Count} trials");

    /// <summary>
    /// How many trials the next block on <paramref name="rung"/> runs: as many as reach the target if all of them vanish,
    /// at most <see cref="BlockTrialRunner.MaxLanes"/> and within the trial budget.
    /// </summary>
    private static int StageLanes(CompiledIdentity identity, Rung rung, ScreeningOptions options, double accumulated, int trialCount)
    {
        var bits = -(Evidence.TrialBoundLog2(identity.Bounds, rung.SizeLog2, rung.PrimeBits) ?? -1);
        var needed = Math.Ceiling((accumulated - options.Target.BoundLog2) / bits - 1e-9);
        var lanes = (int)Math.Clamp(needed, 1, BlockTrialRunner.MaxLanes(rung));
        return Math.Max(1, Math.Min(lanes, options.Policy.MaxTrials - trialCount));
    }

    /// <summary>In characteristic p, a rational constant whose denominator p divides (1/7 over GF(7), or binom(x, 7)'s 1/7!).</summary>
    private static Algebra.Exact.Rational? UndefinedConstant(CompiledIdentity identity)
    {
        if (identity.Field.IsRationals) return null;
        foreach (var c in identity.Program.Constants)
            if ((c.Denominator % identity.Field.Characteristic).IsZero) return c;
        return null;
    }

    /// <summary>
    /// A side condition (a Pfaffian's argument skew-symmetric) that failed at a trial point: which, and the witness that
    /// anyone can re-check (the trial is stored as the candidate's witness).
    /// </summary>
    private static string ConditionMessage(TrialRecord w)
    {
        var f = w.Field;
        var field = f.DefiningPolynomial is null ? $"modulus p = {f.Modulus}" : $"GF({f.Modulus}^{f.ExtensionDegree}), defining polynomial coefficients [{string.Join(", ", f.DefiningPolynomial)}]";
        var point = string.Join(", ", w.Point.Select(v => $"{v.Name} = {(v.Coordinates.Length == 1 ? v.Coordinates[0].ToString() : $"[{string.Join(", ", v.Coordinates)}]")}"));
        var value = w.Difference is { Length: 1 } d ? d[0].ToString() : $"[{string.Join(", ", w.Difference ?? [])}]";
        return $"{w.Entry} must be 0 for a skew-symmetric matrix, but it is {value} at trial {w.Seq} ({field}; {point})";
    }

    private static ScreenResult Undecided(CompiledIdentity identity, List<TrialRecord> trials, double accumulated, string message) =>
        new(Verdict.Undecided, identity.Bounds.Degree, identity.Bounds.HeightLog2, accumulated, trials, null, false, message);

    private static ScreenResult Refuted(CompiledIdentity identity, ScreeningOptions options, List<TrialRecord> trials, TrialRecord witness,
        CancellationToken cancellation)
    {
        if (identity.Program.IsCondition(witness.Entry))
            return new ScreenResult(Verdict.Invalid, identity.Bounds.Degree, identity.Bounds.HeightLog2, null, trials, witness, false,
                ConditionMessage(witness));
        var certified = options.Certify && WitnessChecker.Certify(identity, witness, options.Policy, cancellation);
        return new ScreenResult(Verdict.Refuted, identity.Bounds.Degree, identity.Bounds.HeightLog2, null, trials, witness, certified, null);
    }
}

/// <summary>The estimate of one trial before it runs: its cost, its rung, its time here, and the message when it does not fit the budget.</summary>
public sealed record TrialEstimate(TrialCost Cost, Rung? Rung, TimeSpan OneTrial, string? TooCostly);
