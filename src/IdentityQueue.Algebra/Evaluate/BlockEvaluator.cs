using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>Factory and sizes for <see cref="BlockEvaluator{TField, T}"/>.</summary>
public static class BlockEvaluator
{
    /// <summary>
    /// The default block size, by measurement (BlockEvaluatorBenchmarks): on the 62-bit rung the cost per lane is flat from
    /// 32 lanes on; the 31-bit rung still gains about a fifth at 128 lanes, where the dispatch per operation weighs less.
    /// </summary>
    public const int DefaultBlockSize = 64;

    /// <summary>Largest block size accepted.</summary>
    public const int MaxBlockSize = 1024;

    /// <summary>
    /// Lanes per vector instruction on this CPU for the rung of <typeparamref name="TField"/>: 16 (AVX-512) or 8 (AVX2) on
    /// the 31-bit rung, 8 (AVX-512) on the 62-bit rung, else 1. A block of a multiple of it runs on whole vectors.
    /// </summary>
    public static int LanesPerInstruction<TField>() where TField : IElementLayout => BlockInterpreter.LanesPerInstruction<TField>();

    /// <summary>An evaluator of <paramref name="program"/> over blocks of <paramref name="blockSize"/> points in <paramref name="field"/>.</summary>
    public static BlockEvaluator<TField, T> Create<TField, T>(TField field, BlockProgram program, int blockSize = DefaultBlockSize)
        where TField : struct, IField<T> where T : struct =>
        new(field, program, blockSize);
}

/// <summary>
/// Evaluates a <see cref="BlockProgram"/> at a block of points at once, in structure-of-arrays form: the register file is
/// [slot][lane], so each operation is dispatched once per block and then runs over all lanes (independent chains that hide
/// the multiply latency). Generic over the field (a struct type parameter, specialised by the JIT); the interpreter is one
/// loop generic over a lane kernel (<see cref="ILaneKernel{TField, TLane, TModulus}"/>), chosen once here from the field's
/// <see cref="ElementLayout"/>: the 31- and 62-bit Montgomery rungs run on raw representatives with AVX-512 (or AVX2 on the
/// 31-bit rung) where the CPU has it and the block is whole vectors, else on scalar lanes, with identical results; any
/// other field runs through its own operations. Each lane may be in its own field (<see cref="UseFields"/>): the screener
/// runs independent trials, each with its own random prime and point, as the lanes of one block. A division by zero makes
/// only its lane undefined. Determinants, Pfaffians and permanents are <see cref="BlockFunctions"/>. No allocation per block.
/// Holds its buffers: not thread-safe; use one evaluator per thread (the <see cref="BlockProgram"/> can be shared).
/// </summary>
public sealed class BlockEvaluator<TField, T> where TField : struct, IField<T> where T : struct
{
    private readonly BlockState<TField, T> _s;
    private readonly BlockInterpreter<TField, T> _interpreter;

    /// <summary>An evaluator of <paramref name="program"/> over blocks of <paramref name="blockSize"/> points (1 to <see cref="BlockEvaluator.MaxBlockSize"/>).</summary>
    public BlockEvaluator(TField field, BlockProgram program, int blockSize = BlockEvaluator.DefaultBlockSize)
        : this(field, program, blockSize, LaneKernel.Avx512)
    {
    }

    /// <summary>An evaluator of <paramref name="program"/> with lane l in <paramref name="fields"/>[l] (see <see cref="UseFields"/>).</summary>
    public BlockEvaluator(ReadOnlySpan<TField> fields, BlockProgram program)
        : this(program, fields.Length, LaneKernel.Avx512) => UseFields(fields);

    /// <summary>As the public constructor, with the widest lane kernel allowed (each rung falls back to what the CPU supports).</summary>
    internal BlockEvaluator(TField field, BlockProgram program, int blockSize, LaneKernel kernel)
        : this(program, blockSize, kernel) => UseField(field);

    /// <summary>The buffers and the interpreter, before any lane has a field.</summary>
    private BlockEvaluator(BlockProgram program, int blockSize, LaneKernel kernel)
    {
        ArgumentNullException.ThrowIfNull(program);
        ArgumentOutOfRangeException.ThrowIfLessThan(blockSize, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(blockSize, BlockEvaluator.MaxBlockSize);
        _s = new BlockState<TField, T>(program, blockSize);
        _interpreter = BlockInterpreter.Create(_s, kernel);
    }

    /// <summary>
    /// Puts every lane in <paramref name="field"/> (say, a fresh random prime for the next block), keeping the buffers:
    /// prepares the program's constants in it and returns <see cref="ConstantsDefined"/>.
    /// </summary>
    public bool UseField(TField field)
    {
        var s = _s;
        Array.Fill(s.Fields, field);
        _interpreter.UseLaneFields();
        s.Uniform = true;
        s.OddCharacteristic = field.Characteristic != 2;
        var defined = Evaluator.TryPrepareConstants<TField, T>(field, s.Program.Program, out var constants);
        Array.Fill(s.ConstantUndefined, !defined);
        if (defined)
        {
            for (var c = 0; c < constants.Length; c++)
            {
                var slot = s.Program.ConstantSlots[c];
                if (slot >= 0) s.Registers.AsSpan(slot * s.B, s.B).Fill(constants[c]);
            }
        }
        return defined;
    }

    /// <summary>
    /// Puts lane l in <paramref name="fields"/>[l] (one field per lane: independent trials, each with its own random prime,
    /// evaluated together), keeping the buffers, and prepares the program's constants lane by lane. A lane where a
    /// constant's denominator vanishes is undefined at every point. Returns the number of lanes whose constants are defined.
    /// </summary>
    public int UseFields(ReadOnlySpan<TField> fields)
    {
        var s = _s;
        var b = s.B;
        if (fields.Length != b) throw new ArgumentException($"need one field per lane ({b}), got {fields.Length}", nameof(fields));
        fields.CopyTo(s.Fields);
        _interpreter.UseLaneFields();
        var uniform = true;
        var oddCharacteristic = true;
        Span<bool> sameAsFirst = stackalloc bool[b];
        for (var l = 0; l < b; l++)
        {
            sameAsFirst[l] = l > 0 && _interpreter.SameField(fields[l], fields[0]);
            uniform &= l == 0 || sameAsFirst[l];
            oddCharacteristic &= fields[l].Characteristic != 2;
        }
        (s.Uniform, s.OddCharacteristic) = (uniform, oddCharacteristic);
        var constantUndefined = s.ConstantUndefined;
        Array.Clear(constantUndefined);
        var constants = s.Program.Program.Constants;
        for (var c = 0; c < constants.Length; c++)
        {
            var slot = s.Program.ConstantSlots[c];
            if (slot < 0) continue;
            var lanes = s.Registers.AsSpan(slot * b, b);
            for (var l = 0; l < b; l++)
            {
                // a lane in lane 0's field (a block padded with copies of its first lane) takes lane 0's value
                if (sameAsFirst[l]) { lanes[l] = lanes[0]; constantUndefined[l] |= constantUndefined[0]; }
                else if (Evaluator.TryConstant(fields[l], constants[c], out T value)) lanes[l] = value;
                else constantUndefined[l] = true;
            }
        }
        var count = 0;
        foreach (var undefined in constantUndefined) if (!undefined) count++;
        return count;
    }

    /// <summary>The field of lane 0 (of every lane after <see cref="UseField"/>).</summary>
    public TField Field => _s.Fields[0];

    /// <summary>The field of lane <paramref name="lane"/>.</summary>
    public TField LaneField(int lane) => _s.Fields[lane];
    public BlockProgram Program => _s.Program;

    /// <summary>Points per block.</summary>
    public int BlockSize => _s.B;

    /// <summary>False when a constant's denominator vanishes in some lane's field: then every point of that lane is undefined.</summary>
    public bool ConstantsDefined => Array.IndexOf(_s.ConstantUndefined, true) < 0;

    /// <summary>Which kernels run: the rung and, on the 31- and 62-bit rungs, the vector instructions.</summary>
    public string Kernel => _interpreter.Kernel;

    /// <summary>
    /// Evaluates the program at <see cref="BlockSize"/> points. <paramref name="points"/> holds variable v of lane l at
    /// <c>v·BlockSize + l</c> (variables indexed like <see cref="StraightLineProgram.Variables"/>); <paramref name="outputs"/>
    /// receives output o of lane l at <c>o·BlockSize + l</c> (outputs as in <see cref="StraightLineProgram.Outputs"/>), and
    /// <paramref name="defined"/>[l] is false where a division by zero made lane l undefined (its outputs are then
    /// meaningless). Returns the number of defined lanes.
    /// </summary>
    /// <param name="points">The variables of every lane, variable-major.</param>
    /// <param name="outputs">Receives the outputs of every lane, output-major.</param>
    /// <param name="defined">Receives, per lane, whether the point was defined.</param>
    /// <param name="cancellation">
    /// Looked at before each matrix function and inside its kernel (a block's plain instructions take milliseconds even for
    /// the largest programs allowed); a cancelled evaluation throws <see cref="OperationCanceledException"/>.
    /// </param>
    public int Evaluate(ReadOnlySpan<T> points, Span<T> outputs, Span<bool> defined, CancellationToken cancellation = default)
    {
        var s = _s;
        s.Cancellation = cancellation;
        var source = s.Program.Program;
        var b = s.B;
        if (points.Length < source.Variables.Length * b)
            throw new ArgumentException($"need {source.Variables.Length} variables × {b} lanes of point values, got {points.Length}", nameof(points));
        if (outputs.Length < source.Outputs.Length * b)
            throw new ArgumentException($"need {source.Outputs.Length} outputs × {b} lanes, got {outputs.Length}", nameof(outputs));
        if (defined.Length < b) throw new ArgumentException($"need {b} lanes, got {defined.Length}", nameof(defined));

        if (Array.IndexOf(s.ConstantUndefined, false) < 0)
        {
            outputs[..(source.Outputs.Length * b)].Fill(s.Fields[0].Zero);
            defined[..b].Clear();
            return 0;
        }
        s.ConstantUndefined.CopyTo(s.Undefined, 0);
        _interpreter.Run(points);

        var registers = s.Registers.AsSpan();
        var slots = s.Program.OutputSlots;
        for (var o = 0; o < slots.Length; o++) registers.Slice(slots[o] * b, b).CopyTo(outputs.Slice(o * b, b));
        var count = 0;
        for (var l = 0; l < b; l++)
        {
            defined[l] = !s.Undefined[l];
            if (defined[l]) count++;
        }
        return count;
    }
}
