using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// Where an infinite sum or product of a truncated power series identity (<c>up to q^N</c>) can stop. The k-th term is
/// analysed with k symbolic: a lower bound on the q-adic valuation of (term − 0) for a sum, (term − 1) for a product, as the
/// minimum of polynomials in k. Every polynomial must grow (positive leading coefficient), and past a root bound of
/// P(k) − (N+1) (Cauchy's: 1 + max |a_i/a_d|) every term vanishes mod q^(N+1), so the range from there on changes nothing;
/// inside the kept range, a term whose bound already exceeds N is left out too. Stateless.
/// </summary>
/// <remarks>
/// A claim (c, V) about an expression A reads: A ≡ c (mod q^max(V, 0)) for every value of k, where c is a known rational
/// or unknown, and V the minimum of the polynomials (none: A is c exactly). The rules, with A = c_A + a, B = c_B + b:
/// A ± B: (c_A ± c_B, min(V_A, V_B)); A·B − c_A c_B = c_A b + c_B a + ab: min(V_B if c_A ≠ 0, V_A if c_B ≠ 0, V_A + V_B)
/// (an unknown c counts as nonzero); 1/B = 1/c_B − b/(c_B B): (1/c_B, V_B); A^E with c_A = 0: (0, E·V_A), else (c_A^E, V_A).
/// Using V_A + V_B and E·V_A unclamped only lowers a bound (max(V,0) ≥ V), so the claims stay true where V ≤ 0.
/// The series variable q is (0, {1}); other variables, constants in q, are (unknown, none).
/// </remarks>
internal static class SeriesValuation
{
    /// <summary>Most polynomials kept in one minimum, beyond which the analysis gives up (with a message).</summary>
    private const int MaxPolynomials = 64;

    /// <summary>Whether <paramref name="e"/> is <c>inf</c> (with <paramref name="negative"/>: <c>-inf</c>), not bound in <paramref name="scope"/>.</summary>
    public static bool IsInfinity(Expr e, IReadOnlyDictionary<string, BigInteger> scope, bool negative) =>
        negative
            ? e is UnaryExpr { Operator: UnaryOperator.Negate, Operand: NameRef { Name: "inf" } } && !scope.ContainsKey("inf")
            : e is NameRef { Name: "inf" } && !scope.ContainsKey("inf");

    /// <summary>
    /// The values of the bound variable whose terms matter mod q^(N+1), in increasing order; <paramref name="from"/> or
    /// <paramref name="to"/> is null for an infinite end. Throws <see cref="CompileError"/> when no stopping point can be shown.
    /// </summary>
    public static List<BigInteger> Terms(BoundExpr node, BigInteger? from, BigInteger? to, IReadOnlyDictionary<string, BigInteger> scope,
        string q, int order, Limits limits)
    {
        var kind = node.Kind == BoundKind.Sum ? "sum" : "product";
        var analysis = new Analysis(node.Variable, q, scope);
        Claim term;
        try
        {
            term = node.Body.Accept(analysis);
        }
        catch (CannotBound e)
        {
            throw new CompileError(node.Body.Position, $"the infinite {kind} over {node.Variable}: cannot bound the q-valuation of its terms ({e.Message})");
        }
        var neutral = node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One;
        if (term.C is not { } c || c != neutral)
            throw new CompileError(node.Body.Position,
                $"the terms of the infinite {kind} over {node.Variable} must be {(node.Kind == BoundKind.Sum ? "0" : "1")} at {q} = 0 (so that all but finitely many vanish mod {q}^{order + 1}), but the constant term is {(term.C is { } known ? known.ToString() : "not known to be")}");
        if (term.V is not { Count: > 0 } polynomials) return []; // every term is exactly the neutral element
        var high = to ?? Bound(polynomials, order, node, negate: false);
        var low = from ?? -Bound(polynomials, order, node, negate: true);
        var kept = new List<BigInteger>();
        for (var k = low; k <= high; k++)
        {
            if (polynomials.Min(p => Evaluate(p, k)) > order) continue; // ≡ neutral mod q^(N+1)
            kept.Add(k);
            if (kept.Count > limits.MaxProgramSize)
                throw new CompileError(node.Position, $"the infinite {kind} keeps more than {limits.MaxProgramSize} terms (the limit MaxProgramSize)");
        }
        return kept;
    }

    /// <summary>The last k (or −k for the lower end) that can matter: every P(k) > N beyond it.</summary>
    private static BigInteger Bound(List<Rational[]> polynomials, int order, BoundExpr node, bool negate)
    {
        var bound = BigInteger.Zero;
        foreach (var original in polynomials)
        {
            var p = negate ? Negated(original) : original;
            var d = Degree(p);
            if (d < 1 || p[d] < Rational.Zero)
                throw new CompileError(node.Body.Position,
                    $"the infinite {(node.Kind == BoundKind.Sum ? "sum" : "product")} over {node.Variable}: the q-valuation bound {Show(original, node.Variable)} of its terms does not grow as {node.Variable} → {(negate ? "-inf" : "inf")}, so it is not known where they vanish");
            // P(k) − (N + 1) > 0 for k > 1 + max_{i<d} |a_i / a_d| (Cauchy's bound on the real roots).
            var max = Rational.Zero;
            for (var i = 0; i < d; i++)
            {
                var a = i == 0 ? p[0] - (order + 1) : p[i];
                var ratio = a / p[d];
                if (ratio < Rational.Zero) ratio = -ratio;
                if (ratio > max) max = ratio;
            }
            var k = max.Numerator / max.Denominator + 2; // > 1 + max
            if (k > bound) bound = k;
        }
        return bound - 1;
    }

    private static Rational[] Negated(Rational[] p)
    {
        var r = (Rational[])p.Clone();
        for (var i = 1; i < r.Length; i += 2) r[i] = -r[i];
        return r;
    }

    private static int Degree(Rational[] p)
    {
        for (var i = p.Length - 1; i >= 0; i--)
            if (!p[i].IsZero) return i;
        return -1;
    }

    private static Rational Evaluate(Rational[] p, BigInteger k)
    {
        var acc = Rational.Zero;
        for (var i = p.Length - 1; i >= 0; i--) acc = acc * k + p[i];
        return acc;
    }

    private static string Show(Rational[] p, string k)
    {
        var terms = new List<string>();
        for (var i = p.Length - 1; i >= 0; i--)
            if (!p[i].IsZero) terms.Add(i switch { 0 => p[i].ToString(), 1 => $"{p[i]}*{k}", _ => $"{p[i]}*{k}^{i}" });
        return terms.Count == 0 ? "0" : string.Join(" + ", terms);
    }

    private static Rational[] Add(Rational[] a, Rational[] b)
    {
        var r = new Rational[Math.Max(a.Length, b.Length)];
        for (var i = 0; i < r.Length; i++) r[i] = (i < a.Length ? a[i] : Rational.Zero) + (i < b.Length ? b[i] : Rational.Zero);
        return r;
    }

    private static Rational[] Multiply(Rational[] a, Rational[] b)
    {
        var r = new Rational[a.Length + b.Length - 1];
        Array.Fill(r, Rational.Zero);
        for (var i = 0; i < a.Length; i++)
            for (var j = 0; j < b.Length; j++) r[i + j] += a[i] * b[j];
        return r;
    }

    private sealed class CannotBound(string message) : Exception(message);

    /// <summary>A ≡ C (mod q^max(V,0)); C null: unknown; V null: A is C exactly (no power of q).</summary>
    private readonly record struct Claim(Rational? C, List<Rational[]>? V)
    {
        public bool MaybeNonzero => C is not { } c || !c.IsZero;
    }

    private sealed class Analysis(string k, string q, IReadOnlyDictionary<string, BigInteger> scope) : IExprVisitor<Claim>
    {
        private static readonly List<Rational[]> Nothing = [[Rational.Zero]];
        private readonly HashSet<string> _unknownIntegers = [];
        private readonly Dictionary<string, BigInteger> _local = [];

        private static List<Rational[]>? Min(List<Rational[]>? a, List<Rational[]>? b)
        {
            if (a is null) return b;
            if (b is null) return a;
            var r = new List<Rational[]>(a);
            foreach (var p in b)
                if (!r.Any(x => x.AsSpan().SequenceEqual(p))) r.Add(p);
            if (r.Count > MaxPolynomials) throw new CannotBound($"more than {MaxPolynomials} bounds");
            return r;
        }

        private static List<Rational[]>? Plus(List<Rational[]>? a, List<Rational[]>? b) =>
            a is null || b is null ? null : Min([.. a.SelectMany(x => b.Select(y => SeriesValuation.Add(x, y)))], []);

        public Claim VisitInteger(IntegerLiteral node) => new(node.Value, null);

        public Claim VisitName(NameRef node)
        {
            if (node.Name == k || _unknownIntegers.Contains(node.Name)) return new(null, null);
            if (_local.TryGetValue(node.Name, out var local)) return new(local, null);
            if (scope.TryGetValue(node.Name, out var value)) return new(value, null);
            if (node.Name == q) return new(Rational.Zero, [[Rational.One]]); // q ≡ 0 mod q^1
            return new(null, null); // another variable: a constant in q
        }

        public Claim VisitIndexed(IndexedName node) => new(null, null);

        public Claim VisitUnary(UnaryExpr node)
        {
            var a = node.Operand.Accept(this);
            return new(a.C is { } c ? -c : null, a.V);
        }

        public Claim VisitBinary(BinaryExpr node) => Power(node);

        public Claim VisitSum(SumExpr node)
        {
            Claim? acc = null;
            foreach (var t in node.Terms)
            {
                var b = t.Value.Accept(this);
                if (t.Subtract) b = new(b.C is { } c ? -c : null, b.V);
                acc = acc is not { } a ? b : new(a.C is { } x && b.C is { } y ? x + y : null, Min(a.V, b.V));
            }
            return acc!.Value;
        }

        public Claim VisitProduct(ProductExpr node)
        {
            Claim? acc = null;
            foreach (var f in node.Factors)
            {
                var b = f.Value.Accept(this);
                if (f.Divide) b = Inverse(b);
                acc = acc is not { } a ? b : Product(a, b);
            }
            return acc!.Value;
        }

        private static Claim Product(Claim a, Claim b)
        {
            var v = Min(Min(a.MaybeNonzero ? b.V : null, b.MaybeNonzero ? a.V : null), Plus(a.V, b.V));
            Rational? c = a.C is { } x && b.C is { } y ? x * y : a.C is { IsZero: true } || b.C is { IsZero: true } ? Rational.Zero : null;
            return new(c, v);
        }

        private static Claim Inverse(Claim b)
        {
            if (b.C is { IsZero: true }) throw new CannotBound("it divides by a series whose constant term is 0");
            return new(b.C is { } c ? Rational.One / c : null, b.V);
        }

        private Claim Power(BinaryExpr node)
        {
            var a = node.Left.Accept(this);
            var e = Polynomial(node.Right);
            if (e is null)
            {
                // An exponent that is not a polynomial in k (it uses an inner bound variable): only a base ≡ 1 keeps a claim.
                return a.C is { } one && one == Rational.One ? new(Rational.One, a.V) : new(null, Nothing);
            }
            var constant = Degree(e) <= 0;
            if (a.C is { IsZero: true })
                return new(Rational.Zero, a.V?.Select(p => Multiply(p, e)).ToList() is { } scaled ? Min(scaled, []) : null);
            Rational? c = a.C is { } x && (x == Rational.One || constant && e[0].IsInteger && e[0].Numerator < 64)
                ? (x == Rational.One ? Rational.One : Rational.Pow(x, (int)e[0].Numerator)) : null;
            return new(c, a.V);
        }

        /// <summary>An integer expression as a polynomial in k with rational coefficients, or null when it is not one.</summary>
        private Rational[]? Polynomial(Expr e)
        {
            switch (e)
            {
                case IntegerLiteral i: return [i.Value];
                case NameRef n when n.Name == k: return [Rational.Zero, Rational.One];
                case NameRef n when _local.TryGetValue(n.Name, out var local): return [local];
                case NameRef n when !_unknownIntegers.Contains(n.Name) && scope.TryGetValue(n.Name, out var value): return [value];
                case UnaryExpr u: return Polynomial(u.Operand) is { } p ? p.Select(x => -x).ToArray() : null;
                case SumExpr sum:
                {
                    Rational[] acc = [Rational.Zero];
                    foreach (var t in sum.Terms)
                    {
                        if (Polynomial(t.Value) is not { } term) return null;
                        acc = SeriesValuation.Add(acc, t.Subtract ? term.Select(x => -x).ToArray() : term);
                    }
                    return acc;
                }
                case ProductExpr product:
                {
                    Rational[] acc = [Rational.One];
                    foreach (var f in product.Factors)
                    {
                        if (Polynomial(f.Value) is not { } term) return null;
                        if (!f.Divide) acc = Multiply(acc, term);
                        else if (Degree(term) == 0) acc = acc.Select(x => x / term[0]).ToArray();
                        else return null;
                    }
                    return acc;
                }
                case BinaryExpr b:
                {
                    var l = Polynomial(b.Left);
                    var r = Polynomial(b.Right);
                    if (l is null || r is null || Degree(r) > 0 || !r[0].IsInteger || r[0].Numerator < 0 || r[0].Numerator > 16) return null;
                    Rational[] acc = [Rational.One];
                    for (var i = 0; i < (int)r[0].Numerator; i++) acc = Multiply(acc, l);
                    return acc;
                }
                default: return null;
            }
        }

        public Claim VisitCall(CallExpr node) => new(null, Nothing); // binom, q-functions, det, …: no claim

        public Claim VisitBound(BoundExpr node)
        {
            var from = Polynomial(node.From);
            var to = Polynomial(node.To);
            if (from is { } f && to is { } t && Degree(f) <= 0 && Degree(t) <= 0 && f[0].IsInteger && t[0].IsInteger)
            {
                // a range that does not depend on k: term by term, with the inner variable fixed
                var low = f[0].Numerator;
                var high = t[0].Numerator;
                if (high - low > 10_000) throw new CannotBound($"an inner range of {high - low + 1} terms");
                Claim acc = new(node.Kind == BoundKind.Sum ? Rational.Zero : Rational.One, null);
                var saved = _local.TryGetValue(node.Variable, out var outer);
                try
                {
                    for (var j = low; j <= high; j++)
                    {
                        _local[node.Variable] = j;
                        var term = node.Body.Accept(this);
                        acc = node.Kind == BoundKind.Sum ? new(acc.C is { } x && term.C is { } y ? x + y : null, Min(acc.V, term.V)) : Product(acc, term);
                    }
                }
                finally
                {
                    if (saved) _local[node.Variable] = outer; else _local.Remove(node.Variable);
                }
                return acc;
            }
            // A range that depends on k: the body with the inner variable unknown; a product of factors ≡ 1 is ≡ 1.
            var added = _unknownIntegers.Add(node.Variable);
            try
            {
                var body = node.Body.Accept(this);
                if (node.Kind == BoundKind.Product && body.C is { } one && one == Rational.One) return new(Rational.One, body.V ?? null);
                if (node.Kind == BoundKind.Sum && body.C is { IsZero: true }) return new(Rational.Zero, body.V);
                return new(null, Nothing);
            }
            finally
            {
                if (added) _unknownIntegers.Remove(node.Variable);
            }
        }

        public Claim VisitMatrixComprehension(MatrixComprehension node) => throw new CannotBound("a matrix in a term");

        public Claim VisitMatrixLiteral(MatrixLiteral node) => throw new CannotBound("a matrix in a term");
    }
}
