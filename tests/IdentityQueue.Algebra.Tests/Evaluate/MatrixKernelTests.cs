using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Evaluate;

/// <summary>
/// The elimination kernels against the definitions, written once and run on every rung: det by the Leibniz expansion,
/// perm by the same sum without signs (Ryser's formula must agree), and Cayley's pf² = det (J. reine angew. Math. 38, 1849).
/// </summary>
public class MatrixKernelTests
{
    private static T Leibniz<TField, T>(TField f, T[] a, int n, bool signed) where TField : struct, IField<T> where T : struct
    {
        var total = f.Zero;
        var perm = Enumerable.Range(0, n).ToArray();
        foreach (var (p, sign) in Permutations(perm))
        {
            var term = f.One;
            for (var i = 0; i < n; i++) term = f.Multiply(term, a[i * n + p[i]]);
            total = signed && sign < 0 ? f.Subtract(total, term) : f.Add(total, term);
        }
        return total;
    }

    private static IEnumerable<(int[] Permutation, int Sign)> Permutations(int[] items)
    {
        var n = items.Length;
        var c = new int[n];
        var a = (int[])items.Clone();
        var sign = 1;
        yield return ((int[])a.Clone(), sign);
        var i = 0;
        while (i < n)
        {
            if (c[i] < i)
            {
                if (i % 2 == 0) (a[0], a[i]) = (a[i], a[0]); else (a[c[i]], a[i]) = (a[i], a[c[i]]);
                sign = -sign;
                yield return ((int[])a.Clone(), sign);
                c[i]++;
                i = 0;
            }
            else { c[i] = 0; i++; }
        }
    }

    private static void Laws<TField, T>(TField f, ulong seed) where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        for (var n = 1; n <= 6; n++)
            for (var round = 0; round < 6; round++)
            {
                var a = new T[n * n];
                for (var k = 0; k < a.Length; k++) a[k] = round == 0 && k % (n + 1) == 1 ? f.Zero : f.Sample(ref random);
                if (round == 1 && n > 1) for (var j = 0; j < n; j++) a[n + j] = a[j]; // two equal rows: det 0
                Assert.True(f.AreEqual(Leibniz(f, a, n, signed: true), MatrixKernels.Determinant(f, (T[])a.Clone(), n)), $"det n={n}");
                Assert.True(f.AreEqual(Leibniz(f, a, n, signed: false), MatrixKernels.Permanent<TField, T>(f, a, n)), $"perm n={n}");

                var s = new T[n * n];
                for (var i = 0; i < n; i++)
                    for (var j = i + 1; j < n; j++)
                    {
                        s[i * n + j] = round == 2 && i == 0 && j == 1 ? f.Zero : f.Sample(ref random); // a zero first pivot forces a swap
                        s[j * n + i] = f.Negate(s[i * n + j]);
                    }
                for (var i = 0; i < n; i++) s[i * n + i] = f.Zero;
                var pf = MatrixKernels.Pfaffian(f, (T[])s.Clone(), n);
                var det = MatrixKernels.Determinant(f, (T[])s.Clone(), n);
                Assert.True(f.AreEqual(f.Multiply(pf, pf), det), $"pf² = det, n={n}");
            }
    }

    [Fact]
    public void Rung31() { var r = new Xoshiro256(1); Laws<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 1); }

    [Fact]
    public void Rung62() { var r = new Xoshiro256(2); Laws<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 2); }

    [Fact]
    public void Rung127() { var r = new Xoshiro256(3); Laws<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), 3); }

    [Fact]
    public void BigRung() { var r = new Xoshiro256(4); Laws<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(200, ref r), 4); }

    [Fact]
    public void SmallPrimeFieldGF3() => Laws<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(3), 5);

    [Fact]
    public void ExtensionGF2To16()
    {
        var r = new Xoshiro256(6);
        var f = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(2), 16, ref r);
        Laws<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(f, 6);
    }

    // Ryser's formula with Gray-code order agrees with the definition on a 0/1 matrix with a known permanent:
    // the all-ones n×n matrix has permanent n! (common practice).
    [Fact]
    public void PermanentOfAllOnes_IsNFactorial()
    {
        var r = new Xoshiro256(7);
        var f = PrimeField62.CreateRandom(ref r);
        for (var n = 1; n <= 10; n++)
        {
            var a = Enumerable.Repeat(f.One, n * n).ToArray();
            long factorial = 1;
            for (var i = 2; i <= n; i++) factorial *= i;
            Assert.True(f.AreEqual(f.FromInteger(factorial), MatrixKernels.Permanent<PrimeField62, Residue62>(f, a, n)));
        }
    }
}
