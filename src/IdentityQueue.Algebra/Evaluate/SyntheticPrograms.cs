using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>Straight-line programs built directly (not compiled from an identity), for measurements. Stateless.</summary>
public static class SyntheticPrograms
{
    /// <summary>
    /// The benchmark workload of the C reference kernels: <paramref name="registers"/> variables r_0 … r_(k−1), then
    /// <paramref name="steps"/> updates r_c ← r_a·r_b + r_c with a, b, c drawn uniformly (a Multiply followed by the Add
    /// that is its only use, so the block program fuses each pair into one multiply-add). The outputs are the final values
    /// of all registers, named <c>r[i]</c>. Deterministic for a seed.
    /// </summary>
    public static StraightLineProgram RandomMultiplyAdd(int registers, int steps, ulong seed)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(registers, 1);
        ArgumentOutOfRangeException.ThrowIfNegative(steps);
        var random = new Xoshiro256(seed);
        var instructions = new Instruction[checked(registers + 2 * steps)];
        var current = new int[registers];
        var variables = new string[registers];
        for (var i = 0; i < registers; i++)
        {
            instructions[i] = new Instruction(OpCode.Variable, i, 0);
            current[i] = i;
            variables[i] = $"r[{i}]";
        }
        var next = registers;
        for (var k = 0; k < steps; k++)
        {
            var a = (int)random.NextBelow((ulong)registers);
            var b = (int)random.NextBelow((ulong)registers);
            var c = (int)random.NextBelow((ulong)registers);
            instructions[next] = new Instruction(OpCode.Multiply, current[a], current[b]);
            instructions[next + 1] = new Instruction(OpCode.Add, next, current[c]);
            current[c] = next + 1;
            next += 2;
        }
        return new StraightLineProgram(instructions, Array.Empty<Rational>(), Array.Empty<BigInteger>(), Array.Empty<int>(),
            variables, current, (string[])variables.Clone());
    }
}
