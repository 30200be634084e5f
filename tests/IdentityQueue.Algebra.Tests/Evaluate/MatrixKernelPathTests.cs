using System.Runtime.InteropServices;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Evaluate;

/// <summary>
/// The faster paths of the matrix kernels against the plain ones on the same matrices: blocked 62-bit elimination with
/// delayed reduction and division-free tails against elimination with one inversion per pivot, the division-free Pfaffian
/// against the inverting one, and Glynn's permanent against Ryser's; on random, singular and pivot-forcing matrices.
/// </summary>
public class MatrixKernelPathTests
{
    /// <summary>Random matrices of a few kinds: dense, zero diagonal (every pivot needs a swap), a zero column or a repeated row (singular), values near p.</summary>
    private static List<(T[] Matrix, string Kind)> Matrices<TField, T>(TField f, int n, ref Xoshiro256 random)
        where TField : struct, IField<T> where T : struct
    {
        var result = new List<(T[], string)>();
        T[] Dense(ref Xoshiro256 r)
        {
            var m = new T[n * n];
            for (var i = 0; i < m.Length; i++) m[i] = f.Sample(ref r);
            return m;
        }
        result.Add((Dense(ref random), "dense"));
        var zeroDiagonal = Dense(ref random);
        for (var i = 0; i < n; i++) zeroDiagonal[i * n + i] = f.Zero;
        result.Add((zeroDiagonal, "zero diagonal"));
        var lowerZero = Dense(ref random);
        for (var i = 1; i < n; i++) for (var j = 0; j < Math.Min(i, n / 2); j++) lowerZero[i * n + j] = f.Zero;
        for (var j = 0; j < n; j++) (lowerZero[j], lowerZero[(n - 1) * n + j]) = (lowerZero[(n - 1) * n + j], lowerZero[j]);
        result.Add((lowerZero, "zeros below the diagonal, first and last rows exchanged"));
        if (n > 1)
        {
            var repeated = Dense(ref random);
            for (var j = 0; j < n; j++) repeated[(n - 1) * n + j] = repeated[(n / 3) * n + j];
            result.Add((repeated, "repeated row"));
            var zeroColumn = Dense(ref random);
            for (var i = 0; i < n; i++) zeroColumn[i * n + n / 3] = f.Zero;
            result.Add((zeroColumn, "zero column"));
        }
        var extreme = new T[n * n];
        var minusOne = f.Negate(f.One);
        for (var i = 0; i < extreme.Length; i++) extreme[i] = random.NextBelow(3) switch { 0 => minusOne, 1 => f.Negate(f.Sample(ref random)), _ => f.One };
        result.Add((extreme, "entries ±1 and negatives"));
        return result;
    }

    private static void DeterminantPathsAgree<TField, T>(TField f, int[] orders, ulong seed)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        foreach (var n in orders)
            foreach (var (m, kind) in Matrices<TField, T>(f, n, ref random))
            {
                var plain = MatrixKernels.DeterminantByElimination(f, (T[])m.Clone(), n, divisionFreeOrder: 0);
                var divisionFree = MatrixKernels.DeterminantByElimination(f, (T[])m.Clone(), n, divisionFreeOrder: n);
                var fast = MatrixKernels.Determinant(f, (T[])m.Clone(), n);
                Assert.True(f.AreEqual(plain, divisionFree), $"division-free, n={n}, {kind}");
                Assert.True(f.AreEqual(plain, fast), $"default path, n={n}, {kind}");
                if (f is PrimeField62 f62)
                {
                    // the blocked elimination without vectors, whatever the CPU
                    var scalar = MatrixKernels62.Determinant(f62, MemoryMarshal.Cast<T, ulong>(((T[])m.Clone()).AsSpan()), n, avx512: false);
                    Assert.True(PrimeField62.ToMontgomery((Residue62)(object)plain) == scalar, $"scalar blocked path, n={n}, {kind}");
                }
                if (kind is "repeated row" or "zero column") Assert.True(f.IsZero(fast), $"singular, n={n}");
            }
    }

    private static readonly int[] SmallOrders = [0, 1, 2, 3, 5, 9, 10, 11, 16];
    private static readonly int[] LargeOrders = [23, 24, 25, 31, 32, 33, 40, 47, 64, 65, 100];

    [Fact]
    public void Determinant62_BlockedAndDivisionFree_AgreeWithPlainElimination()
    {
        var r = new Xoshiro256(1);
        DeterminantPathsAgree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), [.. SmallOrders, .. LargeOrders, 130], 1);
    }

    [Fact]
    public void Determinant62_NearTheTopOfTheRung()
    {
        // The largest primes below 2^62 make the delayed sums of eight products largest.
        foreach (var p in new ulong[] { 4611686018427387847, 4611686018427387817, 2305843009213693951 })
            DeterminantPathsAgree<PrimeField62, Residue62>(PrimeField62.Create(p), [8, 30, 57], p);
    }

    [Fact]
    public void Determinant62_ReusesNothingBetweenCalls_AndIsStableUnderRepetition()
    {
        var r = new Xoshiro256(2);
        var f = PrimeField62.CreateRandom(ref r);
        var m = new Residue62[300 * 300];
        for (var i = 0; i < m.Length; i++) m[i] = f.Sample(ref r);
        var first = MatrixKernels.Determinant(f, (Residue62[])m.Clone(), 300);
        Assert.Equal(first, MatrixKernels.Determinant(f, (Residue62[])m.Clone(), 300));
        Assert.Equal(first, MatrixKernels.DeterminantByElimination(f, (Residue62[])m.Clone(), 300, 0));
        var scalar = MatrixKernels62.Determinant(f, MemoryMarshal.Cast<Residue62, ulong>(((Residue62[])m.Clone()).AsSpan()), 300, avx512: false);
        Assert.Equal(PrimeField62.ToMontgomery(first), scalar);
    }

    [Fact]
    public void DeterminantPaths_AgreeOnOtherRungs()
    {
        var r = new Xoshiro256(3);
        DeterminantPathsAgree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), [.. SmallOrders, 30], 3);
        DeterminantPathsAgree<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), [.. SmallOrders, 20], 4);
        DeterminantPathsAgree<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(300, ref r), [1, 4, 12], 5);
        DeterminantPathsAgree<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(5), [.. SmallOrders, 30], 6);
        var ext = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(2), 8, ref r);
        DeterminantPathsAgree<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(ext, [1, 3, 11, 14], 7);
    }

    private static void PfaffianPathsAgree<TField, T>(TField f, ulong seed, int maxOrder)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        for (var n = 0; n <= maxOrder; n += 2)
            for (var round = 0; round < 3; round++)
            {
                var s = new T[n * n];
                for (var i = 0; i < n; i++)
                    for (var j = i + 1; j < n; j++)
                    {
                        s[i * n + j] = round == 1 && (i + j) % 3 == 0 ? f.Zero : f.Sample(ref random); // zeros force index swaps
                        s[j * n + i] = f.Negate(s[i * n + j]);
                    }
                var plain = MatrixKernels.Pfaffian(f, (T[])s.Clone(), n, divisionFreeOrder: 0);
                var divisionFree = MatrixKernels.Pfaffian(f, (T[])s.Clone(), n, divisionFreeOrder: n);
                var fast = MatrixKernels.Pfaffian(f, (T[])s.Clone(), n);
                Assert.True(f.AreEqual(plain, divisionFree), $"division-free pf, n={n}");
                Assert.True(f.AreEqual(plain, fast), $"pf, n={n}");
                var det = MatrixKernels.Determinant(f, (T[])s.Clone(), n);
                Assert.True(f.AreEqual(f.Multiply(fast, fast), det), $"pf² = det, n={n}");
            }
    }

    [Fact]
    public void Pfaffian_DivisionFreeAgreesWithInverting()
    {
        var r = new Xoshiro256(10);
        PfaffianPathsAgree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 10, 30);
        PfaffianPathsAgree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 11, 16);
        PfaffianPathsAgree<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(128, ref r), 12, 12);
        PfaffianPathsAgree<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(3), 13, 14);
    }

    private static void PermanentPathsAgree<TField, T>(TField f, ulong seed, int maxOrder)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        var scratch = new T[maxOrder];
        for (var n = 1; n <= maxOrder; n++)
        {
            var m = new T[n * n];
            for (var i = 0; i < m.Length; i++) m[i] = random.NextBelow(5) == 0 ? f.Zero : f.Sample(ref random);
            var ryser = MatrixKernels.Ryser<TField, T>(f, m, n, new T[n]);
            var glynn = MatrixKernels.Glynn<TField, T>(f, m, n, new T[n]);
            Assert.True(f.AreEqual(ryser, glynn), $"Glynn vs Ryser, n={n}");
            Assert.True(f.AreEqual(ryser, MatrixKernels.Permanent<TField, T>(f, m, n)), $"perm, n={n}");
            Assert.True(f.AreEqual(ryser, MatrixKernels.Permanent<TField, T>(f, m, n, scratch)), $"perm with scratch, n={n}");
        }
    }

    [Fact]
    public void Permanent_GlynnAgreesWithRyser()
    {
        var r = new Xoshiro256(20);
        PermanentPathsAgree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 20, 12);
        PermanentPathsAgree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 21, 12);
        PermanentPathsAgree<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), 22, 9);
        PermanentPathsAgree<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(3), 23, 9);
        var ext = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(5), 2, ref r);
        PermanentPathsAgree<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(ext, 24, 7);
    }

    [Fact]
    public void Permanent62_VectorGlynnAgreesWithRyser()
    {
        if (!System.Runtime.Intrinsics.X86.Avx512F.IsSupported || !System.Runtime.Intrinsics.X86.Avx512DQ.IsSupported) return;
        var r = new Xoshiro256(27);
        foreach (var f in new[] { PrimeField62.CreateRandom(ref r), PrimeField62.Create(4611686018427387847) })
            for (var n = 4; n <= 13; n++)
            {
                var m = new Residue62[n * n];
                for (var i = 0; i < m.Length; i++) m[i] = r.NextBelow(6) == 0 ? f.Zero : r.NextBelow(6) == 0 ? f.Negate(f.One) : f.Sample(ref r);
                var ryser = MatrixKernels.Ryser<PrimeField62, Residue62>(f, m, n, new Residue62[n]);
                var vector = MatrixKernels62.GlynnAvx512(f, MemoryMarshal.Cast<Residue62, ulong>(m.AsSpan()), n);
                Assert.Equal(PrimeField62.ToMontgomery(ryser), vector);
            }
    }

    [Fact]
    public void Permanent_InCharacteristicTwo_UsesRyser()
    {
        // Glynn divides by 2^(n−1); over GF(2) the permanent equals the determinant (signs vanish) [common practice].
        var f = SmallPrimeField.Create(2);
        var random = new Xoshiro256(25);
        for (var n = 1; n <= 9; n++)
        {
            var m = new SmallResidue[n * n];
            for (var i = 0; i < m.Length; i++) m[i] = f.Sample(ref random);
            Assert.Equal(MatrixKernels.Determinant(f, (SmallResidue[])m.Clone(), n), MatrixKernels.Permanent<SmallPrimeField, SmallResidue>(f, m, n));
        }
    }

    [Fact]
    public void Permanent_EdgeOrders()
    {
        var r = new Xoshiro256(26);
        var f = PrimeField62.CreateRandom(ref r);
        Assert.Equal(f.One, MatrixKernels.Permanent<PrimeField62, Residue62>(f, [], 0));
        Assert.Throws<ArgumentOutOfRangeException>(() => MatrixKernels.Permanent<PrimeField62, Residue62>(f, new Residue62[63 * 63], 63));
        Assert.Throws<ArgumentException>(() => MatrixKernels.Permanent<PrimeField62, Residue62>(f, new Residue62[4], 2, new Residue62[1]));
        Assert.Throws<ArgumentException>(() => MatrixKernels.Determinant(f, new Residue62[3], 2));
    }
}
