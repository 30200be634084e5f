using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// Evaluates a truncated power series identity (<c>up to q^N</c>) in F[q]/(q^(N+1)): q is the series q, every other
/// variable a constant. The first coefficient of lhs − rhs that is not 0 refutes it, named with both sides' coefficients.
/// Why a trial's bound is D/|F| as for any identity: with Δ = A/B over a common denominator (B a unit in the series ring),
/// Δ ≡ 0 mod q^(N+1) exactly when the coefficients a_0..a_N of A (polynomials in the other variables of degree ≤ D) all
/// vanish; if a_k is the first that does not, it vanishes at a random point with probability ≤ D/|F|, and otherwise the
/// evaluated series has a nonzero coefficient at or below q^k. Stateless.
/// </summary>
public static class SeriesTrial
{
    /// <summary>lhs − rhs as series at <paramref name="point"/> (indexed like the program's variables; the series variable's slot is ignored).</summary>
    public static RecheckResult Evaluate<TField, T>(TField field, CompiledIdentity identity, ReadOnlySpan<T> point)
        where TField : struct, IField<T> where T : struct
    {
        var program = identity.Program;
        var ring = new SeriesRing<TField, T>(field, identity.Field.SeriesOrder);
        var values = new Series<T>[point.Length];
        for (var i = 0; i < values.Length; i++)
            values[i] = program.Variables[i] == identity.Field.SeriesVariable ? ring.Q : ring.Constant(point[i]);
        if (!Evaluator.TryPrepareConstants<SeriesRing<TField, T>, Series<T>>(ring, program, out var constants)) return new RecheckResult(false, null, null);
        var registers = new Series<T>[program.Length];
        if (!Evaluator.Evaluate<SeriesRing<TField, T>, Series<T>>(ring, program, constants, values, registers)) return new RecheckResult(false, null, null);
        for (var o = 0; o < program.Outputs.Length; o++)
        {
            var difference = registers[program.Outputs[o]];
            var k = ring.FirstNonzero(difference);
            if (k < 0) continue;
            var ins = program.Instructions[program.Outputs[o]];
            string Coefficient(int register) => Show(field, registers[register].Coefficients[k]);
            var sides = ins.Op == OpCode.Subtract && o >= program.ConditionNames.Length
                ? $" (lhs {Coefficient(ins.A)}, rhs {Coefficient(ins.B)})" : "";
            var name = program.OutputName(o);
            var entry = program.IsCondition(name) ? name
                : $"coefficient of {identity.Field.SeriesVariable}^{k}{(name is null ? "" : $" at entry {name}")}{sides}";
            var value = difference.Coefficients[k];
            return new RecheckResult(true, value is Algebra.Exact.Rational { IsInteger: false } ? [BigInteger.One] : field.ToCoefficients(value), entry);
        }
        return new RecheckResult(true, null, null);
    }

    private static string Show<TField, T>(TField field, T value) where TField : struct, IField<T> where T : struct
    {
        if (value is Algebra.Exact.Rational exact) return exact.ToString(); // exact coefficients may be fractions
        var c = field.ToCoefficients(value);
        return c.Length == 1 ? c[0].ToString() : $"[{string.Join(", ", c)}]";
    }

    /// <summary>The point's values without the series variable (which is q itself, not a random value).</summary>
    public static PointValue[] Point<TField, T>(TField field, CompiledIdentity identity, ReadOnlySpan<T> point)
        where TField : struct, IField<T> where T : struct
    {
        var result = new List<PointValue>(point.Length);
        for (var i = 0; i < point.Length; i++)
            if (identity.Program.Variables[i] != identity.Field.SeriesVariable)
                result.Add(new PointValue(identity.Program.Variables[i], field.ToCoefficients(point[i])));
        return [.. result];
    }
}
