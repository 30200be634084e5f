using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>A term of a recovered polynomial: exponents in variable order and a coefficient.</summary>
internal readonly record struct Term<T>(int[] Exponents, T Coefficient) where T : struct;

/// <summary>Why an interpolation stopped before the polynomial was recovered.</summary>
internal enum InterpolationStop
{
    None,
    /// <summary>More terms than the budget allows; <see cref="Interpolated{T}.TermsAtLeast"/> is a lower bound.</summary>
    TooManyTerms,
    /// <summary>A univariate image did not settle within the degree cap.</summary>
    DegreeOverCap,
    /// <summary>The evaluation budget ran out.</summary>
    Evaluations,
}

internal sealed record Interpolated<T>(IReadOnlyList<Term<T>>? Terms, InterpolationStop Stop, int TermsAtLeast) where T : struct;

/// <summary>
/// Zippel's variable-by-variable sparse interpolation of a black-box polynomial over a large field (Zippel, "Interpolating
/// polynomials from their values", J. Symbolic Comput. 9 (1990) [memory]): the variables are added one at a time, each
/// coefficient of the current skeleton interpolated as a univariate polynomial in the new variable by Newton's method with
/// early termination, the coefficients at each value of the new variable found from one transposed Vandermonde system.
/// Probabilistic (a random anchor may hide a term, a stop after <c>earlyTermination</c> agreeing values may be early): the
/// caller verifies the result at fresh points. Not thread-safe (holds its random state).
/// </summary>
/// <param name="field">The field of the black box.</param>
/// <param name="variables">The number of variables.</param>
/// <param name="blackBox">The polynomial's value at a point.</param>
/// <param name="maxTerms">The most terms a result may have.</param>
/// <param name="maxDegree">The degree cap of every univariate image.</param>
/// <param name="degreeIsBound">True when <paramref name="maxDegree"/> is a proven bound (then maxDegree + 1 values are exact).</param>
/// <param name="earlyTermination">How many agreeing values in a row end a univariate interpolation early.</param>
/// <param name="maxEvaluations">The most black-box evaluations allowed.</param>
/// <param name="seed">Seeds the anchors and values.</param>
/// <param name="cancellation">Observed between evaluations; a cancelled interpolation throws <see cref="OperationCanceledException"/>.</param>
internal sealed class SparseInterpolation<TField, T>(TField field, int variables, Func<T[], T> blackBox, int maxTerms, int maxDegree, bool degreeIsBound,
    int earlyTermination, long maxEvaluations, ulong seed, CancellationToken cancellation)
    where TField : struct, IField<T> where T : struct
{
    private Xoshiro256 _random = new(seed);
    private long _evaluations;

    public long Evaluations => _evaluations;

    private T Call(T[] point)
    {
        cancellation.ThrowIfCancellationRequested();
        _evaluations++;
        return blackBox(point);
    }

    private bool Spent => _evaluations >= maxEvaluations;

    public Interpolated<T> Run()
    {
        var n = variables;
        var anchors = new T[n];
        for (var i = 0; i < n; i++) anchors[i] = field.Sample(ref _random);
        if (n == 0) return new Interpolated<T>(Nonzero([new Term<T>([], Call([]))]), InterpolationStop.None, 1);

        // skeleton over the variables 0..k−1 (exponent vectors of length k) and, after the last stage, the coefficients
        var skeleton = new List<int[]> { Array.Empty<int>() };
        List<Term<T>> terms = [];
        for (var k = 0; k < n; k++)
        {
            var t = skeleton.Count;
            // nodes m_s = Π_{l<k} r_l^{e_l}; distinct with high probability in a large field, retried otherwise
            T[] roots;
            T[] nodes;
            var tries = 0;
            do
            {
                roots = new T[k];
                for (var l = 0; l < k; l++) roots[l] = field.Sample(ref _random);
                nodes = skeleton.Select(e => Monomial(e, roots)).ToArray();
                if (++tries > 8) return new Interpolated<T>(null, InterpolationStop.TooManyTerms, t); // the field is too small
            } while (!Distinct(nodes));
            var solver = new TransposedVandermonde(field, nodes);
            var powers = new T[t][]; // the evaluation points over variables 0..k−1: (r^i) for i < t
            for (var i = 0; i < t; i++)
            {
                powers[i] = new T[k];
                for (var l = 0; l < k; l++) powers[i][l] = i == 0 ? field.One : field.Multiply(powers[i - 1][l], roots[l]);
            }
            // Newton interpolation of every skeleton coefficient in x_k, on shared random values
            var xs = new List<T>();
            var newton = new List<T>[t]; // divided-difference coefficients per skeleton term
            var table = new List<T>[t];  // the last row of divided differences
            var settled = new int[t];    // consecutive zero Newton coefficients
            for (var s = 0; s < t; s++) { newton[s] = []; table[s] = []; }
            var point = new T[n];
            while (true)
            {
                if (Spent) return new Interpolated<T>(null, InterpolationStop.Evaluations, t);
                var x = field.Sample(ref _random);
                if (xs.Any(v => field.AreEqual(v, x))) continue;
                var values = new T[t];
                for (var i = 0; i < t; i++)
                {
                    for (var l = 0; l < k; l++) point[l] = powers[i][l];
                    point[k] = x;
                    for (var l = k + 1; l < n; l++) point[l] = anchors[l];
                    values[i] = Call(point);
                }
                var c = solver.Solve(values);
                xs.Add(x);
                var done = true;
                var inverses = Inverses(xs);
                for (var s = 0; s < t; s++)
                {
                    var top = AddPoint(xs, table[s], c[s], inverses);
                    newton[s].Add(top);
                    settled[s] = field.IsZero(top) && xs.Count > 1 ? settled[s] + 1 : 0;
                    if (settled[s] < earlyTermination && !(degreeIsBound && xs.Count > maxDegree)) done = false;
                }
                if (done) break;
                if (xs.Count > maxDegree + earlyTermination) return new Interpolated<T>(null, InterpolationStop.DegreeOverCap, t);
            }
            // a settled coefficient has all its last Newton coefficients zero; one that reached maxDegree + 1 values is exact
            var next = new List<int[]>();
            terms = [];
            for (var s = 0; s < t; s++)
            {
                var monomial = ToMonomialBasis(xs, newton[s]);
                for (var e = 0; e < monomial.Length; e++)
                {
                    if (field.IsZero(monomial[e])) continue;
                    var exponents = new int[k + 1];
                    skeleton[s].CopyTo(exponents, 0);
                    exponents[k] = e;
                    next.Add(exponents);
                    terms.Add(new Term<T>(exponents, monomial[e]));
                }
            }
            if (next.Count > maxTerms) return new Interpolated<T>(null, InterpolationStop.TooManyTerms, next.Count);
            skeleton = next;
            if (skeleton.Count == 0) return new Interpolated<T>([], InterpolationStop.None, 0);
        }
        return new Interpolated<T>(terms, InterpolationStop.None, terms.Count);
    }

    /// <summary>
    /// The degree of the univariate polynomial t ↦ f(b + t·d) on a random line (the total degree of f, unless the line is
    /// unlucky), by Newton interpolation with early termination; null when it does not settle within the cap.
    /// </summary>
    public int? DegreeOnLine()
    {
        var b = new T[variables];
        var d = new T[variables];
        for (var i = 0; i < variables; i++) { b[i] = field.Sample(ref _random); d[i] = field.Sample(ref _random); }
        var xs = new List<T>();
        var table = new List<T>();
        var newton = new List<T>();
        var settled = 0;
        var point = new T[variables];
        while (xs.Count <= maxDegree + earlyTermination)
        {
            if (Spent) return null;
            var x = field.Sample(ref _random);
            if (xs.Any(v => field.AreEqual(v, x))) continue;
            for (var i = 0; i < variables; i++) point[i] = field.MultiplyAdd(x, d[i], b[i]);
            var y = Call(point);
            xs.Add(x);
            var top = AddPoint(xs, table, y);
            newton.Add(top);
            settled = field.IsZero(top) && xs.Count > 1 ? settled + 1 : 0;
            if (settled >= earlyTermination || degreeIsBound && xs.Count > maxDegree)
            {
                var degree = -1;
                for (var i = 0; i < newton.Count; i++) if (!field.IsZero(newton[i])) degree = i;
                return degree; // −1: the zero polynomial
            }
        }
        return null;
    }

    private T Monomial(int[] exponents, T[] roots)
    {
        var value = field.One;
        for (var l = 0; l < exponents.Length; l++)
            for (var e = 0; e < exponents[l]; e++) value = field.Multiply(value, roots[l]);
        return value;
    }

    private bool Distinct(T[] nodes)
    {
        for (var i = 0; i < nodes.Length; i++)
        {
            if (field.IsZero(nodes[i])) return false;
            for (var j = 0; j < i; j++) if (field.AreEqual(nodes[i], nodes[j])) return false;
        }
        return true;
    }

    /// <summary>
    /// Adds the value y at the newest point xs[^1] to the divided-difference row <paramref name="row"/> (row[j] = f[x_{m−j}, …, x_m]
    /// for the newest m) and returns the new top coefficient f[x_0, …, x_m].
    /// </summary>
    private T AddPoint(List<T> xs, List<T> row, T y) => AddPoint(xs, row, y, Inverses(xs));

    /// <summary>1/(x_m − x_{m−j}) for j = 1 … m (index j − 1), with one inversion (Montgomery's batch trick, common practice).</summary>
    private T[] Inverses(List<T> xs)
    {
        var m = xs.Count - 1;
        var result = new T[m];
        if (m == 0) return result;
        var prefix = new T[m];
        var product = field.One;
        for (var j = 1; j <= m; j++)
        {
            prefix[j - 1] = product;
            product = field.Multiply(product, field.Subtract(xs[m], xs[m - j]));
        }
        field.TryInvert(product, out var inverse); // the values are distinct, so the product is nonzero
        for (var j = m; j >= 1; j--)
        {
            var difference = field.Subtract(xs[m], xs[m - j]);
            result[j - 1] = field.Multiply(inverse, prefix[j - 1]);
            inverse = field.Multiply(inverse, difference);
        }
        return result;
    }

    private T AddPoint(List<T> xs, List<T> row, T y, T[] inverses)
    {
        var m = xs.Count - 1;
        var current = y;
        var updated = new T[m + 1];
        updated[0] = y;
        for (var j = 1; j <= m; j++)
        {
            // f[x_{m−j}, …, x_m] = (f[x_{m−j+1}, …, x_m] − f[x_{m−j}, …, x_{m−1}]) / (x_m − x_{m−j})
            current = field.Multiply(field.Subtract(current, row[j - 1]), inverses[j - 1]);
            updated[j] = current;
        }
        row.Clear();
        row.AddRange(updated);
        return current;
    }

    /// <summary>The coefficients (lowest first) of the Newton form Σ c_j Π_{i&lt;j} (x − x_i), trailing zeros dropped.</summary>
    private T[] ToMonomialBasis(List<T> xs, List<T> newton)
    {
        var degree = newton.Count - 1;
        while (degree >= 0 && field.IsZero(newton[degree])) degree--;
        if (degree < 0) return [];
        // Horner on the Newton form: p = c_d; p = p·(x − x_j) + c_j for j = d−1 … 0
        var p = new T[degree + 1];
        p[0] = newton[degree];
        var length = 1;
        for (var j = degree - 1; j >= 0; j--)
        {
            // p ← p·x − x_j·p + c_j
            for (var i = length; i >= 1; i--) p[i] = field.Subtract(p[i - 1], field.Multiply(xs[j], p[i]));
            p[0] = field.Subtract(newton[j], field.Multiply(xs[j], p[0]));
            length++;
        }
        return p;
    }

    private List<Term<T>> Nonzero(List<Term<T>> terms) => terms.Where(t => !field.IsZero(t.Coefficient)).ToList();

    /// <summary>
    /// Solves Σ_s c_s m_s^i = v_i (i &lt; t) for distinct nonzero nodes m_s in O(t²): with P(z) = Π (z − m_s) and
    /// P_s = P/(z − m_s) = Σ q_{s,i} z^i, Σ_i q_{s,i} v_i = c_s·P_s(m_s) (Zippel 1990, §5 [memory]).
    /// </summary>
    private sealed class TransposedVandermonde
    {
        private readonly TField _field;
        private readonly T[][] _rows;

        public TransposedVandermonde(TField field, T[] nodes)
        {
            _field = field;
            var t = nodes.Length;
            // P(z), lowest first, monic of degree t
            var p = new T[t + 1];
            p[0] = field.One;
            for (var s = 0; s < t; s++)
            {
                for (var i = s + 1; i >= 1; i--) p[i] = field.Subtract(p[i - 1], field.Multiply(nodes[s], p[i]));
                p[0] = field.Negate(field.Multiply(nodes[s], p[0]));
            }
            _rows = new T[t][];
            // Four nodes at a time: their synthetic divisions and Horner sums are independent chains, which the processor
            // overlaps (one node's chain is bound by the latency of a modular multiply-add).
            var s0 = 0;
            for (; s0 + 4 <= t; s0 += 4)
            {
                T m0 = nodes[s0], m1 = nodes[s0 + 1], m2 = nodes[s0 + 2], m3 = nodes[s0 + 3];
                T[] q0 = new T[t], q1 = new T[t], q2 = new T[t], q3 = new T[t];
                q0[t - 1] = q1[t - 1] = q2[t - 1] = q3[t - 1] = p[t];
                for (var i = t - 1; i >= 1; i--)
                {
                    q0[i - 1] = field.MultiplyAdd(m0, q0[i], p[i]);
                    q1[i - 1] = field.MultiplyAdd(m1, q1[i], p[i]);
                    q2[i - 1] = field.MultiplyAdd(m2, q2[i], p[i]);
                    q3[i - 1] = field.MultiplyAdd(m3, q3[i], p[i]);
                }
                T d0 = field.Zero, d1 = field.Zero, d2 = field.Zero, d3 = field.Zero;
                for (var i = t - 1; i >= 0; i--)
                {
                    d0 = field.MultiplyAdd(d0, m0, q0[i]);
                    d1 = field.MultiplyAdd(d1, m1, q1[i]);
                    d2 = field.MultiplyAdd(d2, m2, q2[i]);
                    d3 = field.MultiplyAdd(d3, m3, q3[i]);
                }
                Scale(field, q0, d0);
                Scale(field, q1, d1);
                Scale(field, q2, d2);
                Scale(field, q3, d3);
                (_rows[s0], _rows[s0 + 1], _rows[s0 + 2], _rows[s0 + 3]) = (q0, q1, q2, q3);
            }
            for (var s = s0; s < t; s++)
            {
                // synthetic division of P by (z − m_s): q_{t−1} = p_t, q_{i−1} = p_i + m_s·q_i
                var q = new T[t];
                q[t - 1] = p[t];
                for (var i = t - 1; i >= 1; i--) q[i - 1] = field.MultiplyAdd(nodes[s], q[i], p[i]);
                var denominator = field.Zero;
                for (var i = t - 1; i >= 0; i--) denominator = field.MultiplyAdd(denominator, nodes[s], q[i]);
                Scale(field, q, denominator);
                _rows[s] = q;
            }
        }

        /// <summary>Divides the row by P_s(m_s).</summary>
        private static void Scale(TField field, T[] q, T denominator)
        {
            field.TryInvert(denominator, out var inverse);
            for (var i = 0; i < q.Length; i++) q[i] = field.Multiply(q[i], inverse);
        }

        public T[] Solve(T[] values)
        {
            var c = new T[_rows.Length];
            for (var s = 0; s < c.Length; s++)
            {
                // four independent sums (exact arithmetic: the order of the additions does not change the result)
                T sum0 = _field.Zero, sum1 = _field.Zero, sum2 = _field.Zero, sum3 = _field.Zero;
                var row = _rows[s];
                var i = 0;
                for (; i + 4 <= row.Length; i += 4)
                {
                    sum0 = _field.MultiplyAdd(row[i], values[i], sum0);
                    sum1 = _field.MultiplyAdd(row[i + 1], values[i + 1], sum1);
                    sum2 = _field.MultiplyAdd(row[i + 2], values[i + 2], sum2);
                    sum3 = _field.MultiplyAdd(row[i + 3], values[i + 3], sum3);
                }
                for (; i < row.Length; i++) sum0 = _field.MultiplyAdd(row[i], values[i], sum0);
                c[s] = _field.Add(_field.Add(sum0, sum1), _field.Add(sum2, sum3));
            }
            return c;
        }
    }
}
