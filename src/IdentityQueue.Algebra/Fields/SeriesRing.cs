using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>A truncated power series c₀ + c₁q + … + c_N q^N over a field; the array is never mutated after construction.</summary>
public readonly struct Series<T>(T[] coefficients) where T : struct
{
    /// <summary>The coefficients, lowest power first (length N + 1).</summary>
    public T[] Coefficients { get; } = coefficients;
}

/// <summary>
/// The ring F[q]/(q^(N+1)) of power series truncated after q^N, over a field F. Not a field: an element is invertible
/// exactly when its constant term is (<see cref="TryInvert"/> is false otherwise, and the evaluator treats that point as
/// undefined). It implements <see cref="IField{T}"/> so that the one generic evaluator runs programs over it; a Pfaffian or
/// determinant over it needs unit pivots. Immutable; thread-safe.
/// </summary>
public readonly struct SeriesRing<TField, T> : IField<Series<T>> where TField : struct, IField<T> where T : struct
{
    private readonly TField _field;
    private readonly int _length;

    /// <summary>Series over <paramref name="field"/> truncated after q^<paramref name="order"/>.</summary>
    public SeriesRing(TField field, int order)
    {
        if (order < 0) throw new ArgumentOutOfRangeException(nameof(order), "the order must be at least 0");
        _field = field;
        _length = order + 1;
    }

    public TField Field => _field;

    /// <summary>N: the highest power of q kept.</summary>
    public int Order => _length - 1;

    /// <summary>The series q (or the constant 0 when N = 0).</summary>
    public Series<T> Q
    {
        get
        {
            var c = Fill(_field.Zero);
            if (_length > 1) c[1] = _field.One;
            return new Series<T>(c);
        }
    }

    /// <summary>The constant <paramref name="a"/> as a series.</summary>
    public Series<T> Constant(T a)
    {
        var c = Fill(_field.Zero);
        c[0] = a;
        return new Series<T>(c);
    }

    private T[] Fill(T value)
    {
        var c = new T[_length];
        Array.Fill(c, value);
        return c;
    }

    public Series<T> Zero => new(Fill(_field.Zero));
    public Series<T> One => Constant(_field.One);

    public Series<T> Add(Series<T> a, Series<T> b)
    {
        var c = new T[_length];
        for (var i = 0; i < _length; i++) c[i] = _field.Add(a.Coefficients[i], b.Coefficients[i]);
        return new Series<T>(c);
    }

    public Series<T> Subtract(Series<T> a, Series<T> b)
    {
        var c = new T[_length];
        for (var i = 0; i < _length; i++) c[i] = _field.Subtract(a.Coefficients[i], b.Coefficients[i]);
        return new Series<T>(c);
    }

    public Series<T> Negate(Series<T> a)
    {
        var c = new T[_length];
        for (var i = 0; i < _length; i++) c[i] = _field.Negate(a.Coefficients[i]);
        return new Series<T>(c);
    }

    /// <summary>The truncated product: Σ_{i+j ≤ N} a_i b_j q^(i+j), skipping zero coefficients of a (sparse factors such as 1 − q^k are common).</summary>
    public Series<T> Multiply(Series<T> a, Series<T> b)
    {
        var c = Fill(_field.Zero);
        for (var i = 0; i < _length; i++)
        {
            var ai = a.Coefficients[i];
            if (_field.IsZero(ai)) continue;
            for (var j = 0; i + j < _length; j++) c[i + j] = _field.MultiplyAdd(ai, b.Coefficients[j], c[i + j]);
        }
        return new Series<T>(c);
    }

    public Series<T> MultiplyAdd(Series<T> a, Series<T> b, Series<T> c) => Add(Multiply(a, b), c);

    public bool IsZero(Series<T> a)
    {
        foreach (var x in a.Coefficients)
            if (!_field.IsZero(x)) return false;
        return true;
    }

    public bool AreEqual(Series<T> a, Series<T> b)
    {
        for (var i = 0; i < _length; i++)
            if (!_field.AreEqual(a.Coefficients[i], b.Coefficients[i])) return false;
        return true;
    }

    /// <summary>1/a by the recurrence b₀ = 1/a₀, b_n = −(Σ_{k=1..n} a_k b_{n−k})/a₀; false when a₀ = 0 (a is not a unit).</summary>
    public bool TryInvert(Series<T> a, out Series<T> inverse)
    {
        if (!_field.TryInvert(a.Coefficients[0], out var inverse0))
        {
            inverse = default;
            return false;
        }
        var b = Fill(_field.Zero);
        b[0] = inverse0;
        for (var n = 1; n < _length; n++)
        {
            var acc = _field.Zero;
            for (var k = 1; k <= n; k++) acc = _field.MultiplyAdd(a.Coefficients[k], b[n - k], acc);
            b[n] = _field.Negate(_field.Multiply(acc, inverse0));
        }
        inverse = new Series<T>(b);
        return true;
    }

    public Series<T> FromInteger(BigInteger value) => Constant(_field.FromInteger(value));

    /// <summary>A random constant series: the other variables of a series identity are constants in q.</summary>
    public Series<T> Sample(ref Xoshiro256 random) => Constant(_field.Sample(ref random));

    public BigInteger Characteristic => _field.Characteristic;
    public int ExtensionDegree => _field.ExtensionDegree;
    public double SizeLog2 => _field.SizeLog2;

    /// <summary>The constant term's coefficients (a point's value: the other variables are constants).</summary>
    public BigInteger[] ToCoefficients(Series<T> a) => _field.ToCoefficients(a.Coefficients[0]);

    public Series<T> FromCoefficients(ReadOnlySpan<BigInteger> coefficients) => Constant(_field.FromCoefficients(coefficients));

    public BigInteger[]? DefiningPolynomial => _field.DefiningPolynomial;

    /// <summary>The lowest power of q whose coefficient is nonzero, or −1 for the zero series.</summary>
    public int FirstNonzero(Series<T> a)
    {
        for (var i = 0; i < _length; i++)
            if (!_field.IsZero(a.Coefficients[i])) return i;
        return -1;
    }
}
