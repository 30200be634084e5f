using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>
/// One instance of an identity, lowered: lhs − rhs as a straight-line program of plain arithmetic (constants, variables,
/// + − ×, inverse, power by a constant, det/perm/pf of registers), with sums, products, binom, the q-functions, matrix
/// constructs, conditions and family parameters already written out. <see cref="Shape"/> is null when the sides are
/// scalars and (rows, columns) when they are matrices (the program then has one output per entry, after the side
/// conditions; none for 0×0, whose program is the single output 0 − 0). Immutable.
/// </summary>
public sealed record LoweredIdentity(
    IdentityEntry Entry,
    IReadOnlyDictionary<string, BigInteger> Parameters,
    StraightLineProgram Program,
    (int Rows, int Columns)? Shape);

/// <summary>
/// The one place where the expression tree gets its meaning: lowers an identity (its parameters fixed) to a
/// <see cref="LoweredIdentity"/>. Everything downstream reads the lowered program, not the tree: the compiler adds the bounds
/// (<see cref="IdentityCompiler"/>), the SMT-LIB hand-off writes it as a script. Stateless; thread-safe.
/// </summary>
public static class Lowering
{
    private static readonly IReadOnlyDictionary<string, BigInteger> NoParameters = new Dictionary<string, BigInteger>();

    /// <summary>Lowers one instance; errors come back as a <see cref="Diagnostic"/> with the position, never as an exception.</summary>
    public static Result<LoweredIdentity> Lower(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger>? parameters = null, Limits? limits = null)
    {
        limits ??= Limits.Default;
        parameters ??= NoParameters;
        if (entry.Field.CharacteristicParameter is not null)
        {
            // over GF(p) with p a family parameter: this instance's field.
            var field = entry.Field.Bind(parameters, limits.MaxFieldBits);
            if (!field.Success) return field.Cast<LoweredIdentity>();
            entry = entry with { Field = field.Value };
        }
        var context = new LoweringContext(limits, parameters, shareParameters: false, Series(entry.Field));
        try
        {
            var (program, shape) = new ExpressionLowering(context).LowerDifference(entry.Left, entry.Right);
            return Result<LoweredIdentity>.Ok(new LoweredIdentity(entry, parameters, program, shape));
        }
        catch (CompileError e)
        {
            var order = entry.Parameters.Count > 0 ? entry.Parameters.Select(p => p.Name).ToList()
                : parameters.Keys.OrderBy(k => k, StringComparer.Ordinal).ToList();
            return Result<LoweredIdentity>.Fail(e.ToDiagnostic(context.Side, parameters, order));
        }
        catch (ProgramTooLargeException)
        {
            return Result<LoweredIdentity>.Fail(new Diagnostic(context.LastPosition,
                $"the identity expands to more than {limits.MaxProgramSize} instructions (the limit MaxProgramSize)"));
        }
        catch (InsufficientExecutionStackException)
        {
            return Result<LoweredIdentity>.Fail(new Diagnostic(context.LastPosition,
                $"the expression is nested too deeply to compile (see the limit MaxNestingDepth, {limits.MaxNestingDepth})"));
        }
    }

    /// <summary>
    /// Lowers a family's expression once for all its instances, with its parameters kept as constants of their own
    /// (<paramref name="parameters"/> is any one instance's values); null when a parameter fixes the structure or this
    /// instance does not lower (see <see cref="IdentityCompiler.CompileTemplate"/>).
    /// </summary>
    internal static StraightLineProgram? LowerShared(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters, Limits limits)
    {
        var context = new LoweringContext(limits, parameters, shareParameters: true, Series(entry.Field));
        try
        {
            var (program, _) = new ExpressionLowering(context).LowerDifference(entry.Left, entry.Right);
            return context.ParameterFixesStructure ? null : program;
        }
        catch (Exception e) when (e is CompileError or ProgramTooLargeException or InsufficientExecutionStackException)
        {
            return null;
        }
    }

    private static (string, int)? Series(FieldSpec field) => field.SeriesVariable is { } q ? (q, field.SeriesOrder) : null;
}
