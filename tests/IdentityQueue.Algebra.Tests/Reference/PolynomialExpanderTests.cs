using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Reference;

public class PolynomialExpanderTests
{
    private static readonly Expr Q = Name("q");
    private static readonly ReferencePolynomial QP = ReferencePolynomial.Variable("q");

    private static ReferencePolynomial Expand(Expr e, IReadOnlyDictionary<string, BigInteger>? parameters = null) =>
        new PolynomialExpander(parameters).Expand(e);

    private static Dictionary<string, BigInteger> Params(string name, int value) => new() { [name] = value };

    [Fact]
    public void Gaussian_binomial_4_2()
    {
        // [4 choose 2]_q = 1 + q + 2q² + q³ + q⁴ (Andrews, The Theory of Partitions (1976), ch. 3).
        var expected = 1 + QP + QP.Pow(2).Scale(2) + QP.Pow(3) + QP.Pow(4);
        Assert.Equal(expected, Expand(Call(Builtins.QBinom, Int(4), Int(2), Q)));
    }

    [Fact]
    public void Gaussian_binomials_at_q_1_are_binomials_and_vanish_outside_0_to_n()
    {
        // [n, k]_q at q = 1 is C(n, k) (common practice: the q-analogue specialises to the ordinary one).
        for (var n = 0; n <= 7; n++)
            for (var k = -1; k <= n + 1; k++)
            {
                var value = Expand(Call(Builtins.QBinom, Int(n), Int(k), Int(1)));
                Assert.Equal(ReferencePolynomial.Constant(ParameterEvaluator.Binomial(n, k < 0 || k > n ? -1 : k)), value);
            }
    }

    [Fact]
    public void Q_integers_and_q_factorials()
    {
        Assert.Equal(ReferencePolynomial.Zero, Expand(Call(Builtins.QInt, Int(0), Q)));
        Assert.Equal(1 + QP + QP.Pow(2), Expand(Call(Builtins.QInt, Int(3), Q)));
        // [3]_q! = 1 · (1+q) · (1+q+q²) = 1 + 2q + 2q² + q³.
        Assert.Equal(1 + QP.Scale(2) + QP.Pow(2).Scale(2) + QP.Pow(3), Expand(Call(Builtins.QFact, Int(3), Q)));
        Assert.Equal(ReferencePolynomial.One, Expand(Call(Builtins.QFact, Int(0), Q)));
        // qint(n, q)(1 − q) = 1 − q^n (finite geometric series).
        for (var n = 0; n <= 6; n++)
            Assert.True(PolynomialExpander.ExpandIdentity(Mul(Call(Builtins.QInt, Int(n), Q), Sub(Int(1), Q)), Sub(Int(1), Pow(Q, n))).IsZero);
    }

    [Fact]
    public void Row_sums_of_binomials_are_powers_of_two()
    {
        // Σ_{k=0..n} C(n, k) = 2^n (the binomial theorem at x = y = 1), with n a family parameter.
        var lhs = Sum("k", Int(0), Name("n"), Call(Builtins.Binom, Name("n"), Name("k")));
        var rhs = Pow(Int(2), Name("n"));
        for (var n = 0; n <= 12; n++)
        {
            Assert.True(PolynomialExpander.ExpandIdentity(lhs, rhs, Params("n", n)).IsZero);
            Assert.Equal(ReferencePolynomial.Constant(BigInteger.Pow(2, n)), Expand(lhs, Params("n", n)));
        }
    }

    [Fact]
    public void Chu_Vandermonde_for_n_3()
    {
        // Σ_k C(x, k) C(y, n−k) = C(x+y, n) as polynomials in x, y
        // (Graham, Knuth & Patashnik, Concrete Mathematics, (5.27) [memory]).
        var x = Name("x");
        var y = Name("y");
        Expr Vandermonde(Expr n) => Sum("k", Int(0), n, Mul(Call(Builtins.Binom, x, Name("k")), Call(Builtins.Binom, y, Sub(n, Name("k")))));
        var difference = PolynomialExpander.ExpandIdentity(Vandermonde(Int(3)), Call(Builtins.Binom, Add(x, y), Int(3)));
        Assert.True(difference.IsZero);
        // C(x+y, 3) = (x+y)(x+y−1)(x+y−2)/6 is a cubic with the coefficient 1/6 on x³.
        Assert.Equal(Rational.Create(1, 6), Expand(Call(Builtins.Binom, Add(x, y), Int(3))).CoefficientOf(("x", 3)));
        for (var n = 0; n <= 5; n++)
            Assert.True(PolynomialExpander.ExpandIdentity(Vandermonde(Name("n")), Call(Builtins.Binom, Add(x, y), Name("n")), Params("n", n)).IsZero);
        // Off by one in the range is false.
        Assert.False(PolynomialExpander.ExpandIdentity(Vandermonde(Int(3)), Call(Builtins.Binom, Add(x, y), Int(4))).IsZero);
    }

    [Fact]
    public void Vandermonde_determinant_3x3()
    {
        // det [x_i^(j−1)]_{i,j=1..3} = (x2 − x1)(x3 − x1)(x3 − x2) (Krattenthaler, Advanced determinant calculus (1999), (2.1) [memory]).
        var vandermonde = MatrixOf("i", Int(1), Int(3), "j", Int(1), Int(3), Pow(Indexed("x", Name("i")), Sub(Name("j"), Int(1))));
        Expr Xi(int i) => Indexed("x", i);
        var product = Mul(Mul(Sub(Xi(2), Xi(1)), Sub(Xi(3), Xi(1))), Sub(Xi(3), Xi(2)));
        var difference = PolynomialExpander.ExpandIdentity(Call(Builtins.Det, vandermonde), product);
        Assert.True(difference.IsZero);
        Assert.Equal(3, Expand(Call(Builtins.Det, vandermonde)).TotalDegree);
        Assert.Equal(6, Expand(Call(Builtins.Det, vandermonde)).TermCount); // 3! monomials, none cancel
    }

    [Fact]
    public void Vandermonde_determinant_5x5_is_the_product_of_differences()
    {
        // The same evaluation for n = 5, with the product over i < j written as nested prods.
        var vandermonde = MatrixOf("i", Int(1), Int(5), "j", Int(1), Int(5), Pow(Indexed("x", Name("i")), Sub(Name("j"), Int(1))));
        var product = Prod("j", Int(2), Int(5), Prod("i", Int(1), Sub(Name("j"), Int(1)), Sub(Indexed("x", Name("j")), Indexed("x", Name("i")))));
        Assert.True(PolynomialExpander.ExpandIdentity(Call(Builtins.Det, vandermonde), product).IsZero);
    }

    private static Expr SkewSymmetric(int n) => MatrixOf(Enumerable.Range(1, n).Select(i => Enumerable.Range(1, n).Select(j =>
        i == j ? Int(0) : i < j ? Indexed("a", i, j) : Neg(Indexed("a", j, i))).ToArray()).ToArray());

    [Fact]
    public void Pfaffian_squared_is_the_determinant_4x4()
    {
        // pf(A)² = det(A) for skew-symmetric A (Cayley, 1849); for n = 4, pf = a12 a34 − a13 a24 + a14 a23 [memory].
        var a = SkewSymmetric(4);
        Assert.True(PolynomialExpander.ExpandIdentity(Pow(Call(Builtins.Pfaffian, a), 2), Call(Builtins.Det, a)).IsZero);
        ReferencePolynomial A(int i, int j) => ReferencePolynomial.Variable($"a[{i},{j}]");
        Assert.Equal(A(1, 2) * A(3, 4) - A(1, 3) * A(2, 4) + A(1, 4) * A(2, 3), Expand(Call(Builtins.Pfaffian, a)));
    }

    [Fact]
    public void Pfaffian_squared_is_the_determinant_6x6()
    {
        // Same theorem (Cayley, 1849) for n = 6; pf has (6−1)!! = 15 terms.
        var a = SkewSymmetric(6);
        Assert.Equal(15, Expand(Call(Builtins.Pfaffian, a)).TermCount);
        Assert.True(PolynomialExpander.ExpandIdentity(Pow(Call(Builtins.Pfaffian, a), 2), Call(Builtins.Det, a)).IsZero);
    }

    [Fact]
    public void Matrix_laws()
    {
        var a = MatrixOf([[Name("a"), Name("b")], [Name("c"), Name("d")]]);
        var b = MatrixOf([[Name("e"), Name("f")], [Name("g"), Name("h")]]);
        // det(AB) = det A det B (Cauchy, 1812 [memory]); tr(AB) = tr(BA); (AB)^T = B^T A^T (common practice).
        Assert.True(PolynomialExpander.ExpandIdentity(Call(Builtins.Det, Mul(a, b)), Mul(Call(Builtins.Det, a), Call(Builtins.Det, b))).IsZero);
        Assert.True(PolynomialExpander.ExpandIdentity(Call(Builtins.Trace, Mul(a, b)), Call(Builtins.Trace, Mul(b, a))).IsZero);
        var transposed = PolynomialExpander.ExpandIdentity(Call(Builtins.Transpose, Mul(a, b)), Mul(Call(Builtins.Transpose, b), Call(Builtins.Transpose, a)));
        Assert.True(transposed.IsMatrix);
        Assert.True(transposed.IsZero);
        Assert.False(PolynomialExpander.ExpandIdentity(Mul(a, b), Mul(b, a)).IsZero);
        // Cayley–Hamilton for 2×2: A² − tr(A)·A + det(A)·id(2) = 0 (Cayley, 1858).
        var cayleyHamilton = Add(Sub(Pow(a, 2), Mul(Call(Builtins.Trace, a), a)), Mul(Call(Builtins.Det, a), Call(Builtins.Identity, Int(2))));
        Assert.True(PolynomialExpander.ExpandIdentity(cayleyHamilton, MatrixOf([[Int(0), Int(0)], [Int(0), Int(0)]])).IsZero);
        Assert.Equal(new PolynomialExpander().ExpandMatrix(Mul(Mul(a, a), a)), new PolynomialExpander().ExpandMatrix(Pow(a, 3)));
        Assert.Equal(ReferenceMatrix.Identity(2), new PolynomialExpander().ExpandMatrix(Pow(a, 0)));
        // perm [[a, b], [c, d]] = ad + bc; perm of the all-ones n×n matrix is n!.
        Assert.Equal(Expand(Add(Mul(Name("a"), Name("d")), Mul(Name("b"), Name("c")))), Expand(Call(Builtins.Permanent, a)));
        Assert.Equal(ReferencePolynomial.Constant(5040), Expand(Call(Builtins.Permanent, MatrixOf("i", Int(1), Int(7), "j", Int(1), Int(7), Int(1)))));
        // A sum of matrices: Σ_{k=1..3} k·id(2) = 6·id(2).
        Assert.True(PolynomialExpander.ExpandIdentity(Sum("k", Int(1), Int(3), Mul(Name("k"), Call(Builtins.Identity, Int(2)))), Mul(Int(6), Call(Builtins.Identity, Int(2)))).IsZero);
    }

    [Fact]
    public void Names_parameters_and_bound_forms()
    {
        // Empty ranges: sum 0, prod 1.
        Assert.Equal(ReferencePolynomial.Zero, Expand(Sum("k", Int(1), Int(0), Name("x"))));
        Assert.Equal(ReferencePolynomial.One, Expand(Prod("k", Int(1), Int(0), Name("x"))));
        // The bound name is an integer inside the body, in exponents, coefficients and indices; outside it is a variable.
        var body = Add(Mul(Name("k"), Pow(Name("x"), Name("k"))), Indexed("y", Name("k"), Add(Name("k"), Int(1))));
        var expected = ReferencePolynomial.Variable("x") + ReferencePolynomial.Variable("x").Pow(2).Scale(2)
            + ReferencePolynomial.Variable("y[1,2]") + ReferencePolynomial.Variable("y[2,3]");
        Assert.Equal(expected, Expand(Sum("k", Int(1), Int(2), body)));
        Assert.Equal(ReferencePolynomial.Variable("k"), Expand(Name("k")));
        // An inner binding shadows an outer one and is restored afterwards.
        var nested = Add(Sum("k", Int(1), Int(3), Sum("k", Int(10), Int(10), Name("k"))), Name("k"));
        Assert.Equal(30 + ReferencePolynomial.Constant(4), Expand(nested, Params("k", 4)));
        // binom with k < 0 is 0, with k = 0 is 1; binom(x, 2) = x(x−1)/2.
        Assert.Equal(ReferencePolynomial.Zero, Expand(Call(Builtins.Binom, Name("x"), Neg(Int(1)))));
        Assert.Equal(ReferencePolynomial.One, Expand(Call(Builtins.Binom, Name("x"), Int(0))));
        var x = ReferencePolynomial.Variable("x");
        Assert.Equal((x * (x - 1)).Scale(Rational.Create(1, 2)), Expand(Call(Builtins.Binom, Name("x"), Int(2))));
        Assert.Equal(ReferencePolynomial.Constant(3628800), Expand(Call(Builtins.Fact, Int(10))));
        // Division by a constant.
        Assert.Equal(x.Scale(Rational.Create(-1, 6)), Expand(Div(Name("x"), Neg(Mul(Int(2), Int(3))))));
    }

    [Fact]
    public void Invalid_input_is_reported()
    {
        var divide = Assert.Throws<ReferenceException>(() => Expand(Div(Int(1), Name("x"))));
        Assert.Contains("division by constants only", divide.Message);
        Assert.Throws<ReferenceException>(() => Expand(Div(Name("x"), Sub(Int(2), Int(2)))));
        Assert.Throws<ReferenceException>(() => Expand(Pow(Name("x"), Name("y"))));
        Assert.Throws<ReferenceException>(() => Expand(Pow(Name("x"), Neg(Int(1)))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.Det, MatrixOf("i", Int(1), Int(0), "j", Int(1), Int(2), Int(1)))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.Det, MatrixOf([[Int(1), Int(2)]]))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.Pfaffian, MatrixOf([[Int(0)]]))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.Pfaffian, MatrixOf([[Int(0), Int(1)], [Int(1), Int(0)]]))));
        Assert.Throws<ReferenceException>(() => Expand(Add(Name("x"), Call(Builtins.Identity, Int(2)))));
        Assert.Throws<ReferenceException>(() => PolynomialExpander.ExpandIdentity(Call(Builtins.Identity, Int(2)), Int(1)));
        Assert.Throws<ReferenceException>(() => PolynomialExpander.ExpandIdentity(Call(Builtins.Identity, Int(2)), Call(Builtins.Identity, Int(3))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.Fact, Neg(Int(1)))));
        Assert.Throws<ReferenceException>(() => Expand(Call(Builtins.QInt, Neg(Int(1)), Name("q"))));
    }

    [Fact]
    public void Family_entries_expand_instance_by_instance()
    {
        // n in 0..4, m in 0..n: C(n, m) = C(n, n − m) (symmetry of Pascal's triangle).
        var entry = new IdentityEntry("symmetry", Call(Builtins.Binom, Name("n"), Name("m")), Call(Builtins.Binom, Name("n"), Sub(Name("n"), Name("m"))),
            FieldSpec.Rationals, [new ParameterRange("n", Int(0), Int(4), At), new ParameterRange("m", Int(0), Name("n"), At)], 1, "");
        var instances = PolynomialExpander.ExpandInstances(entry).ToList();
        Assert.Equal(15, instances.Count);
        Assert.All(instances, i => Assert.True(i.Difference.IsZero));
        Assert.Equal(new BigInteger(4), instances[^1].Parameters["n"]);
    }

    [Fact]
    public void Identities_over_gf_p_reduce_coefficients()
    {
        // (x + y)^3 = x^3 + y^3 holds over GF(3) but not over Q or GF(5).
        var lhs = Pow(Add(Name("x"), Name("y")), 3);
        var rhs = Add(Pow(Name("x"), 3), Pow(Name("y"), 3));
        var difference = PolynomialExpander.ExpandIdentity(lhs, rhs);
        Assert.False(difference.IsZero);
        Assert.True(difference.IsZeroModulo(3));
        Assert.False(difference.IsZeroModulo(5));
    }

    [Fact]
    public void Parameter_evaluator()
    {
        var env = new Dictionary<string, BigInteger> { ["n"] = 6 };
        BigInteger Eval(Expr e) => ParameterEvaluator.Evaluate(e, env);
        Assert.Equal(new BigInteger(3), Eval(Div(Name("n"), Int(2))));
        Assert.Equal(new BigInteger(-35), Eval(Sub(Neg(Pow(Int(2), Int(5))), Int(3))));
        Assert.Equal(new BigInteger(720), Eval(Call(Builtins.Fact, Name("n"))));
        Assert.Equal(new BigInteger(15), Eval(Call(Builtins.Binom, Name("n"), Int(2))));
        Assert.Equal(new BigInteger(6), Eval(Call(Builtins.Binom, Neg(Int(3)), Int(2)))); // (−3)(−4)/2
        Assert.Equal(BigInteger.Zero, Eval(Call(Builtins.Binom, Name("n"), Neg(Int(1)))));
        Assert.Contains("not an integer", Assert.Throws<ReferenceException>(() => Eval(Div(Name("n"), Int(4)))).Message);
        Assert.Contains("'x'", Assert.Throws<ReferenceException>(() => Eval(Add(Name("x"), Int(1)))).Message);
        Assert.Throws<ReferenceException>(() => Eval(Pow(Int(2), Neg(Int(1)))));
        Assert.Throws<ReferenceException>(() => Eval(Div(Int(1), Int(0))));
        Assert.Throws<ReferenceException>(() => Eval(Indexed("x", 1)));
        Assert.Throws<ReferenceException>(() => Eval(Call(Builtins.QInt, Int(2), Int(2))));
        Assert.Throws<ReferenceException>(() => Eval(Sum("k", Int(1), Int(2), Name("k"))));
    }
}
