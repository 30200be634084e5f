using System.Numerics;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>Knobs of <see cref="RandomExpressions"/>. Immutable.</summary>
public sealed record RandomExpressionOptions
{
    /// <summary>Deepest nesting of operations.</summary>
    public int MaxDepth { get; init; } = 4;

    /// <summary>About how many nodes one expression has at most (bound-form bodies count once).</summary>
    public int MaxSize { get; init; } = 14;

    /// <summary>An upper bound on the total degree of the expansion (kept by construction).</summary>
    public int MaxDegree { get; init; } = 6;

    /// <summary>How many of x, y, z, w, x[1], x[2] one expression draws on (1 up to this, at most 6).</summary>
    public int MaxVariables { get; init; } = 4;

    /// <summary>Allow x[1], x[2] in the variable pool and x[k] with a bound k.</summary>
    public bool AllowIndexed { get; init; } = true;

    /// <summary>Allow sum(k in A..B: ...) and prod(k in A..B: ...).</summary>
    public bool AllowBoundForms { get; init; } = true;

    /// <summary>Allow binom, fact, qint, qfact, qbinom.</summary>
    public bool AllowSpecialFunctions { get; init; } = true;

    /// <summary>Allow division by a nonzero integer constant.</summary>
    public bool AllowDivision { get; init; }

    /// <summary>Allow occasional literals near 2^70.</summary>
    public bool AllowLargeLiterals { get; init; } = true;
}

/// <summary>A generated expression: its tree and its text in catalogue syntax.</summary>
public sealed record GeneratedExpression(Expr Expression, string Text);

/// <summary>
/// A generated identity with its tree, its text <c>LHS = RHS</c>, whether it holds over Q by construction, and
/// the name of the construction (e.g. <c>square-of-sum</c>, <c>square-of-sum+perturbed</c>).
/// </summary>
public sealed record GeneratedIdentity(Expr Left, Expr Right, string Text, bool IsTrue, string Construction);

/// <summary>
/// A seeded generator of small random scalar expressions and identities in the catalogue language, with the
/// tree and the text (<see cref="CatalogueText.Format"/>) of each. The same seed and options always give the
/// same sequence. True identities hold by an algebraic law (commutativity, expansion, binomial theorem, Pascal's
/// rules, reindexing, …); false ones are a true identity with a nonzero polynomial added to one side, so they are
/// false over Q by construction. Not thread-safe.
/// </summary>
public sealed class RandomExpressions
{
    private static readonly string[] PlainNames = ["x", "y", "z", "w"];
    private static readonly string[] BoundNames = ["k", "j", "i", "m"];

    /// <summary>Every evaluated variable name an expression from this generator can use.</summary>
    public static readonly IReadOnlyList<string> VariableUniverse = ["x", "y", "z", "w", "x[0]", "x[1]", "x[2]", "x[3]", "x[4]"];

    private readonly RandomExpressionOptions _options;
    private Xoshiro256 _random;
    private List<Expr> _pool = [];
    private readonly List<(string Name, int Min, int Max)> _scope = [];

    public RandomExpressions(ulong seed, RandomExpressionOptions? options = null)
    {
        _random = new Xoshiro256(seed);
        _options = options ?? new RandomExpressionOptions();
        if (_options.MaxVariables < 1 || _options.MaxDegree < 0 || _options.MaxDepth < 0 || _options.MaxSize < 1)
            throw new ArgumentException("the options need at least one variable, size 1 and non-negative depth and degree", nameof(options));
    }

    /// <summary>The next random expression.</summary>
    public GeneratedExpression Next()
    {
        NewPool();
        var e = Generate(_options.MaxDepth, _options.MaxSize, _options.MaxDegree);
        return new GeneratedExpression(e, Format(e));
    }

    /// <summary>The next random identity; about half are true by construction.</summary>
    public GeneratedIdentity NextIdentity()
    {
        NewPool();
        var (lhs, rhs, name) = TrueIdentity();
        if (Chance(1, 2)) return Make(lhs, rhs, true, name);
        var p = NonzeroPolynomial(_options.MaxDegree);
        return Below(4) switch
        {
            0 => Make(lhs, Add(rhs, p), false, name + "+perturbed"),
            1 => Make(lhs, Sub(rhs, p), false, name + "+perturbed"),
            2 => Make(Add(p, lhs), rhs, false, name + "+perturbed"),
            _ => Make(Sub(lhs, p), rhs, false, name + "+perturbed"),
        };
    }

    private static GeneratedIdentity Make(Expr lhs, Expr rhs, bool isTrue, string construction) =>
        new(lhs, rhs, FormatIdentity(lhs, rhs), isTrue, construction);

    // ---- identities ----

    private (Expr Lhs, Expr Rhs, string Name) TrueIdentity()
    {
        var d = _options.MaxDegree;
        var s = Math.Max(3, _options.MaxSize / 2);
        var depth = Math.Max(1, _options.MaxDepth - 1);
        Expr Part(int degree) => Generate(depth, s, degree);
        switch (Below(13))
        {
            case 0:
            {
                var a = Part(d / 2);
                var b = Part(d - d / 2);
                return (Mul(a, b), Mul(b, a), "commute-product");
            }
            case 1:
            {
                var a = Part(d / 2);
                var b = Part(d / 2);
                return (Pow(Add(a, b), 2), Add(Add(Pow(a, 2), Mul(Mul(Int(2), a), b)), Pow(b, 2)), "square-of-sum");
            }
            case 2:
            {
                var a = Part(d / 2);
                var b = Part(d - d / 2);
                var c = Part(d - d / 2);
                return (Mul(a, Add(b, c)), Add(Mul(a, b), Mul(a, c)), "distribute");
            }
            case 3:
            {
                var a = Part(d);
                var b = Part(d);
                var c = Part(d);
                return (Add(Add(a, b), c), Add(c, Add(a, b)), "associate-commute-sum");
            }
            case 4:
            {
                var a = Part(d / 3);
                var b = Part(d / 3);
                var c = Part(d - 2 * (d / 3));
                return (Mul(Mul(a, b), c), Mul(a, Mul(b, c)), "associate-product");
            }
            case 5:
            {
                var a = Part(d / 2);
                var b = Part(d / 2);
                return (Sub(Pow(a, 2), Pow(b, 2)), Mul(Sub(a, b), Add(a, b)), "difference-of-squares");
            }
            case 6:
            {
                // Binomial theorem: Σ_{k=0..n} C(n,k) A^k = (1 + A)^n.
                var n = Below(5);
                var a = Part(n == 0 ? d : d / n);
                var k = FreshBoundName();
                return (Sum(k, Int(0), Int(n), Mul(Call(Builtins.Binom, Int(n), Name(k)), Pow(a, Name(k)))), Pow(Add(Int(1), a), Int(n)), "binomial-theorem");
            }
            case 7:
            {
                // Π_{k=1..n} A = A^n for A free of k.
                var n = Below(4);
                var a = Part(n == 0 ? d : d / n);
                return (Prod(FreshBoundName(), Int(1), Int(n), a), Pow(a, n), "product-is-power");
            }
            case 8:
            {
                var a = Part(d);
                return (a, FromPolynomial(new PolynomialExpander().Expand(a)), "expansion");
            }
            case 9:
            {
                // qint(n, A)(1 − A) = 1 − A^n (geometric series).
                var n = Below(5);
                var a = Part(Math.Max(0, d / Math.Max(n, 1)));
                return (Mul(Call(Builtins.QInt, Int(n), a), Sub(Int(1), a)), Sub(Int(1), Pow(a, n)), "geometric-sum");
            }
            case 10:
            {
                // Pascal's rule: C(A+1, k) = C(A, k) + C(A, k−1), written with k − 1 as a parameter expression.
                var k = Below(4);
                var a = Part(k == 0 ? d : d / k);
                return (Call(Builtins.Binom, Add(a, Int(1)), Int(k)),
                        Add(Call(Builtins.Binom, a, Int(k)), Call(Builtins.Binom, a, Sub(Int(k), Int(1)))), "pascal-rule");
            }
            case 11:
            {
                // The second q-Pascal rule: [n, k] = q^(n−k) [n−1, k−1] + [n−1, k].
                var n = 1 + Below(5);
                var k = Below(n + 1);
                var q = Part(Math.Max(0, d / Math.Max(1, k * (n - k))));
                return (Call(Builtins.QBinom, Int(n), Int(k), q),
                        Add(Mul(Pow(q, Sub(Int(n), Int(k))), Call(Builtins.QBinom, Sub(Int(n), Int(1)), Sub(Int(k), Int(1)), q)),
                            Call(Builtins.QBinom, Sub(Int(n), Int(1)), Int(k), q)), "q-pascal-rule");
            }
            default:
            {
                // Reindexing: Σ_{k=a..b} E(k) = Σ_{k=a..b} E(a + b − k) (also for prod).
                var k = FreshBoundName();
                var from = Below(2);
                var to = from + Below(4);
                var isSum = Chance(1, 2);
                _scope.Add((k, from, to));
                var body = Generate(depth, s, isSum ? d : d / (to - from + 1));
                _scope.RemoveAt(_scope.Count - 1);
                var reversed = Substitute(body, k, Sub(Int(from + to), Name(k)));
                return isSum
                    ? (Sum(k, Int(from), Int(to), body), Sum(k, Int(from), Int(to), reversed), "reindex-sum")
                    : (Prod(k, Int(from), Int(to), body), Prod(k, Int(from), Int(to), reversed), "reindex-prod");
            }
        }
    }

    /// <summary>A polynomial that is nonzero by construction: a product of a nonzero constant, a monomial and linear forms v + c.</summary>
    private Expr NonzeroPolynomial(int maxDegree)
    {
        Expr p = Chance(1, 8) && _options.AllowLargeLiterals ? LargeLiteral() : Int(1 + Below(9));
        var degree = Below(Math.Min(maxDegree, 3) + 1);
        for (var i = 0; i < degree; i++)
        {
            var v = _pool[Below(_pool.Count)];
            p = Mul(p, Chance(1, 2) ? v : Add(v, Int(Below(5))));
        }
        return p;
    }

    // ---- expressions ----

    private void NewPool()
    {
        var names = new List<Expr>();
        foreach (var n in PlainNames) names.Add(Name(n));
        if (_options.AllowIndexed)
        {
            names.Add(Indexed("x", 1));
            names.Add(Indexed("x", 2));
        }
        var count = 1 + Below(Math.Min(_options.MaxVariables, names.Count));
        _pool = [];
        for (var i = 0; i < count; i++)
        {
            var t = Below(names.Count);
            _pool.Add(names[t]);
            names.RemoveAt(t);
        }
        _scope.Clear();
    }

    /// <summary>A random expression whose expansion has total degree at most <paramref name="degree"/>.</summary>
    private Expr Generate(int depth, int size, int degree)
    {
        // The top two levels always branch, so that bare leaves stay rare.
        if (depth <= 0 || size <= 1 || (depth < _options.MaxDepth - 1 && Chance(1, 6))) return Leaf(degree);
        var choices = 8 + (_options.AllowBoundForms ? 2 : 0) + (_options.AllowSpecialFunctions ? 4 : 0) + (_options.AllowDivision ? 1 : 0);
        var c = Below(choices);
        var rest = size - 1;
        switch (c)
        {
            case 0 or 1:
            {
                var ls = Split(rest);
                var l = Generate(depth - 1, ls, degree);
                var r = Generate(depth - 1, rest - ls, degree);
                return c == 0 ? Add(l, r) : Sub(l, r);
            }
            case 2 or 3:
            {
                var ls = Split(rest);
                var ld = Below(degree + 1);
                return Mul(Generate(depth - 1, ls, ld), Generate(depth - 1, rest - ls, degree - ld));
            }
            case 4:
                return Neg(Generate(depth - 1, rest, degree));
            case 5 or 6:
            {
                var (e, _, max) = ParameterExpression(0, 4, 1, 4);
                return Pow(Generate(depth - 1, rest, degree / Math.Max(max, 1)), e);
            }
            case 7:
                return Leaf(degree);
        }
        c -= 8;
        if (_options.AllowBoundForms)
        {
            if (c < 2) return BoundForm(c == 0, depth, rest, degree);
            c -= 2;
        }
        if (_options.AllowSpecialFunctions)
        {
            if (c < 4) return Special(c, depth, rest, degree);
            c -= 4;
        }
        // Division by a nonzero integer constant.
        Expr divisor = Chance(1, 4) ? Neg(Int(1 + Below(12))) : Int(1 + Below(12));
        return Div(Generate(depth - 1, rest, degree), divisor);
    }

    private Expr BoundForm(bool isSum, int depth, int size, int degree)
    {
        if (_scope.Count == BoundNames.Length) return Leaf(degree);
        var k = FreshBoundName();
        var from = Below(2);
        Expr toExpr;
        int maxTo;
        var outer = _scope.Where(v => v.Max <= 4).ToList();
        if (outer.Count > 0 && Chance(1, 4))
        {
            // The upper end is an outer bound variable (possibly giving an empty range).
            var o = outer[Below(outer.Count)];
            toExpr = Name(o.Name);
            maxTo = Math.Max(o.Max, from);
        }
        else
        {
            maxTo = Chance(1, 8) ? from - 1 : from + Below(isSum ? 4 : 3);
            toExpr = Int(maxTo);
        }
        var length = Math.Max(1, maxTo - from + 1);
        _scope.Add((k, from, Math.Max(from, maxTo)));
        var body = Generate(depth - 1, size, isSum ? degree : degree / length);
        _scope.RemoveAt(_scope.Count - 1);
        return isSum ? Sum(k, Int(from), toExpr, body) : Prod(k, Int(from), toExpr, body);
    }

    private Expr Special(int which, int depth, int size, int degree)
    {
        switch (which)
        {
            case 0:
            {
                var (k, _, kMax) = ParameterExpression(-1, 3, 1, 3);
                return Call(Builtins.Binom, Generate(depth - 1, size, degree / Math.Max(kMax, 1)), k);
            }
            case 1:
            {
                var (n, _, nMax) = ParameterExpression(0, 4, 2, 4);
                return Call(Builtins.QInt, n, Generate(depth - 1, size, degree / Math.Max(nMax - 1, 1)));
            }
            case 2:
            {
                if (Chance(1, 3)) return Call(Builtins.Fact, Int(Below(9)));
                var (n, _, nMax) = ParameterExpression(0, 4, 2, 4);
                return Call(Builtins.QFact, n, Generate(depth - 1, size, degree / Math.Max(nMax * (nMax - 1) / 2, 1)));
            }
            default:
            {
                var (n, nMin, nMax) = ParameterExpression(0, 5, 2, 5);
                var (k, _, _) = ParameterExpression(-1, nMin + 1, 1, Math.Max(1, nMin - 1));
                return Call(Builtins.QBinom, n, k, Generate(depth - 1, size, degree / Math.Max(nMax * nMax / 4, 1)));
            }
        }
    }

    private Expr Leaf(int degree)
    {
        var r = Below(12);
        if (_scope.Count > 0 && r < 5)
        {
            var v = _scope[Below(_scope.Count)];
            // An index x[k] (when k stays within 0..4), or k as a coefficient.
            if (degree >= 1 && _options.AllowIndexed && v.Min >= 0 && v.Max <= 4 && r < 3) return Indexed("x", Name(v.Name));
            return Name(v.Name);
        }
        if (degree >= 1 && r < 9) return _pool[Below(_pool.Count)];
        if (_options.AllowLargeLiterals && Below(20) == 0) return LargeLiteral();
        return Below(6) == 0 ? Int(0) : Int(1 + Below(9));
    }

    private Expr LargeLiteral() => Int((BigInteger.One << 69) + new BigInteger(_random.NextUInt64()) * (1 + Below(100)));

    /// <summary>
    /// An integer parameter expression with values in [min, max] for every binding of the bound names in scope, and
    /// its value range; a literal is mostly drawn from the usual range [usualMin, usualMax] (which avoids the
    /// degenerate cases such as x^0, binom(x, 0), qbinom(2, 3, q)), and from [min, max] one time in eight.
    /// </summary>
    private (Expr Expression, int Min, int Max) ParameterExpression(int min, int max, int usualMin, int usualMax)
    {
        var candidates = new List<(Expr, int, int)>();
        foreach (var (name, lo, hi) in _scope)
        {
            candidates.Add((Name(name), lo, hi));
            candidates.Add((Add(Name(name), Int(1)), lo + 1, hi + 1));
            candidates.Add((Sub(Name(name), Int(1)), lo - 1, hi - 1));
            candidates.Add((Mul(Int(2), Name(name)), 2 * lo, 2 * hi));
        }
        candidates.RemoveAll(t => t.Item2 < min || t.Item3 > max);
        if (candidates.Count > 0 && Chance(1, 2)) return candidates[Below(candidates.Count)];
        var (low, high) = Chance(1, 8) ? (min, max) : (usualMin, usualMax);
        var value = low + Below(high - low + 1);
        return (Int(value), value, value);
    }

    private string FreshBoundName() => BoundNames.First(n => _scope.All(v => v.Name != n));

    private int Split(int total) => total <= 1 ? total : 1 + Below(total - 1);

    private int Below(int n) => n <= 1 ? 0 : (int)_random.NextBelow((ulong)n);

    private bool Chance(int numerator, int denominator) => Below(denominator) < numerator;
}
