using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>The outcome of re-evaluating a stored witness: the difference found, and at which entry.</summary>
public sealed record RecheckResult(bool Defined, BigInteger[]? Difference, string? Entry)
{
    public bool Refutes => Defined && Difference is not null;
}

/// <summary>
/// Re-checks refutations from the stored field and point alone (no seed), with a general-purpose field implementation
/// independent of the fast rungs; and certifies refutations over Q by exact rational evaluation. Stateless.
/// </summary>
public static class WitnessChecker
{
    /// <summary>Evaluates lhs − rhs in the witness's field at its point.</summary>
    public static RecheckResult Recheck(CompiledIdentity identity, TrialField field, IReadOnlyList<PointValue> point)
    {
        if (field.DefiningPolynomial is null)
            return Run<BigPrimeField, BigResidue>(BigPrimeField.Create(field.Modulus), identity, point);
        var extension = ExtensionField<BigPrimeField, BigResidue>.Create(BigPrimeField.Create(field.Modulus), field.DefiningPolynomial);
        return Run<ExtensionField<BigPrimeField, BigResidue>, ExtElement<BigResidue>>(extension, identity, point);
    }

    private static RecheckResult Run<TField, T>(TField field, CompiledIdentity identity, IReadOnlyList<PointValue> point)
        where TField : struct, IField<T> where T : struct
    {
        var program = identity.Program;
        var values = new T[program.Variables.Length];
        var byName = point.ToDictionary(v => v.Name, v => v.Coordinates, StringComparer.Ordinal);
        for (var i = 0; i < values.Length; i++)
        {
            if (program.Variables[i] == identity.Field.SeriesVariable) continue; // the series q itself
            if (!byName.TryGetValue(program.Variables[i], out var coordinates))
                throw new ArgumentException($"the witness gives no value for the variable '{program.Variables[i]}'");
            values[i] = field.FromCoefficients(coordinates);
        }
        return identity.Field.IsSeries ? SeriesTrial.Evaluate<TField, T>(field, identity, values)
            : TrialRunner.EvaluateDifference<TField, T>(field, program, values);
    }

    /// <summary>
    /// Confirms a refutation exactly. Over Q: lhs − rhs evaluated with exact rationals at the witness point (its residues
    /// read as integers) is nonzero, when the estimated size of that evaluation fits <see cref="ScreeningPolicy.MaxCertifyBits"/>.
    /// In characteristic p the field arithmetic is already exact; the witness is confirmed by the independent re-check.
    /// </summary>
    /// <param name="identity">The refuted candidate.</param>
    /// <param name="witness">The trial that refuted it.</param>
    /// <param name="policy">Gives the size limit of the exact evaluation.</param>
    /// <param name="cancellation">Observed inside the exact evaluation; a cancelled certification leaves the refutation uncertified (false).</param>
    public static bool Certify(CompiledIdentity identity, TrialRecord witness, ScreeningPolicy policy, CancellationToken cancellation = default)
    {
        if (!identity.Field.IsRationals)
            return Recheck(identity, witness.Field, witness.Point).Refutes;
        if (identity.Field.IsSeries)
        {
            // exact rationals in Q[q]/(q^(N+1)) at the witness point, read as integers
            var exact = new Rational[identity.Program.Variables.Length];
            var given = witness.Point.ToDictionary(v => v.Name, v => v.Coordinates[0], StringComparer.Ordinal);
            for (var i = 0; i < exact.Length; i++)
                exact[i] = identity.Program.Variables[i] == identity.Field.SeriesVariable ? Rational.Zero : given[identity.Program.Variables[i]];
            if (BoundAnalysis.ExactEvaluationBits(identity.Program, given.Count == 0 ? 1 : given.Values.Max(v => (double)v.GetBitLength()), policy.MaxCertifyBits) * (identity.Field.SeriesOrder + 1) > policy.MaxCertifyBits) return false;
            return SeriesTrial.Evaluate<RationalField, Rational>(default, identity, exact).Refutes;
        }
        var program = identity.Program;
        var coordinateBits = witness.Point.Count == 0 ? 1 : witness.Point.Max(v => (double)v.Coordinates[0].GetBitLength());
        if (BoundAnalysis.ExactEvaluationBits(program, coordinateBits, policy.MaxCertifyBits) > policy.MaxCertifyBits) return false;
        var field = default(RationalField);
        var values = new Rational[program.Variables.Length];
        var byName = witness.Point.ToDictionary(v => v.Name, v => v.Coordinates[0], StringComparer.Ordinal);
        for (var i = 0; i < values.Length; i++) values[i] = byName[program.Variables[i]];
        if (!Evaluator.TryPrepareConstants<RationalField, Rational>(field, program, out var constants)) return false;
        var registers = new Rational[program.Length];
        try
        {
            if (!Evaluator.Evaluate<RationalField, Rational>(field, program, constants, values, registers, cancellation)) return false;
        }
        catch (OperationCanceledException)
        {
            return false;
        }
        foreach (var o in program.Outputs)
            if (!registers[o].IsZero) return true;
        return false;
    }
}
