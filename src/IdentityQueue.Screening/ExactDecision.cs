using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// Decides an identity without variables by one exact evaluation (over Q in rationals, over GF(p^k) in GF(p), where its
/// constants live): no random point, no error bound. Stateless; thread-safe.
/// </summary>
public static class ExactDecision
{
    /// <summary>The prefix of every message of an exactly decided candidate.</summary>
    public const string Prefix = "decided exactly (no variables)";

    /// <summary>Most coefficient operations of an exact series evaluation (registers × (N+1)²); beyond, it is screened.</summary>
    private const double MaxSeriesOperations = 1 << 25;

    /// <summary>Longest value written into a message before it is cut (the digits are counted).</summary>
    private const int MaxShownDigits = 120;

    /// <summary>
    /// The verdict of a constant identity, or null when the identity has variables or its exact evaluation would exceed
    /// <see cref="ScreeningPolicy.MaxCertifyBits"/> (then it is screened like any other). Survived and refuted verdicts carry no
    /// trials and no error bound; <see cref="ScreenResult.Certified"/> is true and the message gives the values.
    /// </summary>
    public static ScreenResult? TryDecide(CompiledIdentity identity, ScreeningPolicy policy)
    {
        var program = identity.Program;
        if (identity.Field.IsSeries && program.Variables.All(v => v == identity.Field.SeriesVariable)) return DecideSeries(identity, policy);
        if (program.Variables.Length != 0) return null;
        if (identity.Field.IsRationals)
        {
            if (BoundAnalysis.ExactEvaluationBits(program, 1, policy.MaxCertifyBits) > policy.MaxCertifyBits) return null;
            return Decide<RationalField, Rational>(identity, default, v => v.ToString());
        }
        var field = BigPrimeField.Create(identity.Field.Characteristic);
        return Decide<BigPrimeField, BigResidue>(identity, field, v => v.ToString());
    }

    private static ScreenResult Decide<TField, T>(CompiledIdentity identity, TField field, Func<T, string> show)
        where TField : struct, IField<T> where T : struct
    {
        var program = identity.Program;
        var bounds = identity.Bounds;
        var registers = new T[program.Length];
        if (!Evaluator.TryPrepareConstants<TField, T>(field, program, out var constants)
            || !Evaluator.Evaluate<TField, T>(field, program, constants, ReadOnlySpan<T>.Empty, registers))
            return new ScreenResult(Verdict.Invalid, bounds.Degree, bounds.HeightLog2, null, [], null, false,
                $"{Prefix}: a denominator is 0{In(identity)}, so lhs − rhs is not defined");
        for (var i = 0; i < program.Outputs.Length; i++)
        {
            var o = program.Outputs[i];
            if (field.IsZero(registers[o])) continue;
            if (i < program.ConditionNames.Length)
                return new ScreenResult(Verdict.Invalid, bounds.Degree, bounds.HeightLog2, null, [], null, false,
                    $"{Prefix}: {program.ConditionNames[i]} is {Cut(show(registers[o]))}, not 0{In(identity)}");
            // The output is the unfolded lhs − rhs of the entry (IdentityCompiler.CompileDifference), so its operands are the sides.
            var ins = program.Instructions[o];
            var (lhs, rhs) = ins.Op == OpCode.Subtract ? (Cut(show(registers[ins.A])), Cut(show(registers[ins.B]))) : (Cut(show(registers[o])), "0");
            var entry = program.OutputName(i) is { } name ? $" at entry {name}" : "";
            return new ScreenResult(Verdict.Refuted, bounds.Degree, bounds.HeightLog2, null, [], null, true,
                $"{Prefix}: {lhs} ≠ {rhs}{entry}{In(identity)}");
        }
        var value = program.Outputs.Length == 1 && program.Instructions[program.Outputs[0]] is { Op: OpCode.Subtract } s
            ? $": both sides are {Cut(show(registers[s.A]))}" : ": every entry of the two sides agrees";
        return new ScreenResult(Verdict.Survived, bounds.Degree, bounds.HeightLog2, null, [], null, true,
            $"{Prefix}{value}{In(identity)}; this is a proof, not screening evidence");
    }

    /// <summary>The prefix of the message of a power series identity in q alone, decided exactly.</summary>
    public const string SeriesPrefix = "decided exactly (no variable but the series variable)";

    /// <summary>A power series identity whose only variable is q: its coefficients up to q^N computed exactly (over Q, or in GF(p)).</summary>
    private static ScreenResult? DecideSeries(CompiledIdentity identity, ScreeningPolicy policy)
    {
        var program = identity.Program;
        if (identity.Field.IsRationals)
        {
            // Each register holds N + 1 coefficients and a product costs up to (N + 1)² operations on them; their sizes are
            // those of an exact evaluation at q = 1 at most (coefficients of a truncation of a series with integer-bounded terms).
            var n = (double)identity.Field.SeriesOrder + 1;
            if (program.Length * n * n > MaxSeriesOperations
                || BoundAnalysis.ExactEvaluationBits(program, 0, policy.MaxCertifyBits) > policy.MaxCertifyBits) return null;
            return SeriesVerdict(identity, SeriesTrial.Evaluate<RationalField, Rational>(default, identity, new Rational[program.Variables.Length]));
        }
        var field = BigPrimeField.Create(identity.Field.Characteristic);
        return SeriesVerdict(identity, SeriesTrial.Evaluate<BigPrimeField, BigResidue>(field, identity, new BigResidue[program.Variables.Length]));
    }

    private static ScreenResult SeriesVerdict(CompiledIdentity identity, RecheckResult r)
    {
        var bounds = identity.Bounds;
        var q = identity.Field.SeriesVariable;
        if (!r.Defined)
            return new ScreenResult(Verdict.Invalid, bounds.Degree, bounds.HeightLog2, null, [], null, false,
                $"{SeriesPrefix}: a divisor is not invertible as a power series in {q} (its constant term is 0){In(identity)}");
        if (r.Refutes)
            return new ScreenResult(identity.Program.IsCondition(r.Entry) ? Verdict.Invalid : Verdict.Refuted, bounds.Degree, bounds.HeightLog2,
                null, [], null, true, $"{SeriesPrefix}: the {r.Entry} differ{In(identity)}".Replace("the coefficient of", "coefficients of"));
        return new ScreenResult(Verdict.Survived, bounds.Degree, bounds.HeightLog2, null, [], null, true,
            $"{SeriesPrefix}: the coefficients of both sides agree up to {q}^{identity.Field.SeriesOrder}{In(identity)}; this is a proof, not screening evidence");
    }

    private static string In(CompiledIdentity identity) =>
        identity.Field.IsRationals ? "" : $" in GF({identity.Field.Characteristic})";

    private static string Cut(string digits) =>
        digits.Length <= MaxShownDigits ? digits : $"{digits[..(MaxShownDigits / 2)]}…{digits[^(MaxShownDigits / 2)..]} ({digits.Length} characters)";
}
