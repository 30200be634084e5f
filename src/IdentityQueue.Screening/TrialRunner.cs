using System.Diagnostics;
using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// Runs one trial: draws the field of the rung (a random prime, or a random irreducible polynomial) and a uniform point from
/// the trial's seed, evaluates lhs − rhs, and records the outcome. The same seed gives the same trial. Stateless.
/// </summary>
public static class TrialRunner
{
    /// <param name="identity">The candidate.</param>
    /// <param name="rung">The field size of the trial.</param>
    /// <param name="seq">The trial's sequence number, recorded with it.</param>
    /// <param name="pointSeed">Fixes the trial's field and point.</param>
    /// <param name="cancellation">Observed inside the evaluation (see <see cref="Evaluator.Evaluate{TField, T}(TField, StraightLineProgram, ReadOnlySpan{T}, ReadOnlySpan{T}, Span{T}, CancellationToken)"/>).</param>
    public static TrialRecord Run(CompiledIdentity identity, Rung rung, int seq, ulong pointSeed, CancellationToken cancellation = default)
    {
        var random = new Xoshiro256(pointSeed);
        var clock = Stopwatch.StartNew();
        if (identity.Field.IsRationals)
        {
            return rung.PrimeBits switch
            {
                31 => Evaluate<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref random), identity, seq, pointSeed, ref random, clock, null, cancellation),
                62 => Evaluate<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref random), identity, seq, pointSeed, ref random, clock, null, cancellation),
                127 => Evaluate<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref random), identity, seq, pointSeed, ref random, clock, null, cancellation),
                _ => Evaluate<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(rung.PrimeBits, ref random), identity, seq, pointSeed, ref random, clock, null, cancellation),
            };
        }
        var p = identity.Field.Characteristic;
        if (rung.ExtensionDegree == 1)
        {
            return p <= long.MaxValue
                ? Evaluate<SmallPrimeField, SmallResidue>(SmallPrimeField.Create((ulong)p), identity, seq, pointSeed, ref random, clock, null, cancellation)
                : Evaluate<BigPrimeField, BigResidue>(BigPrimeField.Create(p), identity, seq, pointSeed, ref random, clock, null, cancellation);
        }
        if (p <= long.MaxValue)
        {
            var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create((ulong)p), rung.ExtensionDegree, ref random);
            return Evaluate<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, identity, seq, pointSeed, ref random, clock, field.DefiningPolynomial, cancellation);
        }
        var big = ExtensionField<BigPrimeField, BigResidue>.Create(BigPrimeField.Create(p), rung.ExtensionDegree, ref random);
        return Evaluate<ExtensionField<BigPrimeField, BigResidue>, ExtElement<BigResidue>>(big, identity, seq, pointSeed, ref random, clock, big.DefiningPolynomial, cancellation);
    }

    private static TrialRecord Evaluate<TField, T>(TField field, CompiledIdentity identity, int seq, ulong pointSeed,
        ref Xoshiro256 random, Stopwatch clock, BigInteger[]? definingPolynomial, CancellationToken cancellation)
        where TField : struct, IField<T> where T : struct
    {
        var point = new T[identity.Program.Variables.Length];
        for (var i = 0; i < point.Length; i++) point[i] = field.Sample(ref random);
        var difference = identity.Field.IsSeries
            ? SeriesTrial.Evaluate<TField, T>(field, identity, point)
            : EvaluateDifference<TField, T>(field, identity.Program, point, cancellation);
        return Record<TField, T>(field, identity, seq, pointSeed, point, definingPolynomial, difference, Elapsed(clock));
    }

    /// <summary>The record of trial <paramref name="seq"/>: undefined, nonzero (the witness) or zero (with its bound).</summary>
    internal static TrialRecord Record<TField, T>(TField field, CompiledIdentity identity, int seq, ulong pointSeed, ReadOnlySpan<T> point,
        BigInteger[]? definingPolynomial, RecheckResult difference, long elapsedMicroseconds)
        where TField : struct, IField<T> where T : struct
    {
        var variables = identity.Program.Variables;
        var trialField = new TrialField(field.Characteristic, field.ExtensionDegree, definingPolynomial, field.SizeLog2);
        var pointValues = new PointValue[point.Length];
        if (identity.Field.IsSeries) pointValues = SeriesTrial.Point<TField, T>(field, identity, point);
        else for (var i = 0; i < point.Length; i++) pointValues[i] = new PointValue(variables[i], field.ToCoefficients(point[i]));
        if (!difference.Defined)
            return new TrialRecord(seq, trialField, pointSeed, TrialOutcome.Undefined, pointValues, null, null, null, elapsedMicroseconds);
        if (difference.Refutes)
            return new TrialRecord(seq, trialField, pointSeed, TrialOutcome.Nonzero, pointValues, difference.Difference, difference.Entry, null, elapsedMicroseconds);
        var bound = Evidence.TrialBoundLog2(identity.Bounds, field.SizeLog2, identity.Field.IsRationals ? (int)field.Characteristic.GetBitLength() : null);
        return new TrialRecord(seq, trialField, pointSeed, TrialOutcome.Zero, pointValues, null, null, bound ?? 0, elapsedMicroseconds);
    }

    /// <summary>lhs − rhs at a point: undefined, zero (every output vanishes), or the first nonzero output and its entry name.</summary>
    internal static RecheckResult EvaluateDifference<TField, T>(TField field, StraightLineProgram program, T[] point, CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        if (!Evaluator.TryPrepareConstants<TField, T>(field, program, out var constants)) return new RecheckResult(false, null, null);
        var registers = new T[program.Length];
        if (!Evaluator.Evaluate<TField, T>(field, program, constants, point, registers, cancellation)) return new RecheckResult(false, null, null);
        var outputs = new T[program.Outputs.Length];
        for (var o = 0; o < outputs.Length; o++) outputs[o] = registers[program.Outputs[o]];
        return FromOutputs(field, program, outputs, 1, 0);
    }

    /// <summary>
    /// lhs − rhs at a defined point from its outputs (output o of lane <paramref name="lane"/> at o·stride + lane): zero
    /// when every output vanishes, else the first nonzero output and its entry name.
    /// </summary>
    internal static RecheckResult FromOutputs<TField, T>(TField field, StraightLineProgram program, ReadOnlySpan<T> outputs, int stride, int lane)
        where TField : struct, IField<T> where T : struct
    {
        for (var o = 0; o < program.Outputs.Length; o++)
        {
            var value = outputs[o * stride + lane];
            if (!field.IsZero(value))
                return new RecheckResult(true, field.ToCoefficients(value), program.OutputName(o));
        }
        return new RecheckResult(true, null, null);
    }

    private static long Elapsed(Stopwatch clock) => (long)(clock.Elapsed.TotalMicroseconds);
}
