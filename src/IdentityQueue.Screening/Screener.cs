using System.Diagnostics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// The screening policy (SPEC §5): trials on the escalation ladder until the accumulated error bound reaches
/// 2^-TargetBits (survived), a trial is nonzero (refuted), or a budget runs out (undecided, with the reason).
/// Earlier trials of the same candidate count as evidence and are not redone, so a run with a higher target only adds
/// trials. Stateless; thread-safe.
/// </summary>
public static class Screener
{
    /// <summary>The seed of trial <paramref name="seq"/> of a candidate: a pure function of the run seed, the candidate key and seq.</summary>
    public static ulong TrialSeed(ulong runSeed, ulong candidateKey, int seq) =>
        Xoshiro256.Mix(Xoshiro256.Mix(runSeed, candidateKey), (ulong)seq);

    /// <summary>Screens one compiled candidate, continuing after <paramref name="priorTrials"/> (empty for a fresh candidate).</summary>
    public static ScreenResult Screen(CompiledIdentity identity, ScreeningOptions options, ulong candidateKey,
        IReadOnlyList<TrialRecord>? priorTrials = null, CancellationToken cancellation = default)
    {
        var trials = new List<TrialRecord>(priorTrials ?? []);
        var bounds = identity.Bounds;
        if (UndefinedConstant(identity) is { } constant)
            return new ScreenResult(Verdict.Invalid, bounds.Degree, bounds.HeightLog2, null, trials, null, false,
                $"the constant {constant} is not defined in {identity.Field}: its denominator is divisible by {identity.Field.Characteristic}");
        if (ExactDecision.TryDecide(identity, options.Limits) is { } exact) return exact;
        var accumulated = 0.0;
        var consecutiveUndefined = 0;
        var climbed = new HashSet<int>(); // the rungs with a zero trial: the ladder's position
        foreach (var t in trials)
        {
            if (t.Outcome == TrialOutcome.Nonzero) return Refuted(identity, options, trials, t);
            if (t.Outcome == TrialOutcome.Zero) { accumulated += t.BoundLog2 ?? 0; consecutiveUndefined = 0; climbed.Add(FieldLadder.RungOf(identity, t.Field)); }
            else consecutiveUndefined++;
        }
        var rungs = FieldLadder.Rungs(identity.Field, options.Limits.MaxFieldBits);
        var clock = Stopwatch.StartNew();
        var seq = trials.Count == 0 ? 1 : trials[^1].Seq + 1;
        var newStages = 0; // blocks of trials on one rung that gave at least one zero trial
        BlockProgram? block = null; // prepared once, shared by every block of trials of this candidate
        while (accumulated > -options.TargetBits)
        {
            if (newStages == options.MaxNewStages)
                return new ScreenResult(Verdict.Pending, bounds.Degree, bounds.HeightLog2, accumulated, trials, null, false, null);
            var rung = FieldLadder.Choose(identity, rungs, climbed.Count, options.MinBitsPerTrial);
            if (rung is null)
                return Undecided(identity, trials, accumulated,
                    $"the degree bound {bounds.Degree} is too large: a trial in the largest field allowed (MaxFieldBits = {options.Limits.MaxFieldBits}) buys only {FieldLadder.BestBits(identity, rungs):F1} bits, fewer than {options.MinBitsPerTrial}");
            if (trials.Count >= options.Limits.MaxTrials)
                return Undecided(identity, trials, accumulated, $"the trial budget (MaxTrials = {options.Limits.MaxTrials}) ran out at 2^{accumulated:F1} of the target 2^-{options.TargetBits}");
            if (clock.Elapsed > options.Limits.TimePerCandidate || cancellation.IsCancellationRequested)
                return Undecided(identity, trials, accumulated, $"the time budget (TimePerCandidate = {options.Limits.TimePerCandidate.TotalSeconds:F0} s) ran out at 2^{accumulated:F1} of the target 2^-{options.TargetBits}");
            TrialRecord[] stage;
            if (BlockTrialRunner.Handles(identity, rung))
            {
                var lanes = StageLanes(identity, rung, options, accumulated, trials.Count);
                var seeds = new ulong[lanes];
                for (var l = 0; l < lanes; l++) seeds[l] = TrialSeed(options.Seed, candidateKey, seq + l);
                block ??= BlockProgram.Prepare(identity.Program);
                stage = BlockTrialRunner.Run(identity, block, rung, seq, seeds);
            }
            else stage = [TrialRunner.Run(identity, rung, seq, TrialSeed(options.Seed, candidateKey, seq))];
            var stageZero = false;
            foreach (var trial in stage)
            {
                trials.Add(trial);
                seq++;
                switch (trial.Outcome)
                {
                    case TrialOutcome.Nonzero:
                        return Refuted(identity, options, trials, trial);
                    case TrialOutcome.Undefined:
                        if (++consecutiveUndefined >= options.MaxConsecutiveUndefined)
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
                if (accumulated <= -options.TargetBits) break;
            }
            if (stageZero) newStages++;
        }
        return new ScreenResult(Verdict.Survived, bounds.Degree, bounds.HeightLog2, accumulated, trials, null, false, null);
    }

    /// <summary>
    /// How many trials the next block on <paramref name="rung"/> runs: as many as reach the target if all of them vanish,
    /// at most <see cref="BlockTrialRunner.MaxLanes"/> and within the trial budget.
    /// </summary>
    private static int StageLanes(CompiledIdentity identity, Rung rung, ScreeningOptions options, double accumulated, int trialCount)
    {
        var bits = -(Evidence.TrialBoundLog2(identity.Bounds, rung.SizeLog2, rung.PrimeBits) ?? -1);
        var needed = Math.Ceiling((options.TargetBits + accumulated) / bits - 1e-9);
        var lanes = (int)Math.Clamp(needed, 1, BlockTrialRunner.MaxLanes(rung));
        return Math.Max(1, Math.Min(lanes, options.Limits.MaxTrials - trialCount));
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

    private static ScreenResult Refuted(CompiledIdentity identity, ScreeningOptions options, List<TrialRecord> trials, TrialRecord witness)
    {
        if (identity.Program.IsCondition(witness.Entry))
            return new ScreenResult(Verdict.Invalid, identity.Bounds.Degree, identity.Bounds.HeightLog2, null, trials, witness, false,
                ConditionMessage(witness));
        var certified = options.Certify && WitnessChecker.Certify(identity, witness, options.Limits);
        return new ScreenResult(Verdict.Refuted, identity.Bounds.Degree, identity.Bounds.HeightLog2, null, trials, witness, certified, null);
    }
}
