using System.Numerics;
using IdentityQueue.Algebra.Compile;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>The operations of a <see cref="BlockProgram"/>; operands are slots (rows of the [slot][lane] register file).</summary>
internal enum BlockOpCode : byte
{
    /// <summary>Dest ← the points' variable A.</summary>
    Variable,
    Add,
    Subtract,
    Multiply,
    Negate,
    /// <summary>Dest ← 1/A; a lane where A vanishes is undefined.</summary>
    Invert,
    /// <summary>Dest ← A^e with e the exponent plan B.</summary>
    Power,
    /// <summary>Dest ← A·B + C (a Multiply fused into the Add that is its only use).</summary>
    MultiplyAdd,
    /// <summary>Dest ← A·B − C.</summary>
    MultiplySubtract,
    /// <summary>Dest ← C − A·B.</summary>
    NegativeMultiplyAdd,
    /// <summary>Dest ← det of the B×B matrix whose slots, row by row, are <c>MatrixSlots[A .. A+B·B]</c>.</summary>
    Determinant,
    /// <summary>Dest ← permanent, operands as for <see cref="Determinant"/>.</summary>
    Permanent,
    /// <summary>Dest ← Pfaffian, operands as for <see cref="Determinant"/>.</summary>
    Pfaffian,
}

/// <summary>One block operation; the meaning of A, B and C depends on <see cref="Op"/>.</summary>
internal readonly record struct BlockInstruction(BlockOpCode Op, int Dest, int A, int B, int C);

/// <summary>An exponent as left-to-right square-and-multiply steps: the bits after the leading one, most significant first.</summary>
internal sealed record ExponentPlan(bool IsZero, bool[] Bits);

/// <summary>
/// A <see cref="StraightLineProgram"/> prepared for evaluation over blocks of points: a Multiply whose only use is an
/// Add or Subtract is fused into it (a·b + c, a·b − c, c − a·b), constants get pinned slots that are filled once per
/// evaluator, and the remaining registers are mapped onto a small set of reusable slots by liveness (a register's slot is
/// freed after its last use), so that the [slot][lane] register file stays in cache. Field-independent, immutable and
/// safe to share between threads; build one per program and evaluate it with <see cref="BlockEvaluator{TField, T}"/>.
/// </summary>
public sealed class BlockProgram
{
    private BlockProgram(StraightLineProgram program, BlockInstruction[] instructions, int slotCount, int[] constantSlots,
        int[] outputSlots, int[] matrixSlots, ExponentPlan[] exponents, int fused)
    {
        Program = program;
        Instructions = instructions;
        SlotCount = slotCount;
        ConstantSlots = constantSlots;
        OutputSlots = outputSlots;
        MatrixSlots = matrixSlots;
        Exponents = exponents;
        FusedMultiplies = fused;
        foreach (var ins in instructions)
        {
            if (ins.Op == BlockOpCode.Permanent) MaxPermanentOrder = Math.Max(MaxPermanentOrder, ins.B);
            else if (ins.Op is BlockOpCode.Determinant or BlockOpCode.Pfaffian) MaxMatrixEntries = Math.Max(MaxMatrixEntries, ins.B * ins.B);
        }
    }

    /// <summary>The program this was prepared from.</summary>
    public StraightLineProgram Program { get; }

    /// <summary>Rows of the register file (pinned constants included); an evaluator holds SlotCount × block size elements.</summary>
    public int SlotCount { get; }

    /// <summary>Operations run per block (fewer than the program's instructions: constants are pinned, products fused).</summary>
    public int OperationCount => Instructions.Length;

    /// <summary>How many Multiply instructions were fused into the Add or Subtract that consumes them.</summary>
    public int FusedMultiplies { get; }

    internal BlockInstruction[] Instructions { get; }
    /// <summary>The slot of each constant of <see cref="StraightLineProgram.Constants"/>, or −1 when no instruction loads it.</summary>
    internal int[] ConstantSlots { get; }
    internal int[] OutputSlots { get; }
    internal int[] MatrixSlots { get; }
    internal ExponentPlan[] Exponents { get; }
    /// <summary>Largest n² of a determinant or Pfaffian operand (0 when there is none).</summary>
    internal int MaxMatrixEntries { get; }
    /// <summary>Largest order of a permanent operand (0 when there is none).</summary>
    internal int MaxPermanentOrder { get; }

    /// <summary>Prepares <paramref name="program"/> with multiply-add fusion.</summary>
    public static BlockProgram Prepare(StraightLineProgram program) => Prepare(program, fuse: true);

    /// <summary>Prepares <paramref name="program"/>; <paramref name="fuse"/> false keeps every Multiply separate (for tests and measurements).</summary>
    internal static BlockProgram Prepare(StraightLineProgram program, bool fuse)
    {
        ArgumentNullException.ThrowIfNull(program);
        var ins = program.Instructions;
        var n = ins.Length;

        // Uses of each register; an output counts as a use that never ends.
        var uses = new int[n];
        var isOutput = new bool[n];
        for (var i = 0; i < n; i++)
        {
            switch (ins[i].Op)
            {
                case OpCode.Add or OpCode.Subtract or OpCode.Multiply: uses[ins[i].A]++; uses[ins[i].B]++; break;
                case OpCode.Negate or OpCode.Invert or OpCode.Power: uses[ins[i].A]++; break;
                case OpCode.Determinant or OpCode.Permanent or OpCode.Pfaffian:
                    foreach (var r in program.Operands.AsSpan(ins[i].A, ins[i].B * ins[i].B)) uses[r]++;
                    break;
            }
        }
        foreach (var o in program.Outputs) { isOutput[o] = true; uses[o]++; }

        // Fusion: a Multiply used once, by an Add or a Subtract, is computed inside that instruction.
        var fusedAway = new bool[n];
        var fusedOperand = new int[n]; // for an Add/Subtract: 0 none, 1 operand A is the product, 2 operand B is
        var fusedCount = 0;
        if (fuse)
        {
            bool Fusable(int r) => ins[r].Op == OpCode.Multiply && uses[r] == 1 && !isOutput[r];
            for (var j = 0; j < n; j++)
            {
                var x = ins[j];
                if (x.Op is not (OpCode.Add or OpCode.Subtract) || x.A == x.B) continue;
                var which = Fusable(x.B) ? 2 : Fusable(x.A) ? 1 : 0;
                if (which == 0) continue;
                fusedOperand[j] = which;
                fusedAway[which == 1 ? x.A : x.B] = true;
                fusedCount++;
            }
        }

        // The operations in register terms (dest register, operand registers), before slots are assigned.
        var ops = new List<(BlockOpCode Op, int Dest, int A, int B, int C)>(n);
        var matrixRegisters = new List<int>();
        for (var i = 0; i < n; i++)
        {
            var x = ins[i];
            if (fusedAway[i] || x.Op == OpCode.Constant) continue;
            switch (x.Op)
            {
                case OpCode.Variable: ops.Add((BlockOpCode.Variable, i, x.A, -1, -1)); break;
                case OpCode.Add or OpCode.Subtract when fusedOperand[i] != 0:
                {
                    var product = fusedOperand[i] == 1 ? x.A : x.B;
                    var other = fusedOperand[i] == 1 ? x.B : x.A;
                    var code = x.Op == OpCode.Add ? BlockOpCode.MultiplyAdd
                        : fusedOperand[i] == 1 ? BlockOpCode.MultiplySubtract : BlockOpCode.NegativeMultiplyAdd;
                    ops.Add((code, i, ins[product].A, ins[product].B, other));
                    break;
                }
                case OpCode.Add: ops.Add((BlockOpCode.Add, i, x.A, x.B, -1)); break;
                case OpCode.Subtract: ops.Add((BlockOpCode.Subtract, i, x.A, x.B, -1)); break;
                case OpCode.Multiply: ops.Add((BlockOpCode.Multiply, i, x.A, x.B, -1)); break;
                case OpCode.Negate: ops.Add((BlockOpCode.Negate, i, x.A, -1, -1)); break;
                case OpCode.Invert: ops.Add((BlockOpCode.Invert, i, x.A, -1, -1)); break;
                case OpCode.Power: ops.Add((BlockOpCode.Power, i, x.A, x.B, -1)); break;
                default:
                {
                    var code = x.Op switch
                    {
                        OpCode.Determinant => BlockOpCode.Determinant,
                        OpCode.Permanent => BlockOpCode.Permanent,
                        _ => BlockOpCode.Pfaffian,
                    };
                    ops.Add((code, i, matrixRegisters.Count, x.B, -1));
                    matrixRegisters.AddRange(program.Operands.AsSpan(x.A, x.B * x.B));
                    break;
                }
            }
        }

        // Liveness: the index of the last operation reading each register.
        var lastUse = new int[n];
        Array.Fill(lastUse, -1);
        for (var t = 0; t < ops.Count; t++)
        {
            var (op, _, a, b, c) = ops[t];
            if (IsMatrix(op))
            {
                foreach (var r in System.Runtime.InteropServices.CollectionsMarshal.AsSpan(matrixRegisters).Slice(a, b * b)) lastUse[r] = t;
                continue;
            }
            if (op == BlockOpCode.Variable) continue;
            lastUse[a] = t;
            if (op != BlockOpCode.Power && b >= 0) lastUse[b] = t;
            if (c >= 0) lastUse[c] = t;
        }
        foreach (var o in program.Outputs) lastUse[o] = int.MaxValue;

        // Slots: constants pinned first, then a free list.
        var slotOf = new int[n];
        Array.Fill(slotOf, -1);
        var constantSlots = new int[program.Constants.Length];
        Array.Fill(constantSlots, -1);
        var slots = 0;
        for (var i = 0; i < n; i++)
        {
            if (ins[i].Op != OpCode.Constant) continue;
            var c = ins[i].A;
            if (constantSlots[c] < 0) constantSlots[c] = slots++;
            slotOf[i] = constantSlots[c];
        }
        var isConstant = new bool[n];
        for (var i = 0; i < n; i++) isConstant[i] = ins[i].Op == OpCode.Constant;

        var free = new Stack<int>();
        var releasedAt = new int[n]; // the operation (plus one) that last released each register: an operand named twice dies once

        var result = new BlockInstruction[ops.Count];
        var matrixSlots = new int[matrixRegisters.Count];
        for (var t = 0; t < ops.Count; t++)
        {
            var (op, dest, a, b, c) = ops[t];
            // Element-wise operations may write over an operand that dies here (lane i is read before it is written);
            // inversion, powers and matrix functions keep the operand intact while they write the destination.
            var inPlace = op is not (BlockOpCode.Invert or BlockOpCode.Power) && !IsMatrix(op);
            if (inPlace) Release(t, op, a, b, c);
            slotOf[dest] = free.Count > 0 ? free.Pop() : slots++;
            if (!inPlace) Release(t, op, a, b, c);

            int sa = a, sb = b, sc = -1;
            switch (op)
            {
                case BlockOpCode.Variable: break;
                case BlockOpCode.Power: sa = slotOf[a]; break;
                case BlockOpCode.Determinant or BlockOpCode.Permanent or BlockOpCode.Pfaffian:
                    for (var k = 0; k < b * b; k++) matrixSlots[a + k] = slotOf[matrixRegisters[a + k]];
                    break;
                default:
                    sa = slotOf[a];
                    sb = b >= 0 ? slotOf[b] : -1;
                    sc = c >= 0 ? slotOf[c] : -1;
                    break;
            }
            result[t] = new BlockInstruction(op, slotOf[dest], sa, sb, sc);
            if (lastUse[dest] < 0) free.Push(slotOf[dest]); // computed (an inversion may still make lanes undefined) but never read
        }

        var outputSlots = new int[program.Outputs.Length];
        for (var i = 0; i < outputSlots.Length; i++) outputSlots[i] = slotOf[program.Outputs[i]];
        var exponents = new ExponentPlan[program.Exponents.Length];
        for (var i = 0; i < exponents.Length; i++) exponents[i] = Plan(program.Exponents[i]);
        return new BlockProgram(program, result, Math.Max(slots, 1), constantSlots, outputSlots, matrixSlots, exponents, fusedCount);

        void Release(int t, BlockOpCode op, int a, int b, int c)
        {
            if (op == BlockOpCode.Variable) return;
            if (IsMatrix(op))
            {
                for (var k = 0; k < b * b; k++) Dies(matrixRegisters[a + k]);
                return;
            }
            Dies(a);
            if (op != BlockOpCode.Power && b >= 0) Dies(b);
            if (c >= 0) Dies(c);

            void Dies(int register)
            {
                if (lastUse[register] != t || isConstant[register] || releasedAt[register] == t + 1) return;
                releasedAt[register] = t + 1;
                free.Push(slotOf[register]);
            }
        }
    }

    private static bool IsMatrix(BlockOpCode op) => op is BlockOpCode.Determinant or BlockOpCode.Permanent or BlockOpCode.Pfaffian;

    private static ExponentPlan Plan(BigInteger e)
    {
        if (e.Sign < 0) throw new ArgumentOutOfRangeException(nameof(e), e, "the exponent must be non-negative");
        if (e.IsZero) return new ExponentPlan(true, []);
        // the bits below the leading one, most significant first
        var bytes = e.ToByteArray(isUnsigned: true, isBigEndian: false);
        var bits = new bool[(int)e.GetBitLength() - 1];
        for (var i = 0; i < bits.Length; i++)
        {
            var k = bits.Length - 1 - i;
            bits[i] = (bytes[k >> 3] >> (k & 7) & 1) != 0;
        }
        return new ExponentPlan(false, bits);
    }
}
