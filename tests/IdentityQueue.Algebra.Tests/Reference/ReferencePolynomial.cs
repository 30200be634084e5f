using System.Collections.ObjectModel;
using System.Numerics;
using System.Text;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// A monomial: a list of (variable, exponent) pairs sorted by ordinal variable name, every exponent positive.
/// The empty list is the monomial 1. Immutable; equality is structural.
/// </summary>
public sealed class Monomial : IEquatable<Monomial>
{
    private readonly (string Variable, int Exponent)[] _powers;
    private readonly int _hash;

    public static readonly Monomial One = new([]);

    private Monomial((string Variable, int Exponent)[] sortedPowers)
    {
        _powers = sortedPowers;
        var hash = new HashCode();
        foreach (var (v, e) in _powers)
        {
            hash.Add(v, StringComparer.Ordinal);
            hash.Add(e);
        }
        _hash = hash.ToHashCode();
    }

    /// <summary>Builds a monomial from pairs in any order; repeated variables are merged, zero exponents dropped.</summary>
    public static Monomial Of(params (string Variable, int Exponent)[] powers)
    {
        var merged = new SortedDictionary<string, int>(StringComparer.Ordinal);
        foreach (var (v, e) in powers)
        {
            if (e < 0) throw new ArgumentOutOfRangeException(nameof(powers), "exponents must be non-negative");
            merged[v] = checked((merged.TryGetValue(v, out var old) ? old : 0) + e);
        }
        return new Monomial(merged.Where(p => p.Value > 0).Select(p => (p.Key, p.Value)).ToArray());
    }

    public static Monomial Variable(string name) => new([(name, 1)]);

    /// <summary>The (variable, exponent) pairs, sorted by ordinal variable name.</summary>
    public IReadOnlyList<(string Variable, int Exponent)> Powers => _powers;

    public int Degree => _powers.Sum(p => p.Exponent);

    public bool IsOne => _powers.Length == 0;

    /// <summary>The exponent of <paramref name="variable"/> (0 when absent).</summary>
    public int ExponentOf(string variable)
    {
        foreach (var (v, e) in _powers)
            if (v == variable) return e;
        return 0;
    }

    public Monomial Multiply(Monomial other)
    {
        var result = new List<(string, int)>(_powers.Length + other._powers.Length);
        int i = 0, j = 0;
        while (i < _powers.Length || j < other._powers.Length)
        {
            var c = i == _powers.Length ? 1 : j == other._powers.Length ? -1 : string.CompareOrdinal(_powers[i].Variable, other._powers[j].Variable);
            if (c < 0) result.Add(_powers[i++]);
            else if (c > 0) result.Add(other._powers[j++]);
            else
            {
                result.Add((_powers[i].Variable, checked(_powers[i].Exponent + other._powers[j].Exponent)));
                i++;
                j++;
            }
        }
        return new Monomial(result.ToArray());
    }

    /// <summary>Graded order: higher degree first, then lexicographic on the sorted pairs (ordinal names; higher exponent first).</summary>
    public static int CompareGraded(Monomial a, Monomial b)
    {
        var d = b.Degree.CompareTo(a.Degree);
        if (d != 0) return d;
        for (var i = 0; i < Math.Min(a._powers.Length, b._powers.Length); i++)
        {
            var c = string.CompareOrdinal(a._powers[i].Variable, b._powers[i].Variable);
            if (c != 0) return c;
            c = b._powers[i].Exponent.CompareTo(a._powers[i].Exponent);
            if (c != 0) return c;
        }
        return b._powers.Length.CompareTo(a._powers.Length);
    }

    public bool Equals(Monomial? other)
    {
        if (other is null || other._hash != _hash || other._powers.Length != _powers.Length) return false;
        for (var i = 0; i < _powers.Length; i++)
            if (_powers[i].Variable != other._powers[i].Variable || _powers[i].Exponent != other._powers[i].Exponent) return false;
        return true;
    }

    public override bool Equals(object? obj) => obj is Monomial m && Equals(m);
    public override int GetHashCode() => _hash;

    /// <summary><c>1</c>, or the factors joined by <c>*</c>, e.g. <c>x^2*y[1]</c>.</summary>
    public override string ToString() =>
        IsOne ? "1" : string.Join("*", _powers.Select(p => p.Exponent == 1 ? p.Variable : $"{p.Variable}^{p.Exponent}"));
}

/// <summary>
/// An immutable sparse multivariate polynomial with exact rational coefficients over string-named variables
/// (evaluated names such as <c>x</c>, <c>x[3]</c>, <c>a[1,2]</c>). Stored as monomial → nonzero coefficient,
/// so the zero polynomial has no terms and equality is equality of the term maps.
/// </summary>
public sealed class ReferencePolynomial : IEquatable<ReferencePolynomial>
{
    private readonly Dictionary<Monomial, Rational> _terms;

    public static readonly ReferencePolynomial Zero = new(new Dictionary<Monomial, Rational>());
    public static readonly ReferencePolynomial One = Constant(Rational.One);

    private ReferencePolynomial(Dictionary<Monomial, Rational> terms) => _terms = terms;

    public static ReferencePolynomial Constant(Rational value) => Term(value, Monomial.One);

    public static ReferencePolynomial Variable(string name) => Term(Rational.One, Monomial.Variable(name));

    public static ReferencePolynomial Term(Rational coefficient, Monomial monomial) =>
        coefficient.IsZero ? Zero : new ReferencePolynomial(new Dictionary<Monomial, Rational> { [monomial] = coefficient });

    /// <summary>Sums the given terms (repeated monomials are added).</summary>
    public static ReferencePolynomial FromTerms(IEnumerable<KeyValuePair<Monomial, Rational>> terms)
    {
        var result = new Dictionary<Monomial, Rational>();
        foreach (var (m, c) in terms) Accumulate(result, m, c);
        return new ReferencePolynomial(result);
    }

    /// <summary>Monomial → nonzero coefficient.</summary>
    public IReadOnlyDictionary<Monomial, Rational> Terms => new ReadOnlyDictionary<Monomial, Rational>(_terms);

    public int TermCount => _terms.Count;

    public bool IsZero => _terms.Count == 0;

    /// <summary>True for the zero polynomial and for nonzero constants.</summary>
    public bool IsConstant => _terms.Count == 0 || (_terms.Count == 1 && _terms.ContainsKey(Monomial.One));

    /// <summary>The value of a constant polynomial (0 for the zero polynomial); false when the polynomial is not constant.</summary>
    public bool TryGetConstant(out Rational value)
    {
        value = Rational.Zero;
        if (!IsConstant) return false;
        if (_terms.Count == 1) value = _terms[Monomial.One];
        return true;
    }

    /// <summary>The total degree; −1 for the zero polynomial (by convention, so that every nonzero constant has degree 0).</summary>
    public int TotalDegree => _terms.Count == 0 ? -1 : _terms.Keys.Max(m => m.Degree);

    /// <summary>The highest exponent of <paramref name="variable"/> (−1 for the zero polynomial).</summary>
    public int DegreeIn(string variable) => _terms.Count == 0 ? -1 : _terms.Keys.Max(m => m.ExponentOf(variable));

    /// <summary>The variables that occur with a nonzero coefficient, in ordinal order.</summary>
    public IReadOnlyList<string> Variables =>
        _terms.Keys.SelectMany(m => m.Powers.Select(p => p.Variable)).Distinct().Order(StringComparer.Ordinal).ToList();

    /// <summary>The coefficient of a monomial (0 when absent).</summary>
    public Rational CoefficientOf(Monomial monomial) => _terms.TryGetValue(monomial, out var c) ? c : Rational.Zero;

    /// <summary>The coefficient of the monomial built from the given powers (0 when absent).</summary>
    public Rational CoefficientOf(params (string Variable, int Exponent)[] powers) => CoefficientOf(Monomial.Of(powers));

    /// <summary>The least common multiple of the coefficient denominators (1 for the zero polynomial).</summary>
    public BigInteger DenominatorLcm()
    {
        var lcm = BigInteger.One;
        foreach (var c in _terms.Values) lcm = lcm / BigInteger.GreatestCommonDivisor(lcm, c.Denominator) * c.Denominator;
        return lcm;
    }

    /// <summary>
    /// log2 of the 1-norm (sum of absolute coefficients) of the integer polynomial obtained by multiplying by the
    /// lcm of the coefficient denominators (no content is divided out). −∞ for the zero polynomial.
    /// </summary>
    public double OneNormLog2()
    {
        if (IsZero) return double.NegativeInfinity;
        var lcm = DenominatorLcm();
        var sum = BigInteger.Zero;
        foreach (var c in _terms.Values) sum += BigInteger.Abs(c.Numerator * (lcm / c.Denominator));
        return BigInteger.Log(sum, 2);
    }

    public ReferencePolynomial Add(ReferencePolynomial other)
    {
        var result = new Dictionary<Monomial, Rational>(_terms);
        foreach (var (m, c) in other._terms) Accumulate(result, m, c);
        return new ReferencePolynomial(result);
    }

    public ReferencePolynomial Subtract(ReferencePolynomial other) => Add(other.Negate());

    public ReferencePolynomial Negate() => new(_terms.ToDictionary(t => t.Key, t => -t.Value));

    public ReferencePolynomial Scale(Rational factor) =>
        factor.IsZero ? Zero : new ReferencePolynomial(_terms.ToDictionary(t => t.Key, t => t.Value * factor));

    public ReferencePolynomial Multiply(ReferencePolynomial other)
    {
        var result = new Dictionary<Monomial, Rational>();
        foreach (var (m1, c1) in _terms)
            foreach (var (m2, c2) in other._terms)
                Accumulate(result, m1.Multiply(m2), c1 * c2);
        return new ReferencePolynomial(result);
    }

    /// <summary>this^exponent for exponent ≥ 0 (0^0 = 1), by repeated squaring.</summary>
    public ReferencePolynomial Pow(int exponent)
    {
        if (exponent < 0) throw new ArgumentOutOfRangeException(nameof(exponent), "polynomial powers need a non-negative exponent");
        if (TryGetConstant(out var constant)) return Constant(Rational.Pow(constant, exponent));
        var result = One;
        var square = this;
        var e = exponent;
        while (e > 0)
        {
            if ((e & 1) == 1) result = result.Multiply(square);
            e >>= 1;
            if (e > 0) square = square.Multiply(square);
        }
        return result;
    }

    /// <summary>
    /// The image over GF(p): every coefficient n/d replaced by n·d^(−1) mod p in [0, p), zero terms dropped.
    /// Throws <see cref="ReferenceException"/> when p divides a denominator.
    /// </summary>
    public ReferencePolynomial ReduceModulo(BigInteger p)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(p, 2);
        var result = new Dictionary<Monomial, Rational>();
        foreach (var (m, c) in _terms)
        {
            var d = Mod(c.Denominator, p);
            if (d.IsZero) throw new ReferenceException($"the coefficient {c} of {m} has a denominator divisible by {p}");
            var value = Mod(c.Numerator * BigInteger.ModPow(d, p - 2, p), p);
            if (!value.IsZero) result[m] = value;
        }
        return new ReferencePolynomial(result);
    }

    /// <summary>
    /// The value at a point of a field (every variable must have a value). False when a coefficient's denominator
    /// vanishes in the field.
    /// </summary>
    public bool TryEvaluate<TField, T>(TField field, IReadOnlyDictionary<string, T> point, out T value)
        where TField : struct, IField<T>
        where T : struct
    {
        value = field.Zero;
        foreach (var (m, c) in _terms)
        {
            if (!field.TryInvert(field.FromInteger(c.Denominator), out var inverse)) return false;
            var term = field.Multiply(field.FromInteger(c.Numerator), inverse);
            foreach (var (v, e) in m.Powers)
            {
                if (!point.TryGetValue(v, out var x)) throw new ReferenceException($"no value for the variable {v}");
                for (var i = 0; i < e; i++) term = field.Multiply(term, x);
            }
            value = field.Add(value, term);
        }
        return true;
    }

    /// <summary>The value at a point; throws <see cref="ReferenceException"/> when a denominator vanishes in the field.</summary>
    public T Evaluate<TField, T>(TField field, IReadOnlyDictionary<string, T> point)
        where TField : struct, IField<T>
        where T : struct =>
        TryEvaluate(field, point, out T value) ? value : throw new ReferenceException("a coefficient denominator vanishes in this field");

    /// <summary>The exact value at a rational point (every variable must have a value).</summary>
    public Rational Evaluate(IReadOnlyDictionary<string, Rational> point)
    {
        var value = Rational.Zero;
        foreach (var (m, c) in _terms)
        {
            var term = c;
            foreach (var (v, e) in m.Powers)
            {
                if (!point.TryGetValue(v, out var x)) throw new ReferenceException($"no value for the variable {v}");
                term *= Rational.Pow(x, e);
            }
            value += term;
        }
        return value;
    }

    public static ReferencePolynomial operator +(ReferencePolynomial a, ReferencePolynomial b) => a.Add(b);
    public static ReferencePolynomial operator -(ReferencePolynomial a, ReferencePolynomial b) => a.Subtract(b);
    public static ReferencePolynomial operator -(ReferencePolynomial a) => a.Negate();
    public static ReferencePolynomial operator *(ReferencePolynomial a, ReferencePolynomial b) => a.Multiply(b);
    public static implicit operator ReferencePolynomial(long value) => Constant(value);
    public static bool operator ==(ReferencePolynomial? a, ReferencePolynomial? b) => a is null ? b is null : a.Equals(b);
    public static bool operator !=(ReferencePolynomial? a, ReferencePolynomial? b) => !(a == b);

    public bool Equals(ReferencePolynomial? other)
    {
        if (other is null || other._terms.Count != _terms.Count) return false;
        foreach (var (m, c) in _terms)
            if (!other._terms.TryGetValue(m, out var d) || d != c) return false;
        return true;
    }

    public override bool Equals(object? obj) => obj is ReferencePolynomial p && Equals(p);

    public override int GetHashCode()
    {
        var hash = 0;
        foreach (var (m, c) in _terms) hash ^= HashCode.Combine(m, c);
        return hash;
    }

    /// <summary>
    /// Terms in graded order (highest degree first), e.g. <c>2*x^2*y - 1/3*z + 5</c>; <c>0</c> for the zero polynomial.
    /// Deterministic, so it can be compared as text.
    /// </summary>
    public override string ToString()
    {
        if (IsZero) return "0";
        var text = new StringBuilder();
        foreach (var (m, c) in _terms.OrderBy(t => t.Key, Comparer<Monomial>.Create(Monomial.CompareGraded)))
        {
            var magnitude = c.Sign < 0 ? -c : c;
            if (text.Length == 0) text.Append(c.Sign < 0 ? "-" : "");
            else text.Append(c.Sign < 0 ? " - " : " + ");
            if (m.IsOne) text.Append(magnitude);
            else if (magnitude == Rational.One) text.Append(m);
            else text.Append(magnitude).Append('*').Append(m);
        }
        return text.ToString();
    }

    private static void Accumulate(Dictionary<Monomial, Rational> terms, Monomial m, Rational c)
    {
        if (c.IsZero) return;
        var sum = terms.TryGetValue(m, out var old) ? old + c : c;
        if (sum.IsZero) terms.Remove(m);
        else terms[m] = sum;
    }

    private static BigInteger Mod(BigInteger a, BigInteger p)
    {
        var r = a % p;
        return r.Sign < 0 ? r + p : r;
    }
}
