using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>An element of <see cref="TestPrimeField"/>: a residue in [0, p).</summary>
public readonly record struct TestResidue(ulong Value)
{
    public override string ToString() => Value.ToString();
}

/// <summary>
/// GF(p) for a prime p &lt; 2^31 with plain <c>%</c> arithmetic (products stay below 2^62). Test-only: slow and
/// simple on purpose, so that it can serve as a reference for the real field implementations.
/// </summary>
public readonly struct TestPrimeField : IField<TestResidue>
{
    /// <summary>2^31 - 1, a Mersenne prime (Euler, 1772).</summary>
    public const ulong Mersenne31 = 2147483647;

    public TestPrimeField(ulong p)
    {
        if (p < 2 || p >= 1UL << 31) throw new ArgumentOutOfRangeException(nameof(p), "the test field needs 2 <= p < 2^31");
        if (!Primality.IsPrime(p)) throw new ArgumentException($"{p} is not prime", nameof(p));
        P = p;
    }

    public ulong P { get; }

    public TestResidue Zero => new(0);
    public TestResidue One => new(1);

    public TestResidue Add(TestResidue a, TestResidue b) => new((a.Value + b.Value) % P);
    public TestResidue Subtract(TestResidue a, TestResidue b) => new((a.Value + P - b.Value) % P);
    public TestResidue Negate(TestResidue a) => new((P - a.Value) % P);
    public TestResidue Multiply(TestResidue a, TestResidue b) => new(a.Value * b.Value % P);
    public TestResidue MultiplyAdd(TestResidue a, TestResidue b, TestResidue c) => new((a.Value * b.Value % P + c.Value) % P);
    public bool IsZero(TestResidue a) => a.Value == 0;
    public bool AreEqual(TestResidue a, TestResidue b) => a.Value == b.Value;

    public bool TryInvert(TestResidue a, out TestResidue inverse)
    {
        if (a.Value % P == 0)
        {
            inverse = Zero;
            return false;
        }
        // Fermat: a^(p-2) = a^-1 for prime p.
        ulong result = 1, b = a.Value % P, e = P - 2;
        while (e > 0)
        {
            if ((e & 1) == 1) result = result * b % P;
            b = b * b % P;
            e >>= 1;
        }
        inverse = new TestResidue(result);
        return true;
    }

    public TestResidue FromInteger(BigInteger value)
    {
        var r = value % P;
        if (r.Sign < 0) r += P;
        return new TestResidue((ulong)r);
    }

    public TestResidue Sample(ref Xoshiro256 random) => new(random.NextBelow(P));

    public BigInteger Characteristic => P;
    public int ExtensionDegree => 1;
    public double SizeLog2 => Math.Log2(P);
    public BigInteger[] ToCoefficients(TestResidue a) => [a.Value];

    public TestResidue FromCoefficients(ReadOnlySpan<BigInteger> coefficients)
    {
        if (coefficients.Length != 1) throw new ArgumentException("a prime field element has one coordinate", nameof(coefficients));
        return FromInteger(coefficients[0]);
    }

    public BigInteger[]? DefiningPolynomial => null;
}
