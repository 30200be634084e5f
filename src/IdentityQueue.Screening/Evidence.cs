using System.Numerics;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// The error bound of one zero trial (SPEC §5). For a false identity, lhs − rhs = N/Q with N ≠ 0 of total degree ≤ D.
/// Over a field of size q, a uniform point makes N vanish with probability ≤ D/q (Schwartz–Zippel–DeMillo–Lipton),
/// and conditioning on the point being defined (all divisors nonzero, total degree ≤ E) divides that by at most 1 − E/q.
/// Over Q the trial works mod a uniformly random prime p from [2^(b−1), 2^b); the reduction N mod p is the zero polynomial
/// only when p divides N's content c ≤ H, and at most ⌊log2 H/(b−1)⌋ primes of that size divide c, out of at least
/// π-range(b) candidates. Stateless.
/// </summary>
public static class Evidence
{
    /// <summary>The smallest per-trial bound reported, 2^-4096: used when the true bound is 0 (a nonzero constant too small for any prime of the range to divide).</summary>
    public const double FloorLog2 = -4096;

    /// <summary>log2 of the per-trial bound, or null when the trial is worth nothing (bound ≥ 1/2).</summary>
    /// <param name="bounds">The identity's degree and height bounds.</param>
    /// <param name="fieldSizeLog2">log2 of the size of the trial's field.</param>
    /// <param name="primeBits">b for a trial over Q mod a random prime of b bits; null in characteristic p.</param>
    public static double? TrialBoundLog2(IdentityBounds bounds, double fieldSizeLog2, int? primeBits)
    {
        var degreeLog = double.NegativeInfinity;
        if (!bounds.Degree.IsZero)
        {
            var divisorLog = BigLog2(bounds.DivisorDegree) - fieldSizeLog2;
            if (divisorLog >= -1) return null;
            degreeLog = BigLog2(bounds.Degree) - fieldSizeLog2 - Math.Log2(1 - Math.Pow(2, divisorLog));
        }
        var primeLog = double.NegativeInfinity;
        if (primeBits is int b && bounds.HeightLog2 > 0)
        {
            var dividingPrimes = Math.Floor(bounds.HeightLog2 / (b - 1));
            if (dividingPrimes > 0) primeLog = Math.Log2(dividingPrimes) - Primality.PrimeCountInRangeLog2(b);
        }
        var total = BoundAnalysis.LogAdd(degreeLog, primeLog);
        if (double.IsNegativeInfinity(total)) return FloorLog2;
        if (total >= -1) return null;
        return Math.Max(FloorLog2, total + 1e-9);
    }

    /// <summary>log2 of a positive integer, rounded up slightly (−∞ for 0).</summary>
    public static double BigLog2(BigInteger v) => BoundAnalysis.Log2Up(v);
}
