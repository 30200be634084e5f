using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>
/// An element of an <see cref="ExtensionField{TBase, TB}"/>: the coefficients of a polynomial of degree below m
/// over the base field, lowest power first. Immutable value type (the array is never exposed or changed);
/// <c>default</c> is zero.
/// </summary>
public readonly struct ExtElement<TB> : IEquatable<ExtElement<TB>> where TB : struct
{
    /// <summary>Length m, or null for <c>default</c>, which stands for zero.</summary>
    internal readonly TB[]? Coefficients;

    internal ExtElement(TB[] coefficients) => Coefficients = coefficients;

    public bool Equals(ExtElement<TB> other)
    {
        var comparer = EqualityComparer<TB>.Default;
        var a = Coefficients ?? [];
        var b = other.Coefficients ?? [];
        for (var i = 0; i < Math.Max(a.Length, b.Length); i++)
        {
            var x = i < a.Length ? a[i] : default;
            var y = i < b.Length ? b[i] : default;
            if (!comparer.Equals(x, y)) return false;
        }
        return true;
    }

    public override bool Equals(object? obj) => obj is ExtElement<TB> e && Equals(e);

    public override int GetHashCode()
    {
        var hash = new HashCode();
        var comparer = EqualityComparer<TB>.Default;
        var a = Coefficients ?? [];
        for (var i = 0; i < a.Length; i++)
            if (!comparer.Equals(a[i], default)) { hash.Add(i); hash.Add(a[i]); }
        return hash.ToHashCode();
    }

    public static bool operator ==(ExtElement<TB> a, ExtElement<TB> b) => a.Equals(b);
    public static bool operator !=(ExtElement<TB> a, ExtElement<TB> b) => !a.Equals(b);
}

/// <summary>
/// GF(p^m) = base[x]/(f) for a prime base field GF(p) and a monic irreducible f of degree m, found at random
/// and certified by Rabin's test (M. O. Rabin, "Probabilistic algorithms in finite fields", SIAM J. Comput. 9
/// (1980) 273–280). Immutable and thread-safe.
/// </summary>
public readonly struct ExtensionField<TBase, TB> : IField<ExtElement<TB>>
    where TBase : struct, IField<TB>
    where TB : struct
{
    /// <summary>The largest extension degree accepted.</summary>
    public const int MaxDegree = 1 << 16;

    private readonly TBase _base;
    private readonly int _m;
    private readonly BigInteger[] _f;  // f's coefficients, lowest first, length m + 1, monic
    private readonly TB[] _negF;       // −f_0 … −f_(m−1) in the base field
    private readonly TB[] _zero;       // m zeros, shared by every zero element
    private readonly TB[] _one;

    private ExtensionField(TBase baseField, BigInteger[] f)
    {
        _base = baseField;
        _m = f.Length - 1;
        _f = f;
        _negF = new TB[_m];
        _zero = new TB[_m];
        _one = new TB[_m];
        for (var j = 0; j < _m; j++)
        {
            _negF[j] = baseField.Negate(baseField.FromInteger(f[j]));
            _zero[j] = baseField.Zero;
            _one[j] = baseField.Zero;
        }
        _one[0] = baseField.One;
    }

    /// <summary>
    /// GF(p^m) over <paramref name="baseField"/> with a uniformly random monic irreducible defining polynomial of
    /// degree m (random monic polynomials are drawn until one passes Rabin's test). m = 1 gives the base field.
    /// </summary>
    public static ExtensionField<TBase, TB> Create(TBase baseField, int m, ref Xoshiro256 random)
    {
        RequirePrimeBase(baseField);
        if (m < 1 || m > MaxDegree)
            throw new ArgumentOutOfRangeException(nameof(m), m, $"the extension degree must be in [1, {MaxDegree}]");
        while (true)
        {
            var f = new BigInteger[m + 1];
            for (var j = 0; j < m; j++) f[j] = baseField.ToCoefficients(baseField.Sample(ref random))[0];
            f[m] = BigInteger.One;
            var candidate = new ExtensionField<TBase, TB>(baseField, f);
            if (candidate.PassesRabinTest()) return candidate;
        }
    }

    /// <summary>
    /// GF(p^m) with the given defining polynomial (monic, lowest first, coefficients in [0, p), degree m ≥ 1);
    /// throws <see cref="ArgumentException"/> when it is malformed or not irreducible.
    /// </summary>
    public static ExtensionField<TBase, TB> Create(TBase baseField, BigInteger[] definingPolynomial)
    {
        var candidate = FromPolynomial(baseField, definingPolynomial);
        if (!candidate.PassesRabinTest())
            throw new ArgumentException("the defining polynomial is not irreducible over the base field", nameof(definingPolynomial));
        return candidate;
    }

    /// <summary>
    /// Rabin's irreducibility test for a monic polynomial (lowest first, coefficients in [0, p), degree ≥ 1);
    /// throws <see cref="ArgumentException"/> when it is malformed.
    /// </summary>
    public static bool IsIrreducible(TBase baseField, BigInteger[] monicPolynomial) =>
        FromPolynomial(baseField, monicPolynomial).PassesRabinTest();

    private static ExtensionField<TBase, TB> FromPolynomial(TBase baseField, BigInteger[] polynomial)
    {
        RequirePrimeBase(baseField);
        ArgumentNullException.ThrowIfNull(polynomial);
        var m = polynomial.Length - 1;
        if (m < 1 || m > MaxDegree)
            throw new ArgumentException($"the polynomial's degree must be in [1, {MaxDegree}], got {m}", nameof(polynomial));
        var p = baseField.Characteristic;
        foreach (var c in polynomial)
            if (c.Sign < 0 || c >= p)
                throw new ArgumentException($"coefficient {c} is not in [0, {p})", nameof(polynomial));
        if (!polynomial[m].IsOne)
            throw new ArgumentException("the polynomial must be monic (leading coefficient 1)", nameof(polynomial));
        return new ExtensionField<TBase, TB>(baseField, (BigInteger[])polynomial.Clone());
    }

    private static void RequirePrimeBase(TBase baseField)
    {
        if (baseField.ExtensionDegree != 1 || baseField.Characteristic.Sign <= 0)
            throw new ArgumentException("the base of an extension must be a prime field GF(p)", nameof(baseField));
    }

    /// <summary>
    /// f of degree m is irreducible iff x^(p^m) ≡ x (mod f) and gcd(x^(p^(m/r)) − x mod f, f) = 1 for every prime
    /// r dividing m (Rabin 1980). The powers x^(p^k) come from k successive p-th powers, by square-and-multiply
    /// with the exponent p, in the ring base[x]/(f). Most reducible candidates are rejected early: an irreducible f
    /// of degree m also has gcd(x^(p^k) − x, f) = 1 for every k ≤ m/2 (a factor of degree d divides x^(p^d) − x;
    /// M. Ben-Or, Proc. 22nd IEEE FOCS (1981)), so that gcd is taken at every such k,
    /// which includes Rabin's checkpoints m/r.
    /// </summary>
    private bool PassesRabinTest()
    {
        var b = _base;
        if (_m > 1 && b.IsZero(_negF[0])) return false; // x divides f
        var p = b.Characteristic;
        var x = XModF();
        var g = x;
        for (var k = 1; k <= _m; k++)
        {
            g = FieldMath.Pow(this, g, p);
            if (2 * k <= _m && !IsCoprimeWithF(Subtract(g, x))) return false;
        }
        return AreEqual(g, x);
    }

    /// <summary>The residue of x modulo f: x itself for m ≥ 2, the constant −f_0 for m = 1.</summary>
    private ExtElement<TB> XModF()
    {
        var c = (TB[])_zero.Clone();
        if (_m == 1) c[0] = _negF[0];
        else c[1] = _base.One;
        return new ExtElement<TB>(c);
    }

    private TB[] FullF()
    {
        var b = _base;
        var f = new TB[_m + 1];
        for (var j = 0; j < _m; j++) f[j] = b.Negate(_negF[j]);
        f[_m] = b.One;
        return f;
    }

    private bool IsCoprimeWithF(ExtElement<TB> h)
    {
        var b = _base;
        var u = FullF();
        var v = (TB[])Coefficients(h).Clone();
        while (BasePolynomial.Degree(b, v) >= 0)
        {
            var rem = BasePolynomial.Remainder(b, u, v);
            u = v;
            v = rem;
        }
        return BasePolynomial.Degree(b, u) == 0;
    }

    private TB[] Coefficients(ExtElement<TB> a) => a.Coefficients ?? _zero;

    /// <summary>The base field GF(p).</summary>
    public TBase BaseField => _base;

    public ExtElement<TB> Zero => new(_zero);
    public ExtElement<TB> One => new(_one);

    public ExtElement<TB> Add(ExtElement<TB> a, ExtElement<TB> b)
    {
        var f = _base;
        var x = Coefficients(a);
        var y = Coefficients(b);
        var c = new TB[_m];
        for (var i = 0; i < c.Length; i++) c[i] = f.Add(x[i], y[i]);
        return new ExtElement<TB>(c);
    }

    public ExtElement<TB> Subtract(ExtElement<TB> a, ExtElement<TB> b)
    {
        var f = _base;
        var x = Coefficients(a);
        var y = Coefficients(b);
        var c = new TB[_m];
        for (var i = 0; i < c.Length; i++) c[i] = f.Subtract(x[i], y[i]);
        return new ExtElement<TB>(c);
    }

    public ExtElement<TB> Negate(ExtElement<TB> a)
    {
        var f = _base;
        var x = Coefficients(a);
        var c = new TB[_m];
        for (var i = 0; i < c.Length; i++) c[i] = f.Negate(x[i]);
        return new ExtElement<TB>(c);
    }

    public ExtElement<TB> Multiply(ExtElement<TB> a, ExtElement<TB> b) => new(ProductModF(a, b, null));

    public ExtElement<TB> MultiplyAdd(ExtElement<TB> a, ExtElement<TB> b, ExtElement<TB> c) => new(ProductModF(a, b, Coefficients(c)));

    /// <summary>Schoolbook product of a and b, plus addend when given, reduced modulo the monic f.</summary>
    private TB[] ProductModF(ExtElement<TB> a, ExtElement<TB> b, TB[]? addend)
    {
        var f = _base;
        var m = _m;
        var x = Coefficients(a);
        var y = Coefficients(b);
        var t = new TB[2 * m - 1];
        for (var i = 0; i < t.Length; i++) t[i] = i < m && addend is not null ? addend[i] : f.Zero;
        for (var i = 0; i < m; i++)
        {
            var xi = x[i];
            if (f.IsZero(xi)) continue;
            for (var j = 0; j < m; j++) t[i + j] = f.MultiplyAdd(xi, y[j], t[i + j]);
        }
        // x^m ≡ −(f_0 + … + f_(m−1) x^(m−1)): fold the top coefficients down, highest first.
        var negF = _negF;
        for (var i = t.Length - 1; i >= m; i--)
        {
            var c = t[i];
            if (f.IsZero(c)) continue;
            var shift = i - m;
            for (var j = 0; j < m; j++) t[shift + j] = f.MultiplyAdd(c, negF[j], t[shift + j]);
        }
        return m == t.Length ? t : t.AsSpan(0, m).ToArray();
    }

    public bool IsZero(ExtElement<TB> a)
    {
        var f = _base;
        foreach (var c in Coefficients(a))
            if (!f.IsZero(c)) return false;
        return true;
    }

    public bool AreEqual(ExtElement<TB> a, ExtElement<TB> b)
    {
        var f = _base;
        var x = Coefficients(a);
        var y = Coefficients(b);
        for (var i = 0; i < _m; i++)
            if (!f.AreEqual(x[i], y[i])) return false;
        return true;
    }

    /// <summary>The inverse by the extended Euclidean algorithm on (f, a) over the base field.</summary>
    public bool TryInvert(ExtElement<TB> a, out ExtElement<TB> inverse)
    {
        inverse = Zero;
        if (IsZero(a)) return false;
        var b = _base;
        // Invariant: r_i ≡ s_i·a (mod f), with r_0 = f, s_0 = 0, r_1 = a, s_1 = 1.
        var r0 = FullF();
        var r1 = (TB[])Coefficients(a).Clone();
        TB[] s0 = [b.Zero];
        TB[] s1 = [b.One];
        while (BasePolynomial.Degree(b, r1) >= 0)
        {
            var q = BasePolynomial.DivRem(b, r0, r1, out var rem);
            (r0, r1) = (r1, rem);
            (s0, s1) = (s1, BasePolynomial.SubtractProduct(b, s0, q, s1));
        }
        if (BasePolynomial.Degree(b, r0) != 0) return false; // a shares a factor with f: only if f were reducible
        if (!b.TryInvert(r0[0], out var scale)) return false;
        var c = new TB[_m];
        for (var i = 0; i < _m; i++) c[i] = i < s0.Length ? b.Multiply(s0[i], scale) : b.Zero;
        inverse = new ExtElement<TB>(c);
        return true;
    }

    public ExtElement<TB> FromInteger(BigInteger value)
    {
        var c = (TB[])_zero.Clone();
        c[0] = _base.FromInteger(value);
        return new ExtElement<TB>(c);
    }

    /// <summary>Uniform: each coefficient independently uniform in the base field.</summary>
    public ExtElement<TB> Sample(ref Xoshiro256 random)
    {
        var f = _base;
        var c = new TB[_m];
        for (var i = 0; i < c.Length; i++) c[i] = f.Sample(ref random);
        return new ExtElement<TB>(c);
    }

    public BigInteger Characteristic => _base.Characteristic;
    public int ExtensionDegree => _m;
    public double SizeLog2 => _m * _base.SizeLog2;

    public BigInteger[] ToCoefficients(ExtElement<TB> a)
    {
        var f = _base;
        var x = Coefficients(a);
        var result = new BigInteger[_m];
        for (var i = 0; i < _m; i++) result[i] = f.ToCoefficients(x[i])[0];
        return result;
    }

    public ExtElement<TB> FromCoefficients(ReadOnlySpan<BigInteger> coefficients)
    {
        if (coefficients.Length != _m)
            throw new ArgumentException($"an element of GF(p^{_m}) has {_m} coefficients, got {coefficients.Length}", nameof(coefficients));
        var f = _base;
        var c = new TB[_m];
        for (var i = 0; i < _m; i++) c[i] = f.FromCoefficients(coefficients.Slice(i, 1));
        return new ExtElement<TB>(c);
    }

    public BigInteger[]? DefiningPolynomial => (BigInteger[])_f.Clone();

    public override string ToString() => $"GF({_base.Characteristic}^{_m})";

    /// <summary>Dense polynomials over the base field as coefficient arrays, lowest first; trailing zeros allowed.</summary>
    private static class BasePolynomial
    {
        public static int Degree(in TBase f, TB[] a)
        {
            for (var i = a.Length - 1; i >= 0; i--)
                if (!f.IsZero(a[i])) return i;
            return -1;
        }

        /// <summary>a mod b for nonzero b.</summary>
        public static TB[] Remainder(in TBase f, TB[] a, TB[] b)
        {
            DivRem(f, a, b, out var rem);
            return rem;
        }

        /// <summary>The quotient and remainder of a by nonzero b.</summary>
        public static TB[] DivRem(in TBase field, TB[] a, TB[] b, out TB[] remainder)
        {
            var f = field;
            var db = Degree(f, b);
            if (!f.TryInvert(b[db], out var leadInverse))
                throw new InvalidOperationException("division by the zero polynomial");
            var r = (TB[])a.Clone();
            var da = Degree(f, r);
            var q = new TB[Math.Max(da - db + 1, 1)];
            for (var i = 0; i < q.Length; i++) q[i] = f.Zero;
            for (var i = da; i >= db; i--)
            {
                if (f.IsZero(r[i])) continue;
                var c = f.Multiply(r[i], leadInverse);
                q[i - db] = c;
                var negC = f.Negate(c);
                for (var j = 0; j <= db; j++) r[i - db + j] = f.MultiplyAdd(negC, b[j], r[i - db + j]);
            }
            remainder = r;
            return q;
        }

        /// <summary>s − q·t.</summary>
        public static TB[] SubtractProduct(in TBase field, TB[] s, TB[] q, TB[] t)
        {
            var f = field;
            var dq = Degree(f, q);
            var dt = Degree(f, t);
            var length = Math.Max(s.Length, dq >= 0 && dt >= 0 ? dq + dt + 1 : 0);
            var result = new TB[Math.Max(length, 1)];
            for (var i = 0; i < result.Length; i++) result[i] = i < s.Length ? s[i] : f.Zero;
            for (var i = 0; i <= dq; i++)
            {
                if (f.IsZero(q[i])) continue;
                var negQ = f.Negate(q[i]);
                for (var j = 0; j <= dt; j++) result[i + j] = f.MultiplyAdd(negQ, t[j], result[i + j]);
            }
            return result;
        }
    }
}
