using System.Numerics;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Algebra.Compile;

/// <summary>The operations of a straight-line program. Instruction i writes register i.</summary>
public enum OpCode : byte
{
    /// <summary>The rational constant <c>Constants[A]</c>.</summary>
    Constant,
    /// <summary>The variable <c>Variables[A]</c>.</summary>
    Variable,
    Add,
    Subtract,
    Multiply,
    Negate,
    /// <summary>1/A; undefined where A vanishes.</summary>
    Invert,
    /// <summary>A^<c>Exponents[B]</c>.</summary>
    Power,
    /// <summary>Determinant of the B×B matrix whose registers, row by row, are <c>Operands[A .. A+B·B]</c>.</summary>
    Determinant,
    /// <summary>Permanent, operands as for <see cref="Determinant"/>.</summary>
    Permanent,
    /// <summary>Pfaffian of a skew-symmetric B×B matrix, operands as for <see cref="Determinant"/>.</summary>
    Pfaffian,
}

/// <summary>One instruction; operand meanings depend on <see cref="Op"/>.</summary>
public readonly record struct Instruction(OpCode Op, int A, int B);

/// <summary>
/// A compiled expression: instructions in dependency order with hash-consed common subexpressions, the
/// tables they refer to, and the output registers (one for a scalar identity, one per entry for a matrix
/// identity). Immutable once built; safe to share between threads and between trials.
/// </summary>
public sealed class StraightLineProgram
{
    internal StraightLineProgram(
        Instruction[] instructions, Rational[] constants, BigInteger[] exponents, int[] operands,
        string[] variables, int[] outputs, string[] outputNames, IReadOnlyDictionary<string, int>? parameterConstants = null,
        string[]? conditionNames = null)
    {
        ConditionNames = conditionNames ?? [];
        ParameterConstants = parameterConstants;
        Instructions = instructions;
        Constants = constants;
        Exponents = exponents;
        Operands = operands;
        Variables = variables;
        Outputs = outputs;
        OutputNames = outputNames;
    }

    public Instruction[] Instructions { get; }
    public Rational[] Constants { get; }
    public BigInteger[] Exponents { get; }
    /// <summary>Register lists of matrix instructions.</summary>
    public int[] Operands { get; }
    /// <summary>Evaluated variable names in order of first appearance: <c>x</c>, <c>x[3]</c>, <c>a[1,2]</c>.</summary>
    public string[] Variables { get; }
    /// <summary>
    /// Registers that must vanish: first the side conditions (<see cref="ConditionNames"/>), then lhs − rhs (entrywise for
    /// matrices).
    /// </summary>
    public int[] Outputs { get; }
    /// <summary>Empty for a scalar identity; <c>[i,j]</c> per lhs − rhs output of a matrix identity (after the conditions).</summary>
    public string[] OutputNames { get; }

    /// <summary>
    /// The side conditions, one per leading output: values that must vanish for the identity to make sense (the
    /// skew-symmetry of a Pfaffian's argument, where the entries are not written as negatives of each other). A trial where
    /// one does not vanish makes the candidate invalid, with that trial as its witness.
    /// </summary>
    public string[] ConditionNames { get; }

    /// <summary>The name of output <paramref name="o"/>: a condition's name, an entry <c>[i,j]</c>, or null for a scalar identity.</summary>
    public string? OutputName(int o) =>
        o < ConditionNames.Length ? ConditionNames[o] : OutputNames.Length > 0 ? OutputNames[o - ConditionNames.Length] : null;

    /// <summary>Whether <paramref name="name"/> (a trial's entry) names a side condition rather than an entry of lhs − rhs.</summary>
    public bool IsCondition(string? name) => name is not null && Array.IndexOf(ConditionNames, name) >= 0;

    public int Length => Instructions.Length;

    /// <summary>
    /// For a family's shared program (<see cref="FamilyTemplate"/>): which entry of <see cref="Constants"/> holds each
    /// parameter's value; null for a program compiled with its parameters fixed.
    /// </summary>
    public IReadOnlyDictionary<string, int>? ParameterConstants { get; }

    /// <summary>
    /// This shared program with other parameter values: the instructions and tables are shared, only the constants are
    /// copied with the parameters' entries replaced.
    /// </summary>
    public StraightLineProgram WithParameters(IReadOnlyDictionary<string, BigInteger> parameters)
    {
        if (ParameterConstants is null) throw new InvalidOperationException("the program was compiled with its parameters fixed");
        var constants = (Rational[])Constants.Clone();
        foreach (var (name, index) in ParameterConstants)
        {
            if (!parameters.TryGetValue(name, out var value)) throw new ArgumentException($"no value for the parameter '{name}'", nameof(parameters));
            constants[index] = value;
        }
        return new StraightLineProgram(Instructions, constants, Exponents, Operands, Variables, Outputs, OutputNames, ParameterConstants, ConditionNames);
    }
}
