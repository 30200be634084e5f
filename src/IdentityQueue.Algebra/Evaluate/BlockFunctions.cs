using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The block instructions that are not one kernel operation per lane: inversion, powers, determinants, Pfaffians and
/// permanents, on all lanes of a <see cref="BlockState{TField, T}"/>. The lane arithmetic they need comes as a struct
/// (<see cref="ILaneArithmetic{T}"/>), so that each runs with the block's kernel. Stateless; no allocation.
/// </summary>
internal static class BlockFunctions
{
    /// <summary>
    /// 1/a on every lane. When all lanes share one field, with one field inversion (Montgomery's batch trick: prefix
    /// products, one inverse, and back again); else lane by lane in each lane's field. A lane where a vanishes is undefined
    /// and gets 0.
    /// </summary>
    public static void Invert<TField, T>(BlockState<TField, T> s, BlockInstruction ins) where TField : struct, IField<T> where T : struct
    {
        var b = s.B;
        var a = s.Registers.AsSpan(ins.A * b, b);
        var d = s.Registers.AsSpan(ins.Dest * b, b);
        var undefined = s.Undefined;
        if (!s.Uniform)
        {
            for (var i = 0; i < b; i++)
            {
                if (s.Fields[i].TryInvert(a[i], out var x)) d[i] = x;
                else { d[i] = s.Fields[i].Zero; undefined[i] = true; }
            }
            return;
        }
        var f = s.Fields[0];
        var prefix = s.LaneScratch.AsSpan();
        var product = f.One;
        for (var i = 0; i < b; i++)
        {
            prefix[i] = product;
            if (f.IsZero(a[i])) undefined[i] = true;
            else product = f.Multiply(product, a[i]);
        }
        if (!f.TryInvert(product, out var inverse))
        {
            // Only possible if the field were not a field; invert lane by lane instead.
            for (var i = 0; i < b; i++)
            {
                if (f.TryInvert(a[i], out var x)) d[i] = x;
                else { d[i] = f.Zero; undefined[i] = true; }
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
    public static void Power<TField, T, TLanes>(BlockState<TField, T> s, TLanes lanes, BlockInstruction ins)
        where TField : struct, IField<T> where T : struct where TLanes : struct, ILaneArithmetic<T>
    {
        var b = s.B;
        var a = s.Registers.AsSpan(ins.A * b, b);
        var d = s.Registers.AsSpan(ins.Dest * b, b);
        var plan = s.Program.Exponents[ins.B];
        if (plan.IsZero) { FillOne(s, d); return; }
        a.CopyTo(d);
        foreach (var bit in plan.Bits)
        {
            lanes.Multiply(d, d);
            if (bit) lanes.Multiply(d, a);
        }
    }

    /// <summary>Determinant or Pfaffian: gathers each lane's matrix into the scratch matrix and runs the in-place kernel of <see cref="MatrixKernels"/>.</summary>
    public static void PerLaneMatrix<TField, T>(BlockState<TField, T> s, BlockInstruction ins) where TField : struct, IField<T> where T : struct
    {
        var b = s.B;
        var n = ins.B;
        var slots = s.Program.MatrixSlots.AsSpan(ins.A, n * n);
        var m = s.Matrix.AsSpan(0, n * n);
        var r = s.Registers.AsSpan();
        var d = r.Slice(ins.Dest * b, b);
        for (var l = 0; l < b; l++)
        {
            for (var k = 0; k < m.Length; k++) m[k] = r[slots[k] * b + l];
            d[l] = ins.Op == BlockOpCode.Determinant
                ? MatrixKernels.Determinant(s.Fields[l], m, n, s.Cancellation)
                : MatrixKernels.Pfaffian(s.Fields[l], m, n, s.Cancellation);
        }
    }

    /// <summary>
    /// Permanents on all lanes together: the sign patterns of Glynn's formula (odd characteristic) or the subsets of Ryser's
    /// formula, in Gray-code order, are the same for every lane, so each step updates the sums of every lane by one row or
    /// column and multiplies them lane by lane (see <see cref="MatrixKernels.Permanent{TField, T}(TField, ReadOnlySpan{T}, int, CancellationToken)"/>).
    /// The sign alternates along the Gray code, so the terms go to two accumulators.
    /// </summary>
    public static void Permanent<TField, T, TLanes>(BlockState<TField, T> s, TLanes lanes, BlockInstruction ins)
        where TField : struct, IField<T> where T : struct where TLanes : struct, ILaneArithmetic<T>
    {
        var b = s.B;
        var n = ins.B;
        var r = s.Registers.AsSpan();
        var d = r.Slice(ins.Dest * b, b);
        if (n == 0) { FillOne(s, d); return; }
        var slots = s.Program.MatrixSlots.AsSpan(ins.A, n * n);
        var scratch = s.PermanentScratch.AsSpan(0, (n + 3) * b);
        var sums = scratch[..(n * b)];
        var product = scratch.Slice(n * b, b);
        var even = scratch.Slice((n + 1) * b, b);
        var odd = scratch.Slice((n + 2) * b, b);
        FillZero(s, even);
        FillZero(s, odd);
        var glynn = n >= MatrixKernels.GlynnMinOrder && s.OddCharacteristic;
        ulong steps;
        if (glynn)
        {
            // column sums with every δ_i = +1; the first term
            for (var j = 0; j < n; j++)
            {
                var column = sums.Slice(j * b, b);
                r.Slice(slots[j] * b, b).CopyTo(column);
                for (var i = 1; i < n; i++) lanes.Add(column, r.Slice(slots[i * n + j] * b, b));
            }
            LaneProduct(lanes, sums, product, n, b);
            product.CopyTo(even);
            steps = 1UL << (n - 1);
        }
        else
        {
            for (var j = 0; j < n; j++) FillZero(s, sums.Slice(j * b, b));
            steps = 1UL << n;
        }
        var flipped = 0UL;
        for (var g = 1UL; g < steps; g++)
        {
            if ((g & (MatrixKernels.CancellationInterval - 1)) == 0) s.Cancellation.ThrowIfCancellationRequested();
            var k = BitOperations.TrailingZeroCount(g);
            var back = (flipped >> k & 1) != 0;
            flipped ^= 1UL << k;
            for (var j = 0; j < n; j++)
            {
                // Glynn: row k+1 moves every column sum by ∓2·a; Ryser: column k enters or leaves every row sum.
                var sum = sums.Slice(j * b, b);
                var entry = r.Slice((glynn ? slots[(k + 1) * n + j] : slots[j * n + k]) * b, b);
                var up = glynn ? back : !back; // Glynn: δ back to +1 adds 2·a; Ryser: a column entering adds it
                for (var twice = glynn ? 2 : 1; twice > 0; twice--)
                {
                    if (up) lanes.Add(sum, entry);
                    else lanes.Subtract(sum, entry);
                }
            }
            LaneProduct(lanes, sums, product, n, b);
            lanes.Add((g & 1) == 0 ? even : odd, product);
        }
        var fields = s.Fields;
        if (glynn)
        {
            // perm = 2^−(n−1) (even − odd), in each lane's field
            var power = BigInteger.One << (n - 1);
            for (var l = 0; l < b; l++)
            {
                var f = fields[l];
                f.TryInvert(f.FromInteger(power), out var scale);
                d[l] = f.Multiply(f.Subtract(even[l], odd[l]), scale);
            }
        }
        else if ((n & 1) == 0) for (var l = 0; l < b; l++) d[l] = fields[l].Subtract(even[l], odd[l]);
        else for (var l = 0; l < b; l++) d[l] = fields[l].Subtract(odd[l], even[l]);
    }

    /// <summary>product[l] ← Π_j sums[j][l], lane by lane (the lanes are the independent chains).</summary>
    private static void LaneProduct<T, TLanes>(TLanes lanes, Span<T> sums, Span<T> product, int n, int b)
        where T : struct where TLanes : struct, ILaneArithmetic<T>
    {
        sums[..b].CopyTo(product);
        for (var j = 1; j < n; j++) lanes.Multiply(product, sums.Slice(j * b, b));
    }

    private static void FillOne<TField, T>(BlockState<TField, T> s, Span<T> lanes) where TField : struct, IField<T> where T : struct
    {
        for (var l = 0; l < lanes.Length; l++) lanes[l] = s.Fields[l].One;
    }

    private static void FillZero<TField, T>(BlockState<TField, T> s, Span<T> lanes) where TField : struct, IField<T> where T : struct
    {
        for (var l = 0; l < lanes.Length; l++) lanes[l] = s.Fields[l].Zero;
    }
}
