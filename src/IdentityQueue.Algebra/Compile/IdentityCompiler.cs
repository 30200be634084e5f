using System.Numerics;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Lower;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>One instance of an identity, compiled: the program of lhs − rhs, its bounds, and where it came from. Immutable.</summary>
public sealed record CompiledIdentity(
    IdentityEntry Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    StraightLineProgram Program,
    IdentityBounds Bounds)
{
    public FieldSpec Field => Entry.Field;
    public bool IsMatrixIdentity => Program.OutputNames.Length > 0;
}

/// <summary>
/// Compiles an identity (with its family parameters fixed): the public lowering step (<see cref="Lowering"/>: sums,
/// products, q-functions and matrix operations expanded, types checked, integer parameter expressions evaluated exactly)
/// gives the straight-line program of lhs − rhs, and <see cref="BoundAnalysis"/> its bounds. Stateless; thread-safe.
/// </summary>
public static class IdentityCompiler
{
    /// <summary>Compiles one instance; errors come back as a <see cref="Diagnostic"/> with the position, never as an exception.</summary>
    public static Result<CompiledIdentity> Compile(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger>? parameters = null, Limits? limits = null)
    {
        var lowered = Lowering.Lower(entry, parameters, limits);
        if (!lowered.Success) return lowered.Cast<CompiledIdentity>();
        var (bound, values, program, _) = lowered.Value;
        return Result<CompiledIdentity>.Ok(new CompiledIdentity(bound, values, program, BoundAnalysis.Analyse(program)));
    }

    /// <summary>
    /// Compiles a family's expression once for all its instances, with its parameters kept as constants of their own
    /// (<paramref name="parameters"/> is any one instance's values). Null when that cannot be: a parameter fixes the
    /// structure (a range, an exponent, an index, a matrix size, an argument of binom or a q-function), or this instance does
    /// not compile; then each instance is compiled with its parameters fixed.
    /// </summary>
    public static FamilyTemplate? CompileTemplate(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters, Limits? limits = null)
    {
        if (parameters.Count == 0 || entry.Field.CharacteristicParameter is not null) return null;
        var program = Lowering.LowerShared(entry, parameters, limits ?? Limits.Default);
        return program is null ? null : new FamilyTemplate(entry, program);
    }
}
