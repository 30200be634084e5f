using System.Diagnostics;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// Chooses the lane kernel of a block evaluator, once, from the field type's <see cref="ElementLayout"/>, the CPU, the
/// widest kernel allowed and the block size (a vector kernel only for a block of whole vectors). The one place that maps
/// fields to kernels.
/// </summary>
internal static class BlockInterpreter
{
    /// <summary>Lanes per vector instruction of the widest kernel this CPU runs for <typeparamref name="TField"/>.</summary>
    public static int LanesPerInstruction<TField>() where TField : IElementLayout => TField.Layout switch
    {
        ElementLayout.Montgomery31 => Lanes31.Best switch
        {
            LaneKernel.Avx512 => Vector512<uint>.Count,
            LaneKernel.Avx2 => Vector256<uint>.Count,
            _ => 1,
        },
        ElementLayout.Montgomery62 => Lanes62.Best == LaneKernel.Avx512 ? Vector512<ulong>.Count : 1,
        _ => 1,
    };

    /// <summary>The interpreter of <paramref name="state"/>'s program with the widest kernel up to <paramref name="widest"/> that fits.</summary>
    public static BlockInterpreter<TField, T> Create<TField, T>(BlockState<TField, T> state, LaneKernel widest)
        where TField : struct, IField<T> where T : struct
    {
        var b = state.B;
        switch (TField.Layout)
        {
            case ElementLayout.Montgomery31:
            {
                Debug.Assert(Unsafe.SizeOf<T>() == sizeof(uint));
                var kernel = Lanes31.Supported(widest);
                if (kernel == LaneKernel.Avx512 && b % Vector512<uint>.Count == 0)
                    return new LaneInterpreter<TField, T, Montgomery31x16<TField>, Vector512<uint>, MontgomeryModulus<Vector512<uint>>>(state);
                if (kernel != LaneKernel.Scalar && Avx2.IsSupported && b % Vector256<uint>.Count == 0)
                    return new LaneInterpreter<TField, T, Montgomery31x8<TField>, Vector256<uint>, MontgomeryModulus<Vector256<uint>>>(state);
                return new LaneInterpreter<TField, T, Montgomery31x1<TField>, uint, MontgomeryModulus<uint>>(state);
            }
            case ElementLayout.Montgomery62:
            {
                Debug.Assert(Unsafe.SizeOf<T>() == sizeof(ulong));
                if (Lanes62.Supported(widest) == LaneKernel.Avx512 && b % Vector512<ulong>.Count == 0)
                    return new LaneInterpreter<TField, T, Montgomery62x8<TField>, Vector512<ulong>, Montgomery62Modulus8>(state);
                return new LaneInterpreter<TField, T, Montgomery62x1<TField>, ulong, MontgomeryModulus<ulong>>(state);
            }
            default:
                return new LaneInterpreter<TField, T, FieldLaneKernel<TField, T>, T, TField>(state);
        }
    }
}

/// <summary>The interpreter of a block evaluator, behind one virtual call per block (see <see cref="LaneInterpreter{TField, T, TKernel, TLane, TModulus}"/>).</summary>
internal abstract class BlockInterpreter<TField, T> where TField : struct, IField<T> where T : struct
{
    /// <summary>Which kernel runs.</summary>
    public abstract string Kernel { get; }

    /// <summary>Whether <paramref name="a"/> and <paramref name="b"/> are the same field (by modulus on the Montgomery rungs).</summary>
    public abstract bool SameField(TField a, TField b);

    /// <summary>Prepares the kernel's moduli from the lanes' fields; after every change of a lane's field.</summary>
    public abstract void UseLaneFields();

    /// <summary>Runs the program on the block: <paramref name="points"/> as in <see cref="BlockEvaluator{TField, T}.Evaluate"/>; results stay in the registers.</summary>
    public abstract void Run(ReadOnlySpan<T> points);
}

/// <summary>
/// The block interpreter, written once: each instruction is dispatched once per block and then runs over the block's
/// <typeparamref name="TLane"/>s (each <see cref="ILaneKernel{TField, TLane, TModulus}.Width"/> lanes) with the kernel's
/// operations, which the JIT inlines for each kernel struct. Inversion, powers and the matrix functions go to
/// <see cref="BlockFunctions"/>. Holds the kernel's moduli; not thread-safe.
/// </summary>
internal sealed class LaneInterpreter<TField, T, TKernel, TLane, TModulus> : BlockInterpreter<TField, T>
    where TField : struct, IField<T> where T : struct
    where TKernel : struct, ILaneKernel<TField, TLane, TModulus> where TLane : struct where TModulus : struct
{
    private readonly BlockState<TField, T> _s;
    private readonly TModulus[] _moduli; // one per TLane of a block

    public LaneInterpreter(BlockState<TField, T> state)
    {
        Debug.Assert(state.B % TKernel.Width == 0);
        _s = state;
        _moduli = new TModulus[state.B / TKernel.Width];
    }

    public override string Kernel => TKernel.Description;

    public override bool SameField(TField a, TField b) => TKernel.SameField(a, b);

    public override void UseLaneFields()
    {
        var fields = _s.Fields.AsSpan();
        for (var j = 0; j < _moduli.Length; j++) _moduli[j] = TKernel.Modulus(fields.Slice(j * TKernel.Width, TKernel.Width));
    }

    public override void Run(ReadOnlySpan<T> points)
    {
        var w = _s.B / TKernel.Width;
        ReadOnlySpan<TModulus> m = _moduli;
        var r = LaneCast.As<T, TLane>(_s.Registers.AsSpan());
        var v = LaneCast.As<T, TLane>(points[..(_s.Program.Program.Variables.Length * _s.B)]);
        foreach (var ins in _s.Program.Instructions)
        {
            var d = r.Slice(ins.Dest * w, w);
            switch (ins.Op)
            {
                case BlockOpCode.Variable: v.Slice(ins.A * w, w).CopyTo(d); break;
                case BlockOpCode.Add:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.Add(x[j], y[j], in m[j]);
                    break;
                }
                case BlockOpCode.Subtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.Subtract(x[j], y[j], in m[j]);
                    break;
                }
                case BlockOpCode.Multiply:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.Multiply(x[j], y[j], in m[j]);
                    break;
                }
                case BlockOpCode.Negate:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.Negate(x[j], in m[j]);
                    break;
                }
                case BlockOpCode.MultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.MultiplyAdd(x[j], y[j], z[j], in m[j]);
                    break;
                }
                case BlockOpCode.MultiplySubtract:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.MultiplySubtract(x[j], y[j], z[j], in m[j]);
                    break;
                }
                case BlockOpCode.NegativeMultiplyAdd:
                {
                    var x = r.Slice(ins.A * w, d.Length);
                    var y = r.Slice(ins.B * w, d.Length);
                    var z = r.Slice(ins.C * w, d.Length);
                    for (var j = 0; j < d.Length; j++) d[j] = TKernel.NegativeMultiplyAdd(x[j], y[j], z[j], in m[j]);
                    break;
                }
                default: RunOther(ins); break;
            }
        }
    }

    /// <summary>Inversion, powers and the matrix functions.</summary>
    private void RunOther(BlockInstruction ins)
    {
        _s.Cancellation.ThrowIfCancellationRequested();
        var lanes = new KernelLanes<TField, T, TKernel, TLane, TModulus>(_moduli);
        switch (ins.Op)
        {
            case BlockOpCode.Invert: BlockFunctions.Invert(_s, ins); break;
            case BlockOpCode.Power: BlockFunctions.Power(_s, lanes, ins); break;
            case BlockOpCode.Permanent: BlockFunctions.Permanent(_s, lanes, ins); break;
            case BlockOpCode.Determinant or BlockOpCode.Pfaffian: BlockFunctions.PerLaneMatrix(_s, ins); break;
            default: throw new InvalidOperationException($"unexpected block operation {ins.Op}");
        }
    }
}

/// <summary>s ← s op x on all lanes of a block (spans of one value per lane), for the block functions.</summary>
internal interface ILaneArithmetic<T> where T : struct
{
    void Add(Span<T> s, ReadOnlySpan<T> x);
    void Subtract(Span<T> s, ReadOnlySpan<T> x);
    void Multiply(Span<T> s, ReadOnlySpan<T> x);
}

/// <summary><see cref="ILaneArithmetic{T}"/> with a kernel's operations and moduli (a struct, so that the block functions are specialised per kernel).</summary>
internal readonly struct KernelLanes<TField, T, TKernel, TLane, TModulus>(TModulus[] moduli) : ILaneArithmetic<T>
    where TField : struct where T : struct
    where TKernel : struct, ILaneKernel<TField, TLane, TModulus> where TLane : struct where TModulus : struct
{
    public void Add(Span<T> s, ReadOnlySpan<T> x)
    {
        var d = LaneCast.As<T, TLane>(s);
        var y = LaneCast.As<T, TLane>(x)[..d.Length];
        ReadOnlySpan<TModulus> m = moduli.AsSpan(0, d.Length);
        for (var j = 0; j < d.Length; j++) d[j] = TKernel.Add(d[j], y[j], in m[j]);
    }

    public void Subtract(Span<T> s, ReadOnlySpan<T> x)
    {
        var d = LaneCast.As<T, TLane>(s);
        var y = LaneCast.As<T, TLane>(x)[..d.Length];
        ReadOnlySpan<TModulus> m = moduli.AsSpan(0, d.Length);
        for (var j = 0; j < d.Length; j++) d[j] = TKernel.Subtract(d[j], y[j], in m[j]);
    }

    public void Multiply(Span<T> s, ReadOnlySpan<T> x)
    {
        var d = LaneCast.As<T, TLane>(s);
        var y = LaneCast.As<T, TLane>(x)[..d.Length];
        ReadOnlySpan<TModulus> m = moduli.AsSpan(0, d.Length);
        for (var j = 0; j < d.Length; j++) d[j] = TKernel.Multiply(d[j], y[j], in m[j]);
    }
}

/// <summary>
/// A block's values as the kernel's lanes: the same memory, no copy (the lane type is the element type T itself on the
/// generic kernel, or the raw representatives of T, one or a vector of them).
/// </summary>
internal static class LaneCast
{
    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static Span<TLane> As<T, TLane>(Span<T> s) where T : struct where TLane : struct =>
        MemoryMarshal.CreateSpan(ref Unsafe.As<T, TLane>(ref MemoryMarshal.GetReference(s)), s.Length * Unsafe.SizeOf<T>() / Unsafe.SizeOf<TLane>());

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    public static ReadOnlySpan<TLane> As<T, TLane>(ReadOnlySpan<T> s) where T : struct where TLane : struct =>
        MemoryMarshal.CreateReadOnlySpan(ref Unsafe.As<T, TLane>(ref MemoryMarshal.GetReference(s)), s.Length * Unsafe.SizeOf<T>() / Unsafe.SizeOf<TLane>());
}
