using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>
/// The terms of a sum that are monomials written out (<c>3*x^2*y</c>, <c>-x*z/2</c>: integer coefficients, variables, literal
/// exponents), lowered together: every distinct monomial once, in ascending degree, each from an already built one times
/// one power where it can (x^2·y·z from x^2·y, or from y·z times x^2), so an expanded polynomial costs about one product
/// per term plus its coefficient and its '+'. Its monomial keys are strings (a packed key would be faster).
/// </summary>
internal sealed class MonomialSums(LoweringContext context)
{
    private readonly ProgramBuilder _b = context.Builder;

    /// <summary>A term c·Π x_v^e_v: its exact coefficient, its (variable register, exponent) pairs by register, and their key.</summary>
    public sealed record Monomial(Rational Coefficient, (int Variable, int Exponent)[] Powers, string Key, long Degree);

    /// <summary>
    /// A sum whose every term is a monomial: the monomials of equal coefficient (up to sign) are added first and multiplied
    /// by their coefficient once, Σ_c c·(Σ ±m), so a coefficient shared by many terms (multinomials, small integers) costs
    /// one product and one constant. Addition is exact in a field, so the order does not change the value.
    /// </summary>
    public int SumOfMonomials(IReadOnlyList<SumTerm> terms, Monomial[] monomials, Dictionary<string, int> registers)
    {
        var groups = new Dictionary<Rational, int>(); // |coefficient| → the running sum of its ±monomials
        var order = new List<Rational>();
        for (var i = 0; i < terms.Count; i++)
        {
            context.Step(terms[i].Value);
            var m = monomials[i];
            if (m.Coefficient.IsZero) continue;
            var magnitude = m.Coefficient.Sign < 0 ? -m.Coefficient : m.Coefficient;
            var subtract = terms[i].Subtract != (m.Coefficient.Sign < 0);
            var value = m.Key.Length == 0 ? _b.Constant(Rational.One) : registers[m.Key];
            if (groups.TryGetValue(magnitude, out var sum)) groups[magnitude] = subtract ? _b.Subtract(sum, value) : _b.Add(sum, value);
            else
            {
                groups[magnitude] = subtract ? _b.Negate(value) : value;
                order.Add(magnitude);
            }
        }
        var acc = -1;
        foreach (var c in order)
        {
            var part = _b.Multiply(groups[c], _b.Constant(c));
            acc = acc < 0 ? part : _b.Add(acc, part);
        }
        return acc < 0 ? _b.Constant(Rational.Zero) : acc;
    }

    /// <summary>
    /// Reads the monomial terms of a sum (null for the others) and builds the register of every distinct monomial, by
    /// ascending degree; false when fewer than two terms are monomials (nothing to share).
    /// </summary>
    public bool BuildMonomials(IReadOnlyList<SumTerm> terms, Monomial?[] monomials, Dictionary<string, int> registers)
    {
        var count = 0;
        for (var i = 0; i < terms.Count; i++)
            if ((monomials[i] = ReadMonomial(terms[i].Value)) is not null) count++;
        if (count < 2) return false;
        var order = monomials.Where(m => m is not null && m.Key.Length > 0).Select(m => m!).DistinctBy(m => m.Key).OrderBy(m => m.Degree).ToList();
        foreach (var m in order) registers[m.Key] = BuildMonomial(m.Powers, registers);
        return true;
    }

    /// <summary>One monomial from the ones built so far: a parent with one exponent one lower, or without one variable, times one power; else prefix by prefix.</summary>
    private int BuildMonomial((int Variable, int Exponent)[] powers, Dictionary<string, int> registers)
    {
        if (powers.Length == 1) return _b.Power(powers[0].Variable, powers[0].Exponent);
        for (var j = 0; j < powers.Length; j++)
        {
            var (v, e) = powers[j];
            var key = e > 1 ? KeyOf(powers.Select((p, k) => k == j ? (v, e - 1) : p)) : KeyOf(powers.Where((_, k) => k != j));
            if (registers.TryGetValue(key, out var r)) return _b.Multiply(r, v);
        }
        for (var j = 0; j < powers.Length; j++)
        {
            var (v, e) = powers[j];
            if (e > 1 && registers.TryGetValue(KeyOf(powers.Where((_, k) => k != j)), out var r)) return _b.Multiply(r, _b.Power(v, e));
        }
        var acc = _b.Power(powers[0].Variable, powers[0].Exponent);
        for (var k = 1; k < powers.Length; k++)
        {
            var key = KeyOf(powers.Take(k + 1));
            if (!registers.TryGetValue(key, out var prefix))
            {
                prefix = _b.Multiply(acc, _b.Power(powers[k].Variable, powers[k].Exponent));
                if (k < powers.Length - 1) registers[key] = prefix;
            }
            acc = prefix;
        }
        return acc;
    }

    private static string KeyOf(IEnumerable<(int Variable, int Exponent)> powers) =>
        string.Join('*', powers.Select(p => p.Exponent == 1 ? $"{p.Variable}" : $"{p.Variable}^{p.Exponent}"));

    /// <summary>
    /// The term as a monomial, or null: an optional minus, then factors that are integer literals, divisions by nonzero
    /// integer literals, variables (names not bound here) and variables to literal exponents up to MaxChainedExponent.
    /// Only the variables' registers are made here; anything else is left to the ordinary visit.
    /// </summary>
    private Monomial? ReadMonomial(Expr term)
    {
        var coefficient = Rational.One;
        while (term is UnaryExpr { Operator: UnaryOperator.Negate } negation)
        {
            coefficient = -coefficient;
            term = negation.Operand;
        }
        IReadOnlyList<ProductFactor> factors = term is ProductExpr product ? product.Factors : [new ProductFactor(term, false, term.Position)];
        var names = new List<(NameRef Name, int Exponent)>(factors.Count);
        var scope = context.Scope;
        foreach (var factor in factors)
        {
            switch (factor.Value)
            {
                case IntegerLiteral literal when !factor.Divide:
                    coefficient *= literal.Value;
                    break;
                case IntegerLiteral { Value.IsZero: false } literal:
                    coefficient /= literal.Value;
                    break;
                case NameRef name when !factor.Divide && !scope.ContainsKey(name.Name):
                    names.Add((name, 1));
                    break;
                case BinaryExpr { Operator: BinaryOperator.Power, Left: NameRef name, Right: IntegerLiteral exponent }
                    when !factor.Divide && !scope.ContainsKey(name.Name) && exponent.Value.Sign > 0 && exponent.Value <= ProgramBuilder.MaxChainedExponent:
                    names.Add((name, (int)exponent.Value));
                    break;
                default:
                    return null;
            }
        }
        var powers = new SortedDictionary<int, int>();
        foreach (var (name, exponent) in names)
        {
            var register = context.Name(name);
            powers[register] = powers.GetValueOrDefault(register) + exponent;
        }
        var pairs = powers.Select(p => (p.Key, p.Value)).ToArray();
        return new Monomial(coefficient, pairs, KeyOf(pairs), pairs.Sum(p => (long)p.Item2));
    }
}
