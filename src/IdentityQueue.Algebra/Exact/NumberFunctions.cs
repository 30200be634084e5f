using System.Numerics;

namespace IdentityQueue.Algebra.Exact;

/// <summary>
/// Exact combinatorial numbers of integer arguments: Fibonacci and Lucas numbers, Stirling numbers of both kinds, harmonic
/// and Bernoulli numbers, Catalan numbers and multinomial coefficients. Each checks its cost before doing the work: the
/// steps against <see cref="Limits.MaxNumberFunctionWork"/> and the size of the value (estimated first where it is cheap to
/// estimate) against <see cref="Limits.MaxParameterBits"/>. A problem is a <see cref="NumberFunctionException"/> whose message
/// names the function and the limit. Stateless; thread-safe.
/// </summary>
public static class NumberFunctions
{
    private const double Log2Phi = 0.69424191363061737; // log2 of the golden ratio

    /// <summary>F(n) with F(0) = 0, F(1) = 1, F(n+1) = F(n) + F(n−1), for every integer n: F(−n) = (−1)^(n+1) F(n).</summary>
    public static BigInteger Fibonacci(BigInteger n, Limits limits)
    {
        // F(n) ≥ φ^(n−2), so it has at least 0.694·n − 2 bits.
        CheckBits("fib", n, (double)BigInteger.Abs(n) * Log2Phi - 2, limits);
        var (f, _) = FibonacciPair(BigInteger.Abs(n));
        return n.Sign < 0 && n.IsEven ? -f : f;
    }

    /// <summary>L(n) with L(0) = 2, L(1) = 1, L(n+1) = L(n) + L(n−1), for every integer n: L(−n) = (−1)^n L(n).</summary>
    public static BigInteger Lucas(BigInteger n, Limits limits)
    {
        // L(n) ≥ φ^(n−1).
        CheckBits("lucas", n, (double)BigInteger.Abs(n) * Log2Phi - 1, limits);
        var m = BigInteger.Abs(n);
        var (f, g) = FibonacciPair(m); // F(m), F(m+1)
        var l = 2 * g - f;             // L(m) = F(m−1) + F(m+1) = 2F(m+1) − F(m)
        return n.Sign < 0 && !n.IsEven ? -l : l;
    }

    /// <summary>(F(n), F(n+1)) by fast doubling: F(2k) = F(k)(2F(k+1) − F(k)), F(2k+1) = F(k)² + F(k+1)².</summary>
    private static (BigInteger, BigInteger) FibonacciPair(BigInteger n)
    {
        BigInteger a = 0, b = 1;
        for (var bit = (int)n.GetBitLength() - 1; bit >= 0; bit--)
        {
            var c = a * (2 * b - a);
            var d = a * a + b * b;
            (a, b) = ((n >> bit).IsEven ? (c, d) : (d, c + d));
        }
        return (a, b);
    }

    /// <summary>
    /// The unsigned Stirling number of the first kind [n, k]: permutations of n elements with k cycles. [0, 0] = 1, and 0 for
    /// k &lt; 0 or k &gt; n; n must be non-negative. By [m, j] = [m−1, j−1] + (m−1)[m−1, j] over the cells that reach [n, k].
    /// </summary>
    public static BigInteger Stirling1(BigInteger n, BigInteger k, Limits limits) => Stirling("stirling1", n, k, limits, firstKind: true);

    /// <summary>
    /// The Stirling number of the second kind {n, k}: partitions of n elements into k blocks. {0, 0} = 1, and 0 for k &lt; 0 or
    /// k &gt; n; n must be non-negative. By {m, j} = {m−1, j−1} + j{m−1, j} over the cells that reach {n, k}.
    /// </summary>
    public static BigInteger Stirling2(BigInteger n, BigInteger k, Limits limits) => Stirling("stirling2", n, k, limits, firstKind: false);

    private static BigInteger Stirling(string name, BigInteger nValue, BigInteger kValue, Limits limits, bool firstKind)
    {
        if (nValue.Sign < 0) throw new NumberFunctionException($"{name}'s first argument must be non-negative, but it is {nValue}");
        if (kValue.Sign < 0 || kValue > nValue) return BigInteger.Zero;
        if (kValue.IsZero) return nValue.IsZero ? BigInteger.One : BigInteger.Zero;
        if (kValue == nValue) return BigInteger.One; // [n, n] = {n, n} = 1
        // Only the cells (m, j) with j ≤ k and m − j ≤ n − k reach (n, k): (k + 1)(n − k + 1) of them.
        var cells = (kValue + 1) * (nValue - kValue + 1);
        CheckWork(name, cells, limits);
        int n = (int)nValue, k = (int)kValue, width = n - k;
        // row[j − low(m)] holds the cell (m, j) for j from low(m) = max(0, m − width) to min(m, k).
        var row = new BigInteger[width + 2];
        var next = new BigInteger[width + 2];
        row[0] = BigInteger.One; // (0, 0)
        var rowLow = 0;
        var rowHigh = 0;
        for (var m = 1; m <= n; m++)
        {
            var low = Math.Max(0, m - width);
            var high = Math.Min(m, k);
            for (var j = low; j <= high; j++)
            {
                var diagonal = j - 1 >= rowLow && j - 1 <= rowHigh ? row[j - 1 - rowLow] : BigInteger.Zero; // (m−1, j−1)
                var above = j >= rowLow && j <= rowHigh ? row[j - rowLow] : BigInteger.Zero;                // (m−1, j)
                var value = diagonal + (firstKind ? m - 1 : j) * above;
                // Every cell kept here is at most the result (the recurrences only add non-negative terms with factors ≥ 1 from m ≥ 2).
                if (value.GetBitLength() > limits.MaxParameterBits) throw TooLarge(name, limits);
                next[j - low] = value;
            }
            (row, next) = (next, row);
            rowLow = low;
            rowHigh = high;
        }
        return row[k - rowLow];
    }

    /// <summary>H(n) = 1 + 1/2 + … + 1/n, and H(0) = 0; n must be non-negative.</summary>
    public static Rational Harmonic(BigInteger n, Limits limits)
    {
        if (n.Sign < 0) throw new NumberFunctionException($"harmonic's argument must be non-negative, but it is {n}");
        CheckWork("harmonic", n, limits);
        // Σ 1/i = p/q with q = lcm(1..i) (about 1.44·i bits) and p < q·(1 + ln i).
        BigInteger p = 0, q = 1;
        for (var i = 1; i <= (int)n; i++)
        {
            var step = i / BigInteger.GreatestCommonDivisor(q, i);
            q *= step;       // lcm(q, i)
            p = p * step + q / i;
            if (q.GetBitLength() > limits.MaxParameterBits + 16) throw TooLarge("harmonic", limits);
        }
        return Rational.Create(p, q);
    }

    /// <summary>
    /// The Bernoulli number B(n) with B(1) = −1/2 (so Σ_{k&lt;m} k^n = Σ_j binom(n+1, j) B(j) m^(n+1−j)/(n+1)); B(n) = 0 for odd
    /// n &gt; 1; n must be non-negative. Even n from the tangent numbers T(k) (Brent and Harvey, "Fast computation of Bernoulli,
    /// Tangent and Secant numbers", 2011, Algorithm TangentNumbers): B(2k) = (−1)^(k−1)·2k·T(k) / (2^(2k)·(2^(2k) − 1)).
    /// </summary>
    public static Rational Bernoulli(BigInteger nValue, Limits limits)
    {
        if (nValue.Sign < 0) throw new NumberFunctionException($"bernoulli's argument must be non-negative, but it is {nValue}");
        if (nValue.IsZero) return Rational.One;
        if (nValue.IsOne) return Rational.Create(-1, 2);
        if (!nValue.IsEven) return Rational.Zero;
        var kValue = nValue / 2;
        CheckWork("bernoulli", kValue * kValue, limits);
        // |B(2k)| ≈ 2·(2k)!/(2π)^(2k): by Stirling's formula its numerator has about 2k·(log2(2k) − log2(2πe)) bits, checked
        // first; the table's numbers T(j) ≤ T(k) have at most 4k + 2 bits more (the factor 2^(2k)(2^(2k) − 1)/2k).
        var k = (int)kValue;
        var estimate = 2.0 * k * (Math.Log2(2.0 * k) - Math.Log2(2 * Math.PI * Math.E));
        CheckBits("bernoulli", nValue, estimate, limits, slack: 16);
        var t = new BigInteger[k + 1];
        t[1] = BigInteger.One;
        for (var i = 2; i <= k; i++) t[i] = (i - 1) * t[i - 1];
        for (var i = 2; i <= k; i++)
            for (var j = i; j <= k; j++) t[j] = (j - i) * t[j - 1] + (j - i + 2) * t[j];
        var four = BigInteger.One << (2 * k);
        var b = Rational.Create(2 * kValue * t[k], four * (four - 1));
        return k % 2 == 1 ? b : -b;
    }

    /// <summary>C(n) = binom(2n, n)/(n + 1); n must be non-negative.</summary>
    public static BigInteger Catalan(BigInteger n, Limits limits)
    {
        if (n.Sign < 0) throw new NumberFunctionException($"catalan's argument must be non-negative, but it is {n}");
        CheckWork("catalan", n, limits);
        var c = BigInteger.One; // C(i+1) = C(i)·2(2i+1)/(i+2), an integer at every step and increasing from i = 1
        for (var i = 0; i < (int)n; i++)
        {
            c = c * 2 * (2 * i + 1) / (i + 2);
            if (c.GetBitLength() > limits.MaxParameterBits) throw TooLarge("catalan", limits);
        }
        return c;
    }

    /// <summary>(k1 + … + km)! / (k1! ⋯ km!), and 0 when some ki is negative.</summary>
    public static BigInteger Multinomial(IReadOnlyList<BigInteger> parts, Limits limits)
    {
        var total = BigInteger.Zero;
        foreach (var k in parts)
        {
            if (k.Sign < 0) return BigInteger.Zero;
            total += k;
        }
        CheckWork("multinomial", total, limits);
        var result = BigInteger.One;
        var sum = 0;
        foreach (var k in parts)
            for (var i = 1; i <= (int)k; i++)
            {
                sum++;
                // result = multinomial(earlier parts)·binom(sum, i): an integer at every step, and never smaller (sum ≥ i).
                result = result * sum / i;
                if (result.GetBitLength() > limits.MaxParameterBits) throw TooLarge("multinomial", limits);
            }
        return result;
    }

    private static void CheckWork(string name, BigInteger steps, Limits limits)
    {
        if (steps > limits.MaxNumberFunctionWork)
            throw new NumberFunctionException($"{name} would take {steps} steps here; the limit MaxNumberFunctionWork is {limits.MaxNumberFunctionWork}");
    }

    private static void CheckBits(string name, BigInteger argument, double bits, Limits limits, double slack = 0)
    {
        if (bits > limits.MaxParameterBits + slack)
            throw new NumberFunctionException($"{name}({argument}) has more than {limits.MaxParameterBits} bits (the limit MaxParameterBits)");
    }

    private static NumberFunctionException TooLarge(string name, Limits limits) =>
        new($"{name}'s value has more than {limits.MaxParameterBits} bits (the limit MaxParameterBits)");
}

/// <summary>A number function refused its arguments or a limit; the caller adds the position.</summary>
public sealed class NumberFunctionException(string message) : Exception(message);
