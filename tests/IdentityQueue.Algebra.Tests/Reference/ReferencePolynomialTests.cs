using System.Numerics;
using IdentityQueue.Algebra.Exact;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Reference;

public class ReferencePolynomialTests
{
    private static readonly ReferencePolynomial X = ReferencePolynomial.Variable("x");
    private static readonly ReferencePolynomial Y = ReferencePolynomial.Variable("y");

    [Fact]
    public void Binomial_theorem_coefficients_are_pascals_triangle()
    {
        // (x + y)^n = Σ_k C(n, k) x^k y^(n−k); C(n, k) is row n of Pascal's triangle, built here by the additive
        // rule C(n, k) = C(n−1, k−1) + C(n−1, k) (Pascal, Traité du triangle arithmétique, 1665 [memory]).
        var row = new List<BigInteger> { 1 };
        for (var n = 0; n <= 12; n++)
        {
            var power = (X + Y).Pow(n);
            Assert.Equal(n + 1, power.TermCount);
            Assert.Equal(n, power.TotalDegree);
            for (var k = 0; k <= n; k++)
                Assert.Equal(new Rational(row[k]), power.CoefficientOf(("x", k), ("y", n - k)));
            var next = new List<BigInteger> { 1 };
            for (var k = 1; k <= n; k++) next.Add(row[k - 1] + row[k]);
            next.Add(1);
            row = next;
        }
    }

    [Fact]
    public void Two_squares_identity_expands_to_zero()
    {
        // (a²+b²)(c²+d²) = (ac−bd)² + (ad+bc)² (Brahmagupta, Brāhmasphuṭasiddhānta, 628; Fibonacci, Liber Quadratorum, 1225).
        var (a, b, c, d) = (Name("a"), Name("b"), Name("c"), Name("d"));
        var lhs = Mul(Add(Pow(a, 2), Pow(b, 2)), Add(Pow(c, 2), Pow(d, 2)));
        var rhs = Add(Pow(Sub(Mul(a, c), Mul(b, d)), 2), Pow(Add(Mul(a, d), Mul(b, c)), 2));
        var difference = PolynomialExpander.ExpandIdentity(lhs, rhs);
        Assert.True(difference.IsZero);
        Assert.Equal(-1, difference.Scalar!.TotalDegree);
    }

    [Fact]
    public void Two_squares_identity_with_the_wrong_sign_is_off_by_exactly_4abcd()
    {
        // With ac+bd in place of ac−bd: (ac+bd)² + (ad+bc)² − (a²+b²)(c²+d²) = 4abcd (expand both squares:
        // the cross terms 2abcd no longer cancel), so lhs − rhs as written above is −4abcd.
        var (a, b, c, d) = (Name("a"), Name("b"), Name("c"), Name("d"));
        var product = Mul(Add(Pow(a, 2), Pow(b, 2)), Add(Pow(c, 2), Pow(d, 2)));
        var squares = Add(Pow(Add(Mul(a, c), Mul(b, d)), 2), Pow(Add(Mul(a, d), Mul(b, c)), 2));
        var fourAbcd = ReferencePolynomial.Term(4, Monomial.Of(("a", 1), ("b", 1), ("c", 1), ("d", 1)));
        Assert.Equal(fourAbcd, PolynomialExpander.ExpandIdentity(squares, product).Scalar);
        Assert.Equal(-fourAbcd, PolynomialExpander.ExpandIdentity(product, squares).Scalar);
        Assert.Equal("4*a*b*c*d", fourAbcd.ToString());
    }

    [Fact]
    public void Zero_polynomial_conventions()
    {
        var zero = X - X;
        Assert.True(zero.IsZero);
        Assert.Equal(ReferencePolynomial.Zero, zero);
        Assert.Equal(-1, zero.TotalDegree); // common practice (some authors use −∞)
        Assert.Equal(double.NegativeInfinity, zero.OneNormLog2());
        Assert.Equal("0", zero.ToString());
        Assert.Equal(0, ReferencePolynomial.Constant(7).TotalDegree);
        Assert.True(zero.TryGetConstant(out var value) && value.IsZero);
    }

    [Fact]
    public void One_norm_is_taken_after_clearing_denominators()
    {
        // x/2 + y/3 − 1/6 cleared by lcm 6 is 3x + 2y − 1, whose 1-norm is 6.
        var p = X.Scale(Rational.Create(1, 2)) + Y.Scale(Rational.Create(1, 3)) - ReferencePolynomial.Constant(Rational.Create(1, 6));
        Assert.Equal(new BigInteger(6), p.DenominatorLcm());
        Assert.Equal(Math.Log2(6), p.OneNormLog2(), 12);
        // (x + y)^10 has 1-norm 2^10 (the sum of a row of Pascal's triangle).
        Assert.Equal(10, (X + Y).Pow(10).OneNormLog2(), 9);
    }

    [Fact]
    public void Arithmetic_equality_and_text()
    {
        var p = (X + 1) * (X - 1);
        Assert.Equal(X.Pow(2) - 1, p);
        Assert.Equal(p.GetHashCode(), (X.Pow(2) - 1).GetHashCode());
        Assert.NotEqual(p, X.Pow(2) + 1);
        Assert.Equal("x^2 - 1", p.ToString());
        var q = ReferencePolynomial.Variable("x[3]").Pow(2) * ReferencePolynomial.Variable("a[1,2]").Scale(Rational.Create(-2, 3)) + X;
        Assert.Equal("-2/3*a[1,2]*x[3]^2 + x", q.ToString());
        Assert.Equal(["a[1,2]", "x", "x[3]"], q.Variables);
        Assert.Equal(2, q.DegreeIn("x[3]"));
        Assert.Equal(ReferencePolynomial.One, X.Pow(0));
        Assert.Equal(ReferencePolynomial.One, ReferencePolynomial.Zero.Pow(0));
        Assert.Equal(ReferencePolynomial.Zero, ReferencePolynomial.Zero.Pow(3));
    }

    [Fact]
    public void Evaluation_in_a_field_and_over_q()
    {
        var field = new TestPrimeField(101);
        var p = X.Pow(3).Scale(Rational.Create(1, 2)) - Y + 5; // x³/2 − y + 5
        var point = new Dictionary<string, TestResidue> { ["x"] = new(3), ["y"] = new(100) };
        // 27/2 − 100 + 5 ≡ 27·51 + 1 + 5 = 1383 ≡ 1383 − 13·101 = 70 (mod 101), since 2·51 = 102 ≡ 1.
        Assert.Equal(new TestResidue(70), p.Evaluate<TestPrimeField, TestResidue>(field, point));
        Assert.Equal(Rational.Create(-117, 2), p.Evaluate(new Dictionary<string, Rational> { ["x"] = 3, ["y"] = 77 }));
        var half = ReferencePolynomial.Constant(Rational.Create(1, 2));
        Assert.False(half.TryEvaluate<TestPrimeField, TestResidue>(new TestPrimeField(2), point, out _));
        Assert.Throws<ReferenceException>(() => X.Evaluate<TestPrimeField, TestResidue>(field, new Dictionary<string, TestResidue>()));
    }

    [Fact]
    public void Reduction_modulo_a_prime()
    {
        // (x + y)^5 ≡ x^5 + y^5 over GF(5) (the binomial coefficients C(5,k), 0<k<5, are divisible by 5).
        Assert.Equal(X.Pow(5) + Y.Pow(5), (X + Y).Pow(5).ReduceModulo(5));
        Assert.Equal(ReferencePolynomial.Constant(4), ReferencePolynomial.Constant(Rational.Create(1, 3)).ReduceModulo(11));
        Assert.Throws<ReferenceException>(() => ReferencePolynomial.Constant(Rational.Create(1, 3)).ReduceModulo(3));
    }

    [Fact]
    public void Test_prime_field_arithmetic()
    {
        var f = new TestPrimeField(TestPrimeField.Mersenne31);
        Assert.Equal(new TestResidue(TestPrimeField.Mersenne31 - 1), f.FromInteger(-1));
        Assert.Equal(f.One, f.Multiply(f.FromInteger(-1), f.FromInteger(-1)));
        Assert.True(f.TryInvert(f.FromInteger(12345), out var inverse));
        Assert.Equal(f.One, f.Multiply(inverse, f.FromInteger(12345)));
        Assert.False(f.TryInvert(f.FromInteger(TestPrimeField.Mersenne31), out _));
        Assert.Equal(f.FromInteger(7), f.MultiplyAdd(f.FromInteger(2), f.FromInteger(3), f.FromInteger(1)));
        Assert.Throws<ArgumentException>(() => new TestPrimeField(91));
    }
}
