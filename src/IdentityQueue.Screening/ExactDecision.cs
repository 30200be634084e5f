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

    /// <summary>Longest value written into a message before it is cut (the digits are counted).</summary>
    private const int MaxShownDigits = 120;

    /// <summary>
    /// The verdict of a constant identity, or null when the identity has variables or its exact evaluation would exceed
    /// <see cref="Limits.MaxCertifyBits"/> (then it is screened like any other). Survived and refuted verdicts carry no
    /// trials and no error bound; <see cref="ScreenResult.Certified"/> is true and the message gives the values.
    /// </summary>
    public static ScreenResult? TryDecide(CompiledIdentity identity, Limits limits)
    {
        var program = identity.Program;
        if (program.Variables.Length != 0) return null;
        if (identity.Field.IsRationals)
        {
            if (BoundAnalysis.ExactEvaluationBits(program, 1, limits.MaxCertifyBits) > limits.MaxCertifyBits) return null;
            return Decide<RationalField, Rational>(identity, default, v => v.ToString());
        }
        var field = BigPrimeField.Create(identity.Field.Characteristic);
        return Decide<BigPrimeField, BigResidue>(identity, field, v => v.Value.ToString());
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

    private static string In(CompiledIdentity identity) =>
        identity.Field.IsRationals ? "" : $" in GF({identity.Field.Characteristic})";

    private static string Cut(string digits) =>
        digits.Length <= MaxShownDigits ? digits : $"{digits[..(MaxShownDigits / 2)]}…{digits[^(MaxShownDigits / 2)..]} ({digits.Length} characters)";
}
