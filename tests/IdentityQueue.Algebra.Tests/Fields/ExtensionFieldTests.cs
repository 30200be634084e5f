using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class ExtensionFieldTests
{
    // x^8 + x^4 + x^3 + x + 1, the AES polynomial (FIPS-197 §4.2), lowest coefficient first.
    private static readonly BigInteger[] Aes = [1, 1, 0, 1, 1, 0, 0, 0, 1];

    private static ExtensionField<SmallPrimeField, SmallResidue> OverSmall(ulong p, int m, ulong seed)
    {
        var random = new Xoshiro256(seed);
        return ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(p), m, ref random);
    }

    private static bool IsIrreducible(ulong p, BigInteger[] polynomial) =>
        ExtensionField<SmallPrimeField, SmallResidue>.IsIrreducible(SmallPrimeField.Create(p), polynomial);

    [Theory]
    [InlineData(2UL, 8)]
    [InlineData(2UL, 62)]
    [InlineData(3UL, 5)]
    [InlineData(7UL, 12)]
    [InlineData(5UL, 1)]
    [InlineData(2UL, 1)]
    public void ExtensionsOfSmallPrimeFieldsSatisfyTheFieldLaws(ulong p, int m)
    {
        var f = OverSmall(p, m, (ulong)m * 1000 + p);
        Assert.Equal(m, f.ExtensionDegree);
        Assert.Equal((BigInteger)p, f.Characteristic);
        FieldLaws.CheckLaws<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(f, p + (ulong)m, samples: m > 20 ? 20 : 40);
        CheckFrobeniusIsAdditive<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(f, 9);
    }

    [Fact]
    public void QuadraticExtensionOfASixtyTwoBitPrimeFieldSatisfiesTheFieldLaws()
    {
        var random = new Xoshiro256(62);
        var basis = PrimeField62.CreateRandom(ref random);
        var f = ExtensionField<PrimeField62, Residue62>.Create(basis, 2, ref random);
        Assert.Equal(2 * basis.SizeLog2, f.SizeLog2, 9);
        FieldLaws.CheckLaws<ExtensionField<PrimeField62, Residue62>, ExtElement<Residue62>>(f, 3);
        CheckFrobeniusIsAdditive<ExtensionField<PrimeField62, Residue62>, ExtElement<Residue62>>(f, 4);
    }

    [Fact]
    public void ExtensionsOfOtherPrimeFieldTypesSatisfyTheFieldLaws()
    {
        var random = new Xoshiro256(5);
        FieldLaws.CheckLaws<ExtensionField<PrimeField31, Residue31>, ExtElement<Residue31>>(
            ExtensionField<PrimeField31, Residue31>.Create(PrimeField31.CreateRandom(ref random), 3, ref random), 6, samples: 15);
        FieldLaws.CheckLaws<ExtensionField<BigPrimeField, BigResidue>, ExtElement<BigResidue>>(
            ExtensionField<BigPrimeField, BigResidue>.Create(BigPrimeField.Create(2), 8, ref random), 7, samples: 15);
        FieldLaws.CheckLaws<ExtensionField<PrimeField127, Residue127>, ExtElement<Residue127>>(
            ExtensionField<PrimeField127, Residue127>.Create(PrimeField127.CreateRandom(ref random), 1, ref random), 8, samples: 15);
    }

    /// <summary>(a + b)^p = a^p + b^p in characteristic p (the freshman's dream; common practice).</summary>
    private static void CheckFrobeniusIsAdditive<TField, T>(TField f, ulong seed)
        where TField : struct, IField<T>
        where T : struct
    {
        var random = new Xoshiro256(seed);
        for (var i = 0; i < 5; i++)
        {
            var a = f.Sample(ref random);
            var b = f.Sample(ref random);
            var p = f.Characteristic;
            Assert.True(f.AreEqual(FieldMath.Pow(f, f.Add(a, b), p), f.Add(FieldMath.Pow(f, a, p), FieldMath.Pow(f, b, p))));
        }
    }

    [Fact]
    public void AesPolynomialIsIrreducibleAndXToTheFourthPlusOneIsNot()
    {
        Assert.True(IsIrreducible(2, Aes));
        // x^4 + 1 = (x + 1)^4 over GF(2) (common practice)
        Assert.False(IsIrreducible(2, [1, 0, 0, 0, 1]));
        Assert.Throws<ArgumentException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(2), [1, 0, 0, 0, 1]));
    }

    [Fact]
    public void AesFieldProductsMatchTheStandardsExamples()
    {
        var f = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(2), Aes);
        ExtElement<SmallResidue> Byte(int b) => f.FromCoefficients(Enumerable.Range(0, 8).Select(i => new BigInteger((b >> i) & 1)).ToArray());
        // {57}·{83} = {c1} (FIPS-197 §4.2) and {57}·{13} = {fe} (FIPS-197 §4.2.1)
        Assert.True(f.AreEqual(Byte(0xc1), f.Multiply(Byte(0x57), Byte(0x83))));
        Assert.True(f.AreEqual(Byte(0xfe), f.Multiply(Byte(0x57), Byte(0x13))));
        // {53}^-1 = {ca} in the AES field [memory]
        Assert.True(f.TryInvert(Byte(0x53), out var inverse));
        Assert.True(f.AreEqual(Byte(0xca), inverse));
        Assert.Equal(Aes, f.DefiningPolynomial);
    }

    public static TheoryData<int, int> GaussCases()
    {
        var data = new TheoryData<int, int>();
        for (var n = 1; n <= 8; n++) data.Add(2, n);
        for (var n = 1; n <= 4; n++) data.Add(3, n);
        for (var n = 1; n <= 3; n++) data.Add(5, n);
        return data;
    }

    [Theory]
    [MemberData(nameof(GaussCases))]
    public void CountOfIrreducibleMonicPolynomialsMatchesGausssFormula(int p, int n)
    {
        // N(p, n) = (1/n) Σ_{d|n} μ(d) p^(n/d) (Lidl and Niederreiter, Finite Fields, Thm 3.25 [memory]).
        BigInteger sum = 0;
        for (var d = 1; d <= n; d++)
            if (n % d == 0) sum += Mobius(d) * BigInteger.Pow(p, n / d);
        var expected = (int)(sum / n);

        var count = 0;
        var total = (int)BigInteger.Pow(p, n);
        for (var code = 0; code < total; code++)
        {
            var polynomial = new BigInteger[n + 1];
            for (int j = 0, c = code; j < n; j++, c /= p) polynomial[j] = c % p;
            polynomial[n] = 1;
            if (IsIrreducible((ulong)p, polynomial)) count++;
        }
        Assert.Equal(expected, count);
    }

    private static int Mobius(int d)
    {
        var result = 1;
        for (var q = 2; q * q <= d; q++)
        {
            if (d % q != 0) continue;
            d /= q;
            if (d % q == 0) return 0;
            result = -result;
        }
        return d > 1 ? -result : result;
    }

    [Fact]
    public void RandomDefiningPolynomialIsMonicIrreducibleAndDeterministicForASeed()
    {
        var a = OverSmall(3, 7, 77);
        var b = OverSmall(3, 7, 77);
        var f = a.DefiningPolynomial!;
        Assert.Equal(8, f.Length);
        Assert.Equal(BigInteger.One, f[7]);
        Assert.Equal(f, b.DefiningPolynomial);
        Assert.True(IsIrreducible(3, f));
        Assert.NotEqual(f, OverSmall(3, 7, 78).DefiningPolynomial);
    }

    [Fact]
    public void FieldRebuiltFromItsDefiningPolynomialComputesTheSameProducts()
    {
        var f = OverSmall(7, 4, 5);
        var g = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(7), f.DefiningPolynomial!);
        var random = new Xoshiro256(1);
        for (var i = 0; i < 20; i++)
        {
            var x = f.Sample(ref random);
            var y = f.Sample(ref random);
            var product = f.ToCoefficients(f.Multiply(x, y));
            Assert.Equal(product, g.ToCoefficients(g.Multiply(g.FromCoefficients(f.ToCoefficients(x)), g.FromCoefficients(f.ToCoefficients(y)))));
        }
    }

    [Fact]
    public void DegreeOneExtensionIsTheBaseField()
    {
        var basis = SmallPrimeField.Create(101);
        var random = new Xoshiro256(3);
        var f = ExtensionField<SmallPrimeField, SmallResidue>.Create(basis, 1, ref random);
        Assert.Equal(2, f.DefiningPolynomial!.Length);
        for (var a = 0; a < 101; a += 7)
            for (var b = 1; b < 101; b += 11)
            {
                Assert.Equal([(BigInteger)(a * b % 101)], f.ToCoefficients(f.Multiply(f.FromInteger(a), f.FromInteger(b))));
                Assert.True(f.TryInvert(f.FromInteger(b), out var inverse));
                Assert.Equal(BigInteger.ModPow(b, 99, 101), f.ToCoefficients(inverse)[0]);
            }
    }

    [Fact]
    public void SampleIsUniformOverTheElements()
    {
        // 9000 samples of GF(9): each of the 9 elements about 1000 times; the bounds are ±6 standard deviations (common practice).
        var f = OverSmall(3, 2, 1);
        var random = new Xoshiro256(2);
        var counts = new int[9];
        for (var i = 0; i < 9000; i++)
        {
            var c = f.ToCoefficients(f.Sample(ref random));
            counts[(int)(c[0] + 3 * c[1])]++;
        }
        Assert.All(counts, n => Assert.InRange(n, 820, 1180));
    }

    [Fact]
    public void DefaultElementActsAsZero()
    {
        var f = OverSmall(5, 3, 4);
        ExtElement<SmallResidue> zero = default;
        Assert.True(f.IsZero(zero));
        Assert.True(f.AreEqual(f.Add(zero, f.One), f.One));
        Assert.True(f.IsZero(f.Multiply(zero, f.One)));
        Assert.Equal(f.Zero, zero);
        Assert.Equal(f.Zero.GetHashCode(), zero.GetHashCode());
        Assert.Equal([0, 0, 0], f.ToCoefficients(zero));
        Assert.False(f.TryInvert(zero, out _));
    }

    [Fact]
    public void CreateValidatesItsArguments()
    {
        var gf2 = SmallPrimeField.Create(2);
        var random = new Xoshiro256(1);
        Assert.Throws<ArgumentOutOfRangeException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(gf2, 0, ref random));
        Assert.Throws<ArgumentException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(gf2, [1, 1, 0]));      // not monic
        Assert.Throws<ArgumentException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(gf2, [1, 2, 1]));      // coefficient out of range
        Assert.Throws<ArgumentException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(gf2, [1]));            // degree 0
        Assert.Throws<ArgumentException>(() => ExtensionField<SmallPrimeField, SmallResidue>.Create(gf2, [1, 0, 1]));      // x^2 + 1 = (x + 1)^2
        Assert.Throws<ArgumentException>(() => ExtensionField<RationalField, Rational>.Create(RationalField.Instance, 2, ref random));
        var f = OverSmall(2, 4, 1);
        Assert.Throws<ArgumentException>(() => f.FromCoefficients([1, 0, 1]));
        Assert.Throws<ArgumentException>(() => f.FromCoefficients([1, 0, 1, 2]));
    }

    [Fact]
    public void DegreeSixtyTwoFieldsOverGf2HaveIrreducibleDefiningPolynomialsForSeveralSeeds()
    {
        var seen = new HashSet<string>();
        for (var seed = 0UL; seed < 3; seed++)
        {
            var f = OverSmall(2, 62, seed);
            Assert.True(IsIrreducible(2, f.DefiningPolynomial!));
            seen.Add(string.Join(",", f.DefiningPolynomial!));
        }
        Assert.Equal(3, seen.Count);
    }
}
