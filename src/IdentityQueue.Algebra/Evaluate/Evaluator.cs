using System.Buffers;
using System.Runtime.CompilerServices;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Runs a <see cref="StraightLineProgram"/> over any field, at one point. One generic implementation: the field is a
/// struct type parameter, so the JIT makes a specialised copy per rung. Stateless; thread-safe (callers own the buffers).
/// </summary>
public static class Evaluator
{
    /// <summary>Instructions between two looks at the cancellation token (a power of two; some microseconds of work).</summary>
    public const int CancellationInterval = 4096;

    /// <summary>
    /// The program's constants as field elements, or false when a constant's denominator is 0 in the field
    /// (then every point is undefined in this field).
    /// </summary>
    public static bool TryPrepareConstants<TField, T>(TField field, StraightLineProgram program, out T[] constants)
        where TField : struct, IField<T> where T : struct
    {
        constants = new T[program.Constants.Length];
        for (var i = 0; i < constants.Length; i++)
            if (!TryConstant(field, program.Constants[i], out constants[i])) return false;
        return true;
    }

    /// <summary>The rational constant <paramref name="c"/> in <paramref name="field"/>, or false when its denominator is 0 there.</summary>
    public static bool TryConstant<TField, T>(TField field, Exact.Rational c, out T value)
        where TField : struct, IField<T> where T : struct
    {
        var numerator = field.FromInteger(c.Numerator);
        if (c.IsInteger) { value = numerator; return true; }
        if (!field.TryInvert(field.FromInteger(c.Denominator), out var inverse)) { value = field.Zero; return false; }
        value = field.Multiply(numerator, inverse);
        return true;
    }

    /// <summary>
    /// Evaluates every register at <paramref name="point"/> (indexed like <see cref="StraightLineProgram.Variables"/>);
    /// false when a division by zero made the point undefined. <paramref name="registers"/> needs <see cref="StraightLineProgram.Length"/> slots.
    /// </summary>
    /// <param name="field">The field the program is evaluated in.</param>
    /// <param name="program">The program.</param>
    /// <param name="constants">The program's constants in the field (see <see cref="TryPrepareConstants{TField, T}"/>).</param>
    /// <param name="point">The variables' values.</param>
    /// <param name="registers">Receives every register's value.</param>
    /// <param name="cancellation">
    /// Looked at every <see cref="CancellationInterval"/> instructions and inside the matrix kernels; a cancelled evaluation
    /// throws <see cref="OperationCanceledException"/>.
    /// </param>
    public static bool Evaluate<TField, T>(TField field, StraightLineProgram program, ReadOnlySpan<T> constants, ReadOnlySpan<T> point, Span<T> registers,
        CancellationToken cancellation = default)
        where TField : struct, IField<T> where T : struct
    {
        var instructions = program.Instructions;
        T[]? scratch = null; // for matrix functions: rented, so that repeated evaluations do not allocate
        try
        {
            return Run(field, program, constants, point, registers, instructions, ref scratch, cancellation);
        }
        finally
        {
            if (scratch is not null) Return(scratch);
        }
    }

    /// <summary>Gives a rented scratch back, cleared when its elements hold references (so that the pool keeps none alive).</summary>
    private static void Return<T>(T[] scratch) =>
        ArrayPool<T>.Shared.Return(scratch, clearArray: RuntimeHelpers.IsReferenceOrContainsReferences<T>());

    private static bool Run<TField, T>(TField field, StraightLineProgram program, ReadOnlySpan<T> constants, ReadOnlySpan<T> point,
        Span<T> registers, Instruction[] instructions, ref T[]? scratch, CancellationToken cancellation)
        where TField : struct, IField<T> where T : struct
    {
        for (var i = 0; i < instructions.Length; i++)
        {
            if ((i & (CancellationInterval - 1)) == 0) cancellation.ThrowIfCancellationRequested();
            var ins = instructions[i];
            switch (ins.Op)
            {
                case OpCode.Constant: registers[i] = constants[ins.A]; break;
                case OpCode.Variable: registers[i] = point[ins.A]; break;
                case OpCode.Add: registers[i] = field.Add(registers[ins.A], registers[ins.B]); break;
                case OpCode.Subtract: registers[i] = field.Subtract(registers[ins.A], registers[ins.B]); break;
                case OpCode.Multiply: registers[i] = field.Multiply(registers[ins.A], registers[ins.B]); break;
                case OpCode.Negate: registers[i] = field.Negate(registers[ins.A]); break;
                case OpCode.Invert:
                    if (!field.TryInvert(registers[ins.A], out var inverse)) return false;
                    registers[i] = inverse;
                    break;
                case OpCode.Power: registers[i] = FieldMath.Pow(field, registers[ins.A], program.Exponents[ins.B]); break;
                default:
                {
                    var n = ins.B;
                    if (scratch is null || scratch.Length < n * n)
                    {
                        if (scratch is not null) Return(scratch);
                        scratch = ArrayPool<T>.Shared.Rent(n * n);
                    }
                    var m = scratch.AsSpan(0, n * n);
                    var ops = program.Operands.AsSpan(ins.A, n * n);
                    for (var k = 0; k < m.Length; k++) m[k] = registers[ops[k]];
                    registers[i] = ins.Op switch
                    {
                        OpCode.Determinant => MatrixKernels.Determinant(field, m, n, cancellation),
                        OpCode.Permanent => MatrixKernels.Permanent(field, m, n, cancellation),
                        _ => MatrixKernels.Pfaffian(field, m, n, cancellation),
                    };
                    break;
                }
            }
        }
        return true;
    }
}
