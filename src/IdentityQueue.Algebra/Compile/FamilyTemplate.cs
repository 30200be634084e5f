using System.Numerics;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// A family's expression compiled once for all its instances (<see cref="IdentityCompiler.CompileTemplate"/>): the
/// parameters are constants of their own, so an instance is the shared program with its values bound into the constant
/// table, and its bounds are computed from those values. Immutable; safe to share between threads.
/// </summary>
public sealed class FamilyTemplate
{
    internal FamilyTemplate(IdentityEntry entry, StraightLineProgram program)
    {
        Entry = entry;
        Program = program;
    }

    public IdentityEntry Entry { get; }

    /// <summary>The shared program (with the values of the instance it was compiled from).</summary>
    public StraightLineProgram Program { get; }

    /// <summary>The instance with <paramref name="parameters"/>: what compiling it alone gives, up to folding of its constants.</summary>
    public Result<CompiledIdentity> Instance(IReadOnlyDictionary<string, BigInteger> parameters)
    {
        // A family whose parameters appear nowhere in the expression: every instance is the same program.
        var program = Program.ParameterConstants is null ? Program : Program.WithParameters(parameters);
        return Result<CompiledIdentity>.Ok(new CompiledIdentity(Entry, parameters, program, BoundAnalysis.Analyse(program)));
    }
}
