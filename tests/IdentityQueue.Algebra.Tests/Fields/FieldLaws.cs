using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

/// <summary>The field axioms and the IField contract, written once and run for every field type.</summary>
internal static class FieldLaws
{
    /// <summary>
    /// Checks the axioms (common practice: the definition of a field) on random elements and on 0, 1, −1, plus
    /// MultiplyAdd, Pow, Fermat's little theorem in GF(q) (a^(q−1) = 1 for a ≠ 0), FromInteger on negative and
    /// huge integers, and the coefficient round trip.
    /// </summary>
    public static void CheckLaws<TField, T>(TField f, ulong seed, int samples = 40, int fermatSamples = 3)
        where TField : struct, IField<T>
        where T : struct
    {
        var random = new Xoshiro256(seed);
        var p = f.Characteristic;
        var m = f.ExtensionDegree;

        var elements = new List<T> { f.Zero, f.One, f.Negate(f.One), f.FromInteger(2), f.FromInteger(-3) };
        for (var i = 0; i < samples; i++) elements.Add(f.Sample(ref random));

        Assert.True(f.IsZero(f.Zero));
        Assert.False(f.IsZero(f.One));
        Assert.False(f.TryInvert(f.Zero, out _));
        Assert.False(FieldMath.Inverse(f, f.Zero, out _));
        Assert.False(FieldMath.Divide(f, f.One, f.Zero, out _));

        for (var i = 0; i < elements.Count; i++)
        {
            var a = elements[i];
            var b = elements[(i * 7 + 3) % elements.Count];
            var c = elements[(i * 13 + 5) % elements.Count];

            // associativity
            Assert.True(f.AreEqual(f.Add(f.Add(a, b), c), f.Add(a, f.Add(b, c))));
            Assert.True(f.AreEqual(f.Multiply(f.Multiply(a, b), c), f.Multiply(a, f.Multiply(b, c))));
            // commutativity
            Assert.True(f.AreEqual(f.Add(a, b), f.Add(b, a)));
            Assert.True(f.AreEqual(f.Multiply(a, b), f.Multiply(b, a)));
            // distributivity
            Assert.True(f.AreEqual(f.Multiply(a, f.Add(b, c)), f.Add(f.Multiply(a, b), f.Multiply(a, c))));
            // identities
            Assert.True(f.AreEqual(f.Add(a, f.Zero), a));
            Assert.True(f.AreEqual(f.Multiply(a, f.One), a));
            Assert.True(f.IsZero(f.Multiply(a, f.Zero)));
            // additive inverse, subtraction
            Assert.True(f.IsZero(f.Add(a, f.Negate(a))));
            Assert.True(f.AreEqual(f.Subtract(a, b), f.Add(a, f.Negate(b))));
            Assert.True(f.AreEqual(f.Add(f.Subtract(a, b), b), a));
            // multiplicative inverse
            if (!f.IsZero(a))
            {
                Assert.True(f.TryInvert(a, out var inverse));
                Assert.True(f.AreEqual(f.Multiply(a, inverse), f.One));
                Assert.True(FieldMath.Divide(f, b, a, out var quotient));
                Assert.True(f.AreEqual(f.Multiply(quotient, a), b));
            }
            // MultiplyAdd
            Assert.True(f.AreEqual(f.MultiplyAdd(a, b, c), f.Add(f.Multiply(a, b), c)));
            // equality agrees with the difference being zero
            Assert.Equal(f.AreEqual(a, b), f.IsZero(f.Subtract(a, b)));
            // coefficient round trip
            var coefficients = f.ToCoefficients(a);
            Assert.Equal(m, coefficients.Length);
            if (p.Sign > 0)
                Assert.All(coefficients, x => Assert.True(x.Sign >= 0 && x < p));
            Assert.True(f.AreEqual(f.FromCoefficients(coefficients), a));
        }

        // Pow agrees with repeated multiplication, for both exponent types.
        foreach (var a in elements.Take(8))
        {
            var power = f.One;
            for (var e = 0; e <= 12; e++)
            {
                Assert.True(f.AreEqual(FieldMath.Pow(f, a, (ulong)e), power));
                Assert.True(f.AreEqual(FieldMath.Pow(f, a, new BigInteger(e)), power));
                power = f.Multiply(power, a);
            }
            // a^(x+y) = a^x·a^y with a BigInteger exponent beyond 64 bits (finite fields only: over Q it would not fit)
            if (p.IsZero) continue;
            var x = (BigInteger.One << 70) + 12345;
            var y = new BigInteger(987654321);
            Assert.True(f.AreEqual(FieldMath.Pow(f, a, x + y), f.Multiply(FieldMath.Pow(f, a, x), FieldMath.Pow(f, a, y))));
        }

        // Fermat: a^(|F|−1) = 1 for a ≠ 0, and a^|F| = a for every a.
        if (p.Sign > 0)
        {
            var order = BigInteger.Pow(p, m);
            var tested = 0;
            foreach (var a in elements.Skip(1))
            {
                if (tested == fermatSamples) break;
                if (f.IsZero(a)) continue;
                Assert.True(f.AreEqual(FieldMath.Pow(f, a, order - 1), f.One));
                tested++;
            }
            Assert.True(f.IsZero(FieldMath.Pow(f, f.Zero, order)));
            Assert.True(f.IsZero(f.FromInteger(p)));
            Assert.Equal(m * Math.Log2((double)p), f.SizeLog2, 6);
        }

        // FromInteger is a ring homomorphism from Z, also on negative and huge integers.
        var big = BigInteger.Pow(10, 60) + 7;
        var other = -(BigInteger.One << 200) - 11;
        Assert.True(f.AreEqual(f.FromInteger(big + other), f.Add(f.FromInteger(big), f.FromInteger(other))));
        Assert.True(f.AreEqual(f.FromInteger(big * other), f.Multiply(f.FromInteger(big), f.FromInteger(other))));
        Assert.True(f.AreEqual(f.FromInteger(-big), f.Negate(f.FromInteger(big))));
        var sum = f.Zero;
        for (var k = 0; k <= 20; k++)
        {
            Assert.True(f.AreEqual(f.FromInteger(k), sum));
            Assert.True(f.AreEqual(f.FromInteger(-k), f.Negate(sum)));
            sum = f.Add(sum, f.One);
        }
        if (p.Sign > 0)
            Assert.True(f.AreEqual(f.FromInteger(-1 - 5 * p), f.Negate(f.One)));
    }
}
