using System.Numerics;
using System.Text;

namespace IdentityQueue.Screening.Tests.Counterexamples;

/// <summary>A small dense-key polynomial with integer coefficients, written for the tests (independent of the compiler).</summary>
internal sealed class TestPolynomial
{
    private readonly int _n;
    private readonly Dictionary<string, (int[] Exponents, BigInteger Coefficient)> _terms = [];

    private TestPolynomial(int n) => _n = n;

    public bool IsZero => _terms.Count == 0;

    private void Add(int[] exponents, BigInteger c)
    {
        var key = string.Join(",", exponents);
        var sum = (_terms.TryGetValue(key, out var t) ? t.Coefficient : 0) + c;
        if (sum.IsZero) _terms.Remove(key);
        else _terms[key] = (exponents, sum);
    }

    public static TestPolynomial Constant(int n, BigInteger c)
    {
        var p = new TestPolynomial(n);
        p.Add(new int[n], c);
        return p;
    }

    /// <summary>x_i − root.</summary>
    public static TestPolynomial Linear(int n, int i, long root)
    {
        var p = Constant(n, -root);
        var e = new int[n];
        e[i] = 1;
        p.Add(e, 1);
        return p;
    }

    /// <summary>Up to <paramref name="terms"/> terms of degree ≤ d in each variable, coefficients in ±[1, 5].</summary>
    public static TestPolynomial Random(Random random, int n, int d, int terms)
    {
        var p = new TestPolynomial(n);
        for (var k = 0; k < terms; k++)
            p.Add(Enumerable.Range(0, n).Select(_ => random.Next(0, d + 1)).ToArray(), random.Next(1, 6) * (random.Next(2) == 0 ? 1 : -1));
        return p;
    }

    public static TestPolynomial operator +(TestPolynomial a, TestPolynomial b)
    {
        var p = new TestPolynomial(a._n);
        foreach (var (e, c) in a._terms.Values) p.Add(e, c);
        foreach (var (e, c) in b._terms.Values) p.Add(e, c);
        return p;
    }

    public static TestPolynomial operator *(TestPolynomial a, TestPolynomial b)
    {
        var p = new TestPolynomial(a._n);
        foreach (var (ea, ca) in a._terms.Values)
            foreach (var (eb, cb) in b._terms.Values)
                p.Add(ea.Zip(eb, (x, y) => x + y).ToArray(), ca * cb);
        return p;
    }

    public BigInteger At(IReadOnlyList<long> point)
    {
        BigInteger sum = 0;
        foreach (var (e, c) in _terms.Values)
        {
            var term = c;
            for (var i = 0; i < _n; i++) term *= BigInteger.Pow(point[i], e[i]);
            sum += term;
        }
        return sum;
    }

    /// <summary>Catalogue text, terms in an arbitrary (dictionary) order; "0" when zero.</summary>
    public string Text(IReadOnlyList<string> names)
    {
        if (IsZero) return "0";
        var text = new StringBuilder();
        foreach (var (e, c) in _terms.Values)
        {
            text.Append(text.Length == 0 ? (c.Sign < 0 ? "-" : "") : c.Sign < 0 ? " - " : " + ");
            var factors = new List<string> { BigInteger.Abs(c).ToString() };
            for (var i = 0; i < _n; i++)
                if (e[i] > 0) factors.Add(e[i] == 1 ? names[i] : $"{names[i]}^{e[i]}");
            text.Append(string.Join("*", factors));
        }
        return text.ToString();
    }
}
