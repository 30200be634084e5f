using System.Numerics;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
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
    public static int LanesPerInstruction<TField>() =>
        typeof(TField) == typeof(PrimeField31) ? Lanes31.Best switch
        {
            LaneKernel.Avx512 => Vector512<uint>.Count,
            LaneKernel.Avx2 => Vector256<uint>.Count,
            _ => 1,
        }
        : typeof(TField) == typeof(PrimeField62) && Lanes62.Best == LaneKernel.Avx512 ? Vector512<ulong>.Count
        : 1;

    /// <summary>An evaluator of <paramref name="program"/> over blocks of <paramref name="blockSize"/> points in <paramref name="field"/>.</summary>
    public static BlockEvaluator<TField, T> Create<TField, T>(TField field, BlockProgram program, int blockSize = DefaultBlockSize)
        where TField : struct, IField<T> where T : struct =>
        new(field, program, blockSize);
}

/// <summary>
/// Evaluates a <see cref="BlockProgram"/> at a block of points at once, in structure-of-arrays form: the register file is
/// [slot][lane], so each operation is dispatched once per block and then runs over all lanes (independent chains that hide
/// the multiply latency). Generic over the field (a struct type parameter, specialised by the JIT); the 31- and 62-bit
/// Montgomery rungs run on raw representatives with AVX-512 (or AVX2 on the 31-bit rung) where the CPU has it, else on
/// scalar lanes, with identical results. Each lane may be in its own field (<see cref="UseFields"/>): the screener runs
/// independent trials, each with its own random prime and point, as the lanes of one block. A division by zero makes only
/// its lane undefined. Determinants and Pfaffians run
/// per lane on a scratch matrix; permanents run Glynn's formula (odd characteristic) or Ryser's in Gray-code order on all
/// lanes together. No allocation per block.
/// Holds its buffers: not thread-safe; use one evaluator per thread (the <see cref="BlockProgram"/> can be shared).
/// </summary>
public sealed class BlockEvaluator<TField, T> where TField : struct, IField<T> where T : struct
{
    private readonly BlockProgram _program;
    private readonly int _b;
    private readonly T[] _registers;
    private readonly bool[] _undefined;
    private readonly T[] _laneScratch;
    private readonly T[] _matrix;
    private readonly T[] _permanent;
    private readonly LaneKernel _kernel31;
    private readonly LaneKernel _kernel62;
    // the lanes' fields and what is derived from them (replaced by UseField and UseFields)
    private readonly TField[] _fields;
    private readonly bool[] _constantUndefined;
    private bool _uniform;
    private bool _oddCharacteristic;
    private readonly ulong[] _p62, _p62High, _q62;
    private readonly uint[] _p31, _q31;
    private CancellationToken _cancellation; // of the evaluation running now

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

    /// <summary>The buffers, before any lane has a field.</summary>
    private BlockEvaluator(BlockProgram program, int blockSize, LaneKernel kernel)
    {
        ArgumentNullException.ThrowIfNull(program);
        ArgumentOutOfRangeException.ThrowIfLessThan(blockSize, 1);
        ArgumentOutOfRangeException.ThrowIfGreaterThan(blockSize, BlockEvaluator.MaxBlockSize);
        _program = program;
        _b = blockSize;
        _registers = new T[checked(program.SlotCount * blockSize)];
        _undefined = new bool[blockSize];
        _laneScratch = new T[blockSize];
        _matrix = new T[program.MaxMatrixEntries];
        _permanent = new T[program.MaxPermanentOrder == 0 ? 0 : (program.MaxPermanentOrder + 3) * blockSize];
        _kernel31 = Lanes31.Supported(kernel);
        _kernel62 = Lanes62.Supported(kernel);
        _fields = new TField[blockSize];
        _constantUndefined = new bool[blockSize];
        var is62 = typeof(TField) == typeof(PrimeField62);
        var is31 = typeof(TField) == typeof(PrimeField31);
        (_p62, _p62High, _q62) = is62 ? (new ulong[blockSize], new ulong[blockSize], new ulong[blockSize]) : ([], [], []);
        (_p31, _q31) = is31 ? (new uint[blockSize], new uint[blockSize]) : ([], []);
    }

    /// <summary>
    /// Puts every lane in <paramref name="field"/> (say, a fresh random prime for the next block), keeping the buffers:
    /// prepares the program's constants in it and returns <see cref="ConstantsDefined"/>.
    /// </summary>
    public bool UseField(TField field)
    {
        for (var l = 0; l < _b; l++) SetLaneField(l, field);
        _uniform = true;
        _oddCharacteristic = field.Characteristic != 2;
        var defined = Evaluator.TryPrepareConstants<TField, T>(field, _program.Program, out var constants);
        Array.Fill(_constantUndefined, !defined);
        if (defined)
        {
            for (var c = 0; c < constants.Length; c++)
            {
                var slot = _program.ConstantSlots[c];
                if (slot >= 0) _registers.AsSpan(slot * _b, _b).Fill(constants[c]);
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
        if (fields.Length != _b) throw new ArgumentException($"need one field per lane ({_b}), got {fields.Length}", nameof(fields));
        _uniform = true;
        _oddCharacteristic = true;
        Span<bool> sameAsFirst = stackalloc bool[_b];
        for (var l = 0; l < _b; l++)
        {
            SetLaneField(l, fields[l]);
            sameAsFirst[l] = l > 0 && SameField(l, 0, fields);
            _uniform &= l == 0 || sameAsFirst[l];
            _oddCharacteristic &= fields[l].Characteristic != 2;
        }
        Array.Clear(_constantUndefined);
        var constants = _program.Program.Constants;
        for (var c = 0; c < constants.Length; c++)
        {
            var slot = _program.ConstantSlots[c];
            if (slot < 0) continue;
            var lanes = _registers.AsSpan(slot * _b, _b);
            for (var l = 0; l < _b; l++)
            {
                // a lane in lane 0's field (a block padded with copies of its first lane) takes lane 0's value
                if (sameAsFirst[l]) { lanes[l] = lanes[0]; _constantUndefined[l] |= _constantUndefined[0]; }
                else if (Evaluator.TryConstant(fields[l], constants[c], out T value)) lanes[l] = value;
                else _constantUndefined[l] = true;
            }
        }
        var count = 0;
        foreach (var undefined in _constantUndefined) if (!undefined) count++;
        return count;
    }

    /// <summary>Whether lanes <paramref name="l"/> and <paramref name="k"/> are in the same field (by modulus on the Montgomery rungs).</summary>
    private bool SameField(int l, int k, ReadOnlySpan<TField> fields) =>
        typeof(TField) == typeof(PrimeField62) ? _p62[l] == _p62[k]
        : typeof(TField) == typeof(PrimeField31) ? _p31[l] == _p31[k]
        : EqualityComparer<TField>.Default.Equals(fields[l], fields[k]);

    private void SetLaneField(int l, TField field)
    {
        _fields[l] = field;
        if (typeof(TField) == typeof(PrimeField62))
        {
            var f = (PrimeField62)(object)field;
            (_p62[l], _p62High[l], _q62[l]) = (f.Modulus, f.Modulus >> 32, f.ModulusInverse);
        }
        else if (typeof(TField) == typeof(PrimeField31))
        {
            var f = (PrimeField31)(object)field;
            (_p31[l], _q31[l]) = (f.Modulus, f.ModulusInverse);
        }
    }

    /// <summary>The field of lane 0 (of every lane after <see cref="UseField"/>).</summary>
    public TField Field => _fields[0];

    /// <summary>The field of lane <paramref name="lane"/>.</summary>
    public TField LaneField(int lane) => _fields[lane];
    public BlockProgram Program => _program;

    /// <summary>Points per block.</summary>
    public int BlockSize => _b;

    /// <summary>False when a constant's denominator vanishes in some lane's field: then every point of that lane is undefined.</summary>
    public bool ConstantsDefined => Array.IndexOf(_constantUndefined, true) < 0;

    /// <summary>Which kernels run: the rung and, on the 31- and 62-bit rungs, the vector instructions.</summary>
    public string Kernel =>
        typeof(TField) == typeof(PrimeField62) ? _kernel62 == LaneKernel.Avx512
            ? "62-bit Montgomery, AVX-512F/DQ (8 lanes per instruction)"
            : "62-bit Montgomery, scalar lanes"
        : typeof(TField) == typeof(PrimeField31) ? _kernel31 switch
        {
            LaneKernel.Avx512 => "31-bit Montgomery, AVX-512F (16 lanes per instruction)",
            LaneKernel.Avx2 => "31-bit Montgomery, AVX2 (8 lanes per instruction)",
            _ => "31-bit Montgomery, scalar lanes",
        }
        : $"generic ({typeof(TField).Name})";

    /// <summary>
    /// Evaluates the program at <see cref="BlockSize"/> points. <paramref name="points"/> holds variable v of lane l at
    /// <c>v·BlockSize + l</c> (variables indexed like <see cref="StraightLineProgram.Variables"/>); <paramref name="outputs"/>
    /// receives output o of lane l at <c>o·BlockSize + l</c> (outputs as in <see cref="StraightLineProgram.Outputs"/>), and
    /// <paramref name="defined"/>[l] is false where a division by zero made lane l undefined (its outputs are then
    /// meaningless). Returns the number of defined lanes.
    /// </summary>
    /// <param name="cancellation">
    /// Looked at before each matrix function and inside its kernel (a block's plain instructions take milliseconds even for
    /// the largest programs allowed); a cancelled evaluation throws <see cref="OperationCanceledException"/>.
    /// </param>
    public int Evaluate(ReadOnlySpan<T> points, Span<T> outputs, Span<bool> defined, CancellationToken cancellation = default)
    {
        _cancellation = cancellation;
        var source = _program.Program;
        var b = _b;
        if (points.Length < source.Variables.Length * b)
            throw new ArgumentException($"need {source.Variables.Length} variables × {b} lanes of point values, got {points.Length}", nameof(points));
        if (outputs.Length < source.Outputs.Length * b)
            throw new ArgumentException($"need {source.Outputs.Length} outputs × {b} lanes, got {outputs.Length}", nameof(outputs));
        if (defined.Length < b) throw new ArgumentException($"need {b} lanes, got {defined.Length}", nameof(defined));

        if (Array.IndexOf(_constantUndefined, false) < 0)
        {
            outputs[..(source.Outputs.Length * b)].Fill(_fields[0].Zero);
            defined[..b].Fill(false);
            return 0;
        }
        _constantUndefined.CopyTo(_undefined, 0);
        if (typeof(TField) == typeof(PrimeField62) && typeof(T) == typeof(Residue62))
        {
            if (_kernel62 == LaneKernel.Avx512 && b % Vector512<ulong>.Count == 0) Run62Avx512(points);
            else Run62(points);
        }
        else if (typeof(TField) == typeof(PrimeField31) && typeof(T) == typeof(Residue31))
        {
            if (_kernel31 == LaneKernel.Avx512 && b % Vector512<uint>.Count == 0) Run31Avx512(points);
            else if (_kernel31 == LaneKernel.Avx2 && b % Vector256<uint>.Count == 0) Run31Avx2(points);
            else Run31(points);
        }
        else RunGeneric(points);

        var registers = _registers.AsSpan();
        var slots = _program.OutputSlots;
        for (var o = 0; o < slots.Length; o++) registers.Slice(slots[o] * b, b).CopyTo(outputs.Slice(o * b, b));
        var count = 0;
        for (var l = 0; l < b; l++)
        {
            defined[l] = !_undefined[l];
            if (defined[l]) count++;
        }
        return count;
    }

    private void RunGeneric(ReadOnlySpan<T> points)
    {
        var f = _fields;
        var b = _b;
        var r = _registers.AsSpan();
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * b, b);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: points.Slice(ins.A * b, b).CopyTo(d); break;
                case BlockOpCode.Add:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Add(x[i], y[i]);
                    break;
                }
                case BlockOpCode.Subtract:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Subtract(x[i], y[i]);
                    break;
                }
                case BlockOpCode.Multiply:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Multiply(x[i], y[i]);
                    break;
                }
                case BlockOpCode.Negate:
                {
                    var x = r.Slice(ins.A * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Negate(x[i]);
                    break;
                }
                case BlockOpCode.MultiplyAdd:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    var z = r.Slice(ins.C * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].MultiplyAdd(x[i], y[i], z[i]);
                    break;
                }
                case BlockOpCode.MultiplySubtract:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    var z = r.Slice(ins.C * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Subtract(f[i].Multiply(x[i], y[i]), z[i]);
                    break;
                }
                case BlockOpCode.NegativeMultiplyAdd:
                {
                    var x = r.Slice(ins.A * b, b);
                    var y = r.Slice(ins.B * b, b);
                    var z = r.Slice(ins.C * b, b);
                    for (var i = 0; i < d.Length; i++) d[i] = f[i].Subtract(z[i], f[i].Multiply(x[i], y[i]));
                    break;
                }
                default: RunOther(ins); break;
            }
        }
    }

    private void Run62(ReadOnlySpan<T> points)
    {
        var b = _b;
        var (p, q) = (_p62, _q62);
        var r = MemoryMarshal.Cast<T, ulong>(_registers.AsSpan());
        var v = MemoryMarshal.Cast<T, ulong>(points);
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * b, b);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * b, b).CopyTo(d); break;
                case BlockOpCode.Add: Lanes62.Add(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p); break;
                case BlockOpCode.Subtract: Lanes62.Subtract(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p); break;
                case BlockOpCode.Multiply: Lanes62.Multiply(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p, q); break;
                case BlockOpCode.Negate: Lanes62.Negate(r.Slice(ins.A * b, b), d, p); break;
                case BlockOpCode.MultiplyAdd: Lanes62.MultiplyAdd(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                case BlockOpCode.MultiplySubtract: Lanes62.MultiplySubtract(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                case BlockOpCode.NegativeMultiplyAdd: Lanes62.NegativeMultiplyAdd(r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                default: RunOther(ins); break;
            }
        }
    }

    private void Run31(ReadOnlySpan<T> points)
    {
        var b = _b;
        var k = _kernel31;
        var (p, q) = (_p31, _q31);
        var r = MemoryMarshal.Cast<T, uint>(_registers.AsSpan());
        var v = MemoryMarshal.Cast<T, uint>(points);
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * b, b);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * b, b).CopyTo(d); break;
                case BlockOpCode.Add: Lanes31.Add(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p); break;
                case BlockOpCode.Subtract: Lanes31.Subtract(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p); break;
                case BlockOpCode.Multiply: Lanes31.Multiply(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), d, p, q); break;
                case BlockOpCode.Negate: Lanes31.Negate(k, r.Slice(ins.A * b, b), d, p); break;
                case BlockOpCode.MultiplyAdd: Lanes31.MultiplyAdd(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                case BlockOpCode.MultiplySubtract: Lanes31.MultiplySubtract(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                case BlockOpCode.NegativeMultiplyAdd: Lanes31.NegativeMultiplyAdd(k, r.Slice(ins.A * b, b), r.Slice(ins.B * b, b), r.Slice(ins.C * b, b), d, p, q); break;
                default: RunOther(ins); break;
            }
        }
    }

    /// <summary>The 62-bit rung when the block is a whole number of 512-bit vectors: the lane loops inlined, one vector per step.</summary>
    private void Run62Avx512(ReadOnlySpan<T> points)
    {
        var w = _b / Vector512<ulong>.Count;
        var p = MemoryMarshal.Cast<ulong, Vector512<ulong>>(_p62.AsSpan());
        var pHigh = MemoryMarshal.Cast<ulong, Vector512<ulong>>(_p62High.AsSpan());
        var q = MemoryMarshal.Cast<ulong, Vector512<ulong>>(_q62.AsSpan());
        var r = MemoryMarshal.Cast<T, Vector512<ulong>>(_registers.AsSpan());
        var v = MemoryMarshal.Cast<T, Vector512<ulong>>(points[..(_program.Program.Variables.Length * _b)]);
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * w, w);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * w, w).CopyTo(d); break;
                case BlockOpCode.Add:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.AddMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Subtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.SubMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Multiply:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.Multiply(x[j], y[j], p[j], pHigh[j], q[j]);
                    break;
                }
                case BlockOpCode.Negate:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.SubMod(Vector512<ulong>.Zero, x[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.AddMod(Lanes62.Multiply(x[j], y[j], p[j], pHigh[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplySubtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.SubMod(Lanes62.Multiply(x[j], y[j], p[j], pHigh[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.NegativeMultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes62.SubMod(z[j], Lanes62.Multiply(x[j], y[j], p[j], pHigh[j], q[j]), p[j]);
                    break;
                }
                default: RunOther(ins); break;
            }
        }
    }

    /// <summary>The 31-bit rung when the block is a whole number of 512-bit vectors: the lane loops inlined, one vector per step.</summary>
    private void Run31Avx512(ReadOnlySpan<T> points)
    {
        var w = _b / Vector512<uint>.Count;
        var p = MemoryMarshal.Cast<uint, Vector512<uint>>(_p31.AsSpan());
        var q = MemoryMarshal.Cast<uint, Vector512<uint>>(_q31.AsSpan());
        var r = MemoryMarshal.Cast<T, Vector512<uint>>(_registers.AsSpan());
        var v = MemoryMarshal.Cast<T, Vector512<uint>>(points[..(_program.Program.Variables.Length * _b)]);
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * w, w);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * w, w).CopyTo(d); break;
                case BlockOpCode.Add:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.AddMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Subtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Multiply:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.Multiply(x[j], y[j], p[j], q[j]);
                    break;
                }
                case BlockOpCode.Negate:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(Vector512<uint>.Zero, x[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.AddMod(Lanes31.Multiply(x[j], y[j], p[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplySubtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(Lanes31.Multiply(x[j], y[j], p[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.NegativeMultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(z[j], Lanes31.Multiply(x[j], y[j], p[j], q[j]), p[j]);
                    break;
                }
                default: RunOther(ins); break;
            }
        }
    }

    /// <summary>The 31-bit rung when the block is a whole number of 256-bit vectors: the lane loops inlined, one vector per step.</summary>
    private void Run31Avx2(ReadOnlySpan<T> points)
    {
        var w = _b / Vector256<uint>.Count;
        var p = MemoryMarshal.Cast<uint, Vector256<uint>>(_p31.AsSpan());
        var q = MemoryMarshal.Cast<uint, Vector256<uint>>(_q31.AsSpan());
        var r = MemoryMarshal.Cast<T, Vector256<uint>>(_registers.AsSpan());
        var v = MemoryMarshal.Cast<T, Vector256<uint>>(points[..(_program.Program.Variables.Length * _b)]);
        foreach (var ins in _program.Instructions)
        {
            var d = r.Slice(ins.Dest * w, w);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * w, w).CopyTo(d); break;
                case BlockOpCode.Add:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.AddMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Subtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(x[j], y[j], p[j]);
                    break;
                }
                case BlockOpCode.Multiply:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.Multiply(x[j], y[j], p[j], q[j]);
                    break;
                }
                case BlockOpCode.Negate:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(Vector256<uint>.Zero, x[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.AddMod(Lanes31.Multiply(x[j], y[j], p[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.MultiplySubtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(Lanes31.Multiply(x[j], y[j], p[j], q[j]), z[j], p[j]);
                    break;
                }
                case BlockOpCode.NegativeMultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = Lanes31.SubMod(z[j], Lanes31.Multiply(x[j], y[j], p[j], q[j]), p[j]);
                    break;
                }
                default: RunOther(ins); break;
            }
        }
    }

    /// <summary>Inversion, powers and the matrix functions (the same code on every rung).</summary>
    private void RunOther(BlockInstruction ins)
    {
        _cancellation.ThrowIfCancellationRequested();
        switch (ins.Op)
        {
            case BlockOpCode.Invert: Invert(ins); break;
            case BlockOpCode.Power: Power(ins); break;
            case BlockOpCode.Permanent: Permanent(ins); break;
            case BlockOpCode.Determinant or BlockOpCode.Pfaffian: PerLaneMatrix(ins); break;
            default: throw new InvalidOperationException($"unexpected block operation {ins.Op}");
        }
    }

    /// <summary>
    /// 1/a on every lane. When all lanes share one field, with one field inversion (Montgomery's batch trick: prefix
    /// products, one inverse, and back again); else lane by lane in each lane's field. A lane where a vanishes is undefined
    /// and gets 0.
    /// </summary>
    private void Invert(BlockInstruction ins)
    {
        var b = _b;
        var a = _registers.AsSpan(ins.A * b, b);
        var d = _registers.AsSpan(ins.Dest * b, b);
        if (!_uniform)
        {
            for (var i = 0; i < b; i++)
            {
                if (_fields[i].TryInvert(a[i], out var x)) d[i] = x;
                else { d[i] = _fields[i].Zero; _undefined[i] = true; }
            }
            return;
        }
        var f = _fields[0];
        var prefix = _laneScratch.AsSpan();
        var product = f.One;
        for (var i = 0; i < b; i++)
        {
            prefix[i] = product;
            if (f.IsZero(a[i])) _undefined[i] = true;
            else product = f.Multiply(product, a[i]);
        }
        if (!f.TryInvert(product, out var inverse))
        {
            // Only possible if the field were not a field; invert lane by lane instead.
            for (var i = 0; i < b; i++)
            {
                if (f.TryInvert(a[i], out var x)) d[i] = x;
                else { d[i] = f.Zero; _undefined[i] = true; }
            }
            return;
        }
        for (var i = b - 1; i >= 0; i--)
        {
            if (f.IsZero(a[i])) { d[i] = f.Zero; continue; }
            d[i] = f.Multiply(inverse, prefix[i]);
            inverse = f.Multiply(inverse, a[i]);
        }
    }

    /// <summary>a^e by left-to-right square-and-multiply, all lanes at each step.</summary>
    private void Power(BlockInstruction ins)
    {
        var b = _b;
        var a = _registers.AsSpan(ins.A * b, b);
        var d = _registers.AsSpan(ins.Dest * b, b);
        var plan = _program.Exponents[ins.B];
        if (plan.IsZero) { FillOne(d); return; }
        a.CopyTo(d);
        foreach (var bit in plan.Bits)
        {
            LaneMultiply(d, d);
            if (bit) LaneMultiply(d, a);
        }
    }

    /// <summary>Determinant or Pfaffian: gathers each lane's matrix into the scratch matrix and runs the in-place kernel.</summary>
    private void PerLaneMatrix(BlockInstruction ins)
    {
        var b = _b;
        var n = ins.B;
        var slots = _program.MatrixSlots.AsSpan(ins.A, n * n);
        var m = _matrix.AsSpan(0, n * n);
        var r = _registers.AsSpan();
        var d = r.Slice(ins.Dest * b, b);
        for (var l = 0; l < b; l++)
        {
            for (var k = 0; k < m.Length; k++) m[k] = r[slots[k] * b + l];
            d[l] = ins.Op == BlockOpCode.Determinant
                ? MatrixKernels.Determinant(_fields[l], m, n, _cancellation)
                : MatrixKernels.Pfaffian(_fields[l], m, n, _cancellation);
        }
    }

    /// <summary>
    /// Permanents on all lanes together: the sign patterns of Glynn's formula (odd characteristic) or the subsets of Ryser's
    /// formula, in Gray-code order, are the same for every lane, so each step updates the sums of every lane by one row or
    /// column and multiplies them lane by lane (see <see cref="MatrixKernels.Permanent{TField, T}(TField, ReadOnlySpan{T}, int)"/>).
    /// The sign alternates along the Gray code, so the terms go to two accumulators.
    /// </summary>
    private void Permanent(BlockInstruction ins)
    {
        var b = _b;
        var n = ins.B;
        var r = _registers.AsSpan();
        var d = r.Slice(ins.Dest * b, b);
        if (n == 0) { FillOne(d); return; }
        var slots = _program.MatrixSlots.AsSpan(ins.A, n * n);
        var scratch = _permanent.AsSpan(0, (n + 3) * b);
        var sums = scratch[..(n * b)];
        var product = scratch.Slice(n * b, b);
        var even = scratch.Slice((n + 1) * b, b);
        var odd = scratch.Slice((n + 2) * b, b);
        FillZero(even);
        FillZero(odd);
        var glynn = n >= MatrixKernels.GlynnMinOrder && _oddCharacteristic;
        ulong steps;
        if (glynn)
        {
            // column sums with every δ_i = +1; the first term
            for (var j = 0; j < n; j++)
            {
                var s = sums.Slice(j * b, b);
                r.Slice(slots[j] * b, b).CopyTo(s);
                for (var i = 1; i < n; i++) LaneAdd(s, r.Slice(slots[i * n + j] * b, b));
            }
            LaneProduct(sums, product, n);
            product.CopyTo(even);
            steps = 1UL << (n - 1);
        }
        else
        {
            for (var j = 0; j < n; j++) FillZero(sums.Slice(j * b, b));
            steps = 1UL << n;
        }
        var flipped = 0UL;
        for (var g = 1UL; g < steps; g++)
        {
            if ((g & (MatrixKernels.CancellationInterval - 1)) == 0) _cancellation.ThrowIfCancellationRequested();
            var k = BitOperations.TrailingZeroCount(g);
            var back = (flipped >> k & 1) != 0;
            flipped ^= 1UL << k;
            for (var j = 0; j < n; j++)
            {
                // Glynn: row k+1 moves every column sum by ∓2·a; Ryser: column k enters or leaves every row sum.
                var s = sums.Slice(j * b, b);
                var entry = r.Slice((glynn ? slots[(k + 1) * n + j] : slots[j * n + k]) * b, b);
                var up = glynn ? back : !back; // Glynn: δ back to +1 adds 2·a; Ryser: a column entering adds it
                for (var twice = glynn ? 2 : 1; twice > 0; twice--)
                {
                    if (up) LaneAdd(s, entry);
                    else LaneSubtract(s, entry);
                }
            }
            LaneProduct(sums, product, n);
            LaneAdd((g & 1) == 0 ? even : odd, product);
        }
        if (glynn)
        {
            // perm = 2^−(n−1) (even − odd), in each lane's field
            var power = BigInteger.One << (n - 1);
            for (var l = 0; l < b; l++)
            {
                var f = _fields[l];
                f.TryInvert(f.FromInteger(power), out var scale);
                d[l] = f.Multiply(f.Subtract(even[l], odd[l]), scale);
            }
        }
        else if ((n & 1) == 0) for (var l = 0; l < b; l++) d[l] = _fields[l].Subtract(even[l], odd[l]);
        else for (var l = 0; l < b; l++) d[l] = _fields[l].Subtract(odd[l], even[l]);
    }

    private void FillOne(Span<T> lanes)
    {
        for (var l = 0; l < lanes.Length; l++) lanes[l] = _fields[l].One;
    }

    private void FillZero(Span<T> lanes)
    {
        for (var l = 0; l < lanes.Length; l++) lanes[l] = _fields[l].Zero;
    }

    /// <summary>product[l] ← Π_j sums[j][l], lane by lane (the lanes are the independent chains).</summary>
    private void LaneProduct(Span<T> sums, Span<T> product, int n)
    {
        var b = _b;
        sums[..b].CopyTo(product);
        for (var j = 1; j < n; j++) LaneMultiply(product, sums.Slice(j * b, b));
    }

    /// <summary>s ← s + x lane by lane, with the rung's lane kernels where there are some.</summary>
    private void LaneAdd(Span<T> s, ReadOnlySpan<T> x)
    {
        if (typeof(TField) == typeof(PrimeField62) && typeof(T) == typeof(Residue62))
            Lanes62.Add(_kernel62, MemoryMarshal.Cast<T, ulong>(s), MemoryMarshal.Cast<T, ulong>(x), MemoryMarshal.Cast<T, ulong>(s), _p62);
        else if (typeof(TField) == typeof(PrimeField31) && typeof(T) == typeof(Residue31))
            Lanes31.Add(_kernel31, MemoryMarshal.Cast<T, uint>(s), MemoryMarshal.Cast<T, uint>(x), MemoryMarshal.Cast<T, uint>(s), _p31);
        else
            for (var l = 0; l < s.Length; l++) s[l] = _fields[l].Add(s[l], x[l]);
    }

    /// <summary>s ← s − x lane by lane.</summary>
    private void LaneSubtract(Span<T> s, ReadOnlySpan<T> x)
    {
        if (typeof(TField) == typeof(PrimeField62) && typeof(T) == typeof(Residue62))
            Lanes62.Subtract(_kernel62, MemoryMarshal.Cast<T, ulong>(s), MemoryMarshal.Cast<T, ulong>(x), MemoryMarshal.Cast<T, ulong>(s), _p62);
        else if (typeof(TField) == typeof(PrimeField31) && typeof(T) == typeof(Residue31))
            Lanes31.Subtract(_kernel31, MemoryMarshal.Cast<T, uint>(s), MemoryMarshal.Cast<T, uint>(x), MemoryMarshal.Cast<T, uint>(s), _p31);
        else
            for (var l = 0; l < s.Length; l++) s[l] = _fields[l].Subtract(s[l], x[l]);
    }

    /// <summary>s ← s·x lane by lane.</summary>
    private void LaneMultiply(Span<T> s, ReadOnlySpan<T> x)
    {
        if (typeof(TField) == typeof(PrimeField62) && typeof(T) == typeof(Residue62))
            Lanes62.Multiply(_kernel62, MemoryMarshal.Cast<T, ulong>(s), MemoryMarshal.Cast<T, ulong>(x), MemoryMarshal.Cast<T, ulong>(s), _p62, _q62);
        else if (typeof(TField) == typeof(PrimeField31) && typeof(T) == typeof(Residue31))
            Lanes31.Multiply(_kernel31, MemoryMarshal.Cast<T, uint>(s), MemoryMarshal.Cast<T, uint>(x), MemoryMarshal.Cast<T, uint>(s), _p31, _q31);
        else
            for (var l = 0; l < s.Length; l++) s[l] = _fields[l].Multiply(s[l], x[l]);
    }
}
