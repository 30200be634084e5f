using System.Numerics;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening.HandOff;

namespace IdentityQueue.Screening.Tests.HandOff;

/// <summary>
/// The SMT-LIB translation: what the script declares and asserts, checked by reading it back and evaluating its terms
/// exactly at random rational points (<see cref="SmtScript"/>), and the limits that skip a candidate.
/// </summary>
public sealed class SmtLibWriterTests
{
    private static readonly HandOffCandidate Sample = new(7, "sample", null, null, "x", "x", "Q", "survived", "1", -70.25, 4);

    private static SmtScript Script(string identity, IReadOnlyDictionary<string, BigInteger>? parameters = null, HandOffLimits? limits = null)
    {
        var translation = SmtLibWriter.Translate(Some.Entry(identity), parameters, limits);
        Assert.True(translation.Success, translation.Error?.Message);
        return new SmtScript(SmtLibWriter.Script(Sample, translation.Value!));
    }

    private static string Skip(string identity, IReadOnlyDictionary<string, BigInteger>? parameters = null, HandOffLimits? limits = null)
    {
        var translation = SmtLibWriter.Translate(Some.Entry(identity), parameters, limits);
        Assert.False(translation.Success);
        return translation.Error!.Message;
    }

    /// <summary>Whether the sides of every entry agree at <paramref name="points"/> random rational points where no divisor vanishes.</summary>
    private static bool AgreesAtRandomPoints(SmtScript script, int points = 12, int seed = 5)
    {
        var random = new Random(seed);
        var checkedPoints = 0;
        for (var attempt = 0; checkedPoints < points && attempt < 10 * points; attempt++)
        {
            var point = script.Declared.ToDictionary(v => v.Trim('|'), _ => Rational.Create(random.Next(-50, 50), random.Next(1, 7)));
            if (script.Divisors.Any(d => script.Evaluate(d, point).IsZero)) continue;
            checkedPoints++;
            if (script.Differences.Any(p => script.Evaluate(p.Left, point) != script.Evaluate(p.Right, point))) return false;
        }
        Assert.Equal(points, checkedPoints);
        return true;
    }

    private static Dictionary<string, BigInteger> N(int n) => new() { ["n"] = n };

    [Theory]
    // Negative exponents become divisions (asserted nonzero), and integer and number functions of parameters exact constants;
    // each identity is published (see CheckPublishedIdentitiesTests) and its perturbation is not.
    [InlineData("(-1)^n*x^(-n)*(x^2 + x)^n = (-x - 1)^n", "(-1)^n*x^(-n)*(x^2 + x)^n = (x + 1)^n")]
    [InlineData("qbinom(n, 2, 1/q) = q^(-2*(n-2))*qbinom(n, 2, q)", "qbinom(n, 2, 1/q) = q^(2*(n-2))*qbinom(n, 2, q)")]
    [InlineData("x^n = sum(k in 0..n: stirling2(n, k)*fact(k)*binom(x, k))", "x^n = sum(k in 0..n: stirling1(n, k)*fact(k)*binom(x, k))")]
    [InlineData("sum(k in 0..floor(n/2): binom(n, 2*k)*x^(2*k)) = ((1+x)^n + (1-x)^n)/2", "sum(k in 0..ceil(n/2): binom(n, 2*k)*x^(2*k)) = ((1+x)^n - (1-x)^n)/2")]
    [InlineData("det(matrix(i in 1..n, j in 1..n: iverson(j <= i)*x[i]^j + delta(i, j))) = prod(i in 1..n: x[i]^i + 1)",
        "det(matrix(i in 1..n, j in 1..n: iverson(j <= i)*x[i]^j)) = prod(i in 1..n: x[i]^i + 1)")]
    [InlineData("y*(fib(n-1)*fib(n+1) - fib(n)^2) = y*(-1)^n + 0*harmonic(n) + 0*bernoulli(n) + 0*catalan(n) + 0*lucas(n) + 0*multinomial(n, 2)",
        "y*(fib(n-1)*fib(n+1) - fib(n)^2) = y*(-1)^(n+1)")]
    [InlineData("when(n > 3, x, y) + min(n, 2)*x = when(n <= 3, y, x) + 2*x + 0*(max(n, 1) + mod(n, 3) + gcd(n, 6) + abs(-n))",
        "when(n > 3, x, y) + min(n, 2)*x = when(n <= 3, x, y) + 2*x")]
    public void NewConstructs_TranslateToTheSameValues(string identity, string perturbed)
    {
        Assert.True(AgreesAtRandomPoints(Script(identity, N(5))), identity);
        Assert.False(AgreesAtRandomPoints(Script(perturbed, N(5))), perturbed);
    }

    [Fact]
    public void Script_DeclaresEveryVariable_QuotesIndexedNames_AndEndsWithCheckSat()
    {
        var text = SmtLibWriter.Script(Sample, SmtLibWriter.Translate(Some.Entry("x[3]*a[1,2] + y = y + a[1,2]*x[3]")).Value!);
        var script = new SmtScript(text);
        Assert.Equal("QF_NRA", script.Logic);
        Assert.Equal(["|x[3]|", "|a[1,2]|", "y"], script.Declared);
        Assert.Equal(1, script.CheckSats);
        Assert.EndsWith("(check-sat)\n", text);
        var used = script.Assertions.SelectMany(SmtScript.Symbols).Where(s => !s.StartsWith("t!", StringComparison.Ordinal)).ToHashSet();
        Assert.Subset(script.Declared.ToHashSet(), used);
    }

    [Fact]
    public void FlatSumOfTenThousandTermsTranslatesAndAgrees()
    {
        // Issue #18: a long flat chain is one n-ary node, walked in a loop; (a_1 + … + a_n)·y = a_1·y + … + a_n·y.
        var names = Enumerable.Range(1, 10_000).Select(i => $"a{i}").ToList();
        var script = Script($"({string.Join(" + ", names)})*y = {string.Join(" + ", names.Select(a => $"{a}*y"))}");
        Assert.Equal(10_001, script.Declared.Count);
        Assert.True(AgreesAtRandomPoints(script, points: 2));
        var wrong = Script($"({string.Join(" + ", names)})*y = {string.Join(" + ", names.Select(a => a == "a5000" ? "a5000" : $"{a}*y"))}");
        Assert.False(AgreesAtRandomPoints(wrong, points: 2));
    }

    [Fact]
    public void Header_NamesTheCandidateItsEvidenceAndTheCaution()
    {
        var c = new HandOffCandidate(12, "vdm[n=3]", "vdm", "{\"n\":3}", "det(x)", "y", "Q", "survived", "3", -70.25, 5);
        var header = SmtLibWriter.Header(c);
        Assert.All(header.TrimEnd('\n').Split('\n'), line => Assert.StartsWith("; ", line));
        Assert.Contains("candidate 12: vdm[n=3]", header);
        Assert.Contains("family vdm, params {\"n\":3}", header);
        Assert.Contains("degree bound 3, 5 trials, error bound 2^-70.2", header);
        Assert.Contains("very likely true, not proven", header);
    }

    [Fact]
    public void SymbolsThatASolverMightReserve_AreQuoted_PlainNamesAreNot()
    {
        var script = Script("pi + alpha + x_1 + α = α + x_1 + alpha + pi");
        Assert.Equal(["|pi|", "alpha", "x_1", "|α|"], script.Declared);
    }

    // Euclid, Elements II.4 (the square of a sum, in geometric form) [memory]
    [Fact]
    public void SquareOfASum_ExpandsIntoAgreeingSides()
    {
        var script = Script("(a+b)^2 = a^2 + 2*a*b + b^2");
        Assert.Empty(script.Divisors);
        Assert.True(AgreesAtRandomPoints(script));
    }

    // common practice: (x+y)^2 − (x^2 + y^2) = 2xy
    [Fact]
    public void FalseIdentity_HasSidesThatDisagree()
    {
        Assert.False(AgreesAtRandomPoints(Script("(x+y)^2 = x^2 + y^2")));
    }

    // Partial fractions, 1/(k(k+1)) = 1/k − 1/(k+1): Graham, Knuth, Patashnik, Concrete Mathematics, §2.6 [memory]
    [Fact]
    public void Division_AssertsEveryDivisorNonzero_AndComparesOverACommonDenominator()
    {
        var text = SmtLibWriter.Script(Sample, SmtLibWriter.Translate(Some.Entry("1/(x*(x+1)) = 1/x - 1/(x+1)")).Value!);
        Assert.Contains("(assert (not (= x 0)))", text);
        Assert.Contains("(assert (not (= (+ x 1) 0)))", text);
        Assert.Contains("(assert (not (= (* x (+ x 1)) 0)))", text);
        var script = new SmtScript(text);
        Assert.Equal(3, script.Divisors.Count());
        Assert.True(AgreesAtRandomPoints(script));
        Assert.False(AgreesAtRandomPoints(Script("1/(x*(x+1)) = 1/x + 1/(x+1)")));
    }

    [Fact]
    public void DivisionByAConstant_IsARationalCoefficient_NotADivisor()
    {
        var text = SmtLibWriter.Script(Sample, SmtLibWriter.Translate(Some.Entry("x/2 - y/3 = (3*x - 2*y)/6")).Value!);
        Assert.Contains("(/ 1 2)", text);
        Assert.Empty(new SmtScript(text).Divisors);
        Assert.True(AgreesAtRandomPoints(new SmtScript(text)));
    }

    // The matrix constructs expand into agreeing sides (sympy 1.11 for the 2×2 inverse and adjugate, Matrix.inv() and
    // Matrix.adjugate(); Cayley (1849) pf² = det for the 4×4 skew matrix S − Sᵀ; the rest common practice); with a wrong
    // right-hand side they disagree.
    [Theory]
    [InlineData("inv([[a, b], [c, d]]) = [[d/(a*d - b*c), -b/(a*d - b*c)], [-c/(a*d - b*c), a/(a*d - b*c)]]", "inv([[a, b], [c, d]]) = [[d, -b], [-c, a]]")]
    [InlineData("adj([[a, b], [c, d]]) = [[d, -b], [-c, a]]", "adj([[a, b], [c, d]]) = [[d, b], [c, a]]")]
    [InlineData("adj(matrix(i in 1..3, j in 1..3: x[i,j]))*matrix(i in 1..3, j in 1..3: x[i,j]) = det(matrix(i in 1..3, j in 1..3: x[i,j]))*id(3)", "adj(matrix(i in 1..3, j in 1..3: x[i,j])) = id(3)")]
    [InlineData("minor(matrix(i in 1..3, j in 1..4: x[i,j]), [1, 3], [2..3]) = x[1,2]*x[3,3] - x[1,3]*x[3,2]", "minor(matrix(i in 1..3, j in 1..4: x[i,j]), [1, 3], [2..3]) = x[1,2]*x[3,3]")]
    [InlineData("([[a, b], [c, d]]*[[e, f], [g, h]])[2,1] = c*e + d*g", "([[a, b], [c, d]]*[[e, f], [g, h]])[2,1] = c*e")]
    [InlineData("diag(a, b)*[[c, d], [e, f]] + zero(2) = [[a*c, a*d], [b*e, b*f]]", "diag(a, b) = [[a, b], [0, 0]]")]
    [InlineData("pf(matrix(i in 1..4, j in 1..4: s[i,j]) - transpose(matrix(i in 1..4, j in 1..4: s[i,j])))^2 = det(matrix(i in 1..4, j in 1..4: s[i,j]) - transpose(matrix(i in 1..4, j in 1..4: s[i,j])))", "pf(matrix(i in 1..4, j in 1..4: s[i,j]) - transpose(matrix(i in 1..4, j in 1..4: s[i,j]))) = 0")]
    [InlineData("det(zero(0)) + perm(id(0)) + pf(zero(0)) = 3", "det(zero(0)) = 0")]
    public void MatrixConstructs_ExpandIntoAgreeingSides(string identity, string wrong)
    {
        Assert.True(AgreesAtRandomPoints(Script(identity)));
        Assert.False(AgreesAtRandomPoints(Script(wrong)));
    }

    // inv divides by the determinant: asserted nonzero like every divisor. Two 0×0 matrices cannot differ: (assert false).
    [Fact]
    public void Inverse_AssertsItsDeterminantNonzero_AndEmptyMatricesAssertFalse()
    {
        Assert.Single(Script("inv([[a, b], [c, d]])*[[a, b], [c, d]] = id(2)").Divisors);
        var empty = SmtLibWriter.Script(Sample, SmtLibWriter.Translate(Some.Entry("zero(0) = id(0)")).Value!);
        Assert.Contains("(assert false)", empty);
    }

    // A Pfaffian's argument skew-symmetric only as values: its conditions ([i,j] + [j,i] = 0) are part of the obligation,
    // so a matrix that is not skew-symmetric gives a script whose negation holds somewhere.
    [Fact]
    public void PfaffianOfAMatrixSkewOnlyAsValues_CarriesTheSkewConditions()
    {
        Assert.True(AgreesAtRandomPoints(Script("pf([[0, a - b], [b - a, 0]]) = a - b")));
        var notSkew = Script("pf([[0, a], [b, 0]]) = a");
        Assert.Equal(2, notSkew.Differences.Count());
        Assert.False(AgreesAtRandomPoints(notSkew));
    }

    // Vandermonde determinant: Knuth, TAOCP vol. 1, §1.2.3 exercise 37 [memory]
    [Theory]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(5)]
    public void Vandermonde_WithTheFamilyParameterFixed(int n)
    {
        var script = Script("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[j] - x[i]))", N(n));
        Assert.Equal(Enumerable.Range(1, n).Select(i => $"|x[{i}]|"), script.Declared);
        Assert.True(AgreesAtRandomPoints(script));
        // reversed factors: the sign (−1)^C(n,2) (from the above)
        var reversed = Script("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[i] - x[j]))", N(n));
        Assert.Equal(n * (n - 1) / 2 % 2 == 0, AgreesAtRandomPoints(reversed));
    }

    // Pfaffian squared is the determinant of a skew-symmetric matrix: Cayley (1849) [memory]; pf of order 4 is
    // a12·a34 − a13·a24 + a14·a23 (the same source)
    [Fact]
    public void Pfaffian_SquaredIsTheDeterminant_AndHasTheThreeTermExpansion()
    {
        const string m = "[[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]]";
        Assert.True(AgreesAtRandomPoints(Script($"pf({m})^2 = det({m})")));
        Assert.True(AgreesAtRandomPoints(Script($"pf({m}) = a*f - b*e + c*d")));
        Assert.False(AgreesAtRandomPoints(Script($"pf({m}) = a*f + b*e + c*d")));
    }

    // Permanent of the all-ones n×n matrix is n! (common practice); perm [[a,b],[c,d]] = ad + bc (definition)
    [Fact]
    public void Permanent_IsExpandedWithoutSigns()
    {
        Assert.True(AgreesAtRandomPoints(Script("perm([[a,b],[c,d]]) = a*d + b*c")));
        Assert.True(AgreesAtRandomPoints(Script("perm(matrix(i in 1..n, j in 1..n: 1)) = fact(n)", N(5))));
    }

    // Cauchy–Binet for a 2×3 times a 3×2 matrix: Horn & Johnson, Matrix Analysis, §0.8.7 [memory]
    [Fact]
    public void CauchyBinet_WithMatrixProducts()
    {
        var script = Script("det([[a,b,c],[d,e,f]]*[[g,h],[i,j],[k,l]]) = " +
            "det([[a,b],[d,e]])*det([[g,h],[i,j]]) + det([[a,c],[d,f]])*det([[g,h],[k,l]]) + det([[b,c],[e,f]])*det([[i,j],[k,l]])");
        Assert.True(AgreesAtRandomPoints(script));
    }

    // Cayley–Hamilton for 2×2 matrices: Cayley, Phil. Trans. 148 (1858)
    [Fact]
    public void MatrixIdentity_AssertsThatSomeEntryDiffers()
    {
        var script = Script("[[a,b],[c,d]]^2 - tr([[a,b],[c,d]])*[[a,b],[c,d]] + det([[a,b],[c,d]])*id(2) = 0");
        Assert.Equal(4, script.Differences.Count());
        Assert.Equal("or", ((List<object>)script.Assertions[^1])[0]);
        Assert.True(AgreesAtRandomPoints(script));
        Assert.False(AgreesAtRandomPoints(Script("transpose([[a,b],[c,d]]) = [[a,b],[c,d]]")));
    }

    // Gaussian binomial [4,2]_q = 1 + q + 2q^2 + q^3 + q^4: Andrews, The Theory of Partitions, ch. 3 [memory];
    // [3]_q! = (1)(1+q)(1+q+q^2) and binom(x,2) = x(x−1)/2 (definitions)
    [Fact]
    public void QFunctionsAndBinomials_ExpandIntoPolynomials()
    {
        Assert.True(AgreesAtRandomPoints(Script("qbinom(4, 2, q) = 1 + q + 2*q^2 + q^3 + q^4")));
        Assert.True(AgreesAtRandomPoints(Script("qfact(3, q) = (1+q)*(1+q+q^2)")));
        Assert.True(AgreesAtRandomPoints(Script("qint(n, q)*(1-q) = 1 - q^n", N(6))));
        Assert.True(AgreesAtRandomPoints(Script("binom(x, 2) = x*(x-1)/2")));
        Assert.True(AgreesAtRandomPoints(Script("binom(x, -1) = 0")));
    }

    // Sum of the first n integers: Graham, Knuth, Patashnik, Concrete Mathematics, §2.1 [memory]
    [Fact]
    public void ParameterOnlyIdentity_FoldsToConstants()
    {
        var script = Script("sum(k in 1..n: k) = n*(n+1)/2", N(6));
        Assert.Empty(script.Declared);
        Assert.Equal(("21", "21"), ((string)script.Differences.Single().Left, (string)script.Differences.Single().Right));
    }

    [Fact]
    public void SharedMinors_KeepADeterminantOfOrderTenSmall()
    {
        // n! = 3,628,800 terms if expanded naively; shared minors need about n·2^(n−1) products.
        var translation = SmtLibWriter.Translate(Some.Entry("det(matrix(i in 1..10, j in 1..10: a[i,j])) = 0"));
        Assert.True(translation.Success, translation.Error?.Message);
        Assert.InRange(translation.Value!.Definitions.Count, 100, 10 * 512 * 2);
    }

    [Fact]
    public void OverAFiniteField_IsSkippedWithTheReason()
    {
        Assert.Contains("GF(5)", Skip("(x+y)^5 = x^5 + y^5 over GF(5)"));
    }

    [Fact]
    public void Limits_SkipWithTheNameOfTheLimit()
    {
        Assert.Contains("MaxExpansionOrder", Skip("det(matrix(i in 1..11, j in 1..11: a[i,j])) = 0"));
        Assert.Contains("MaxExpansionOrder", Skip("perm([[a,b,c],[d,e,f],[g,h,i]]) = 0", limits: new HandOffLimits { MaxExpansionOrder = 2 }));
        Assert.Contains("MaxMatrixOrder", Skip("tr(matrix(i in 1..20, j in 1..20: a[i,j])) = 0"));
        Assert.Contains("MaxExpansionSteps", Skip("sum(k in 1..1000000: x^k) = 0"));
        Assert.Contains("MaxExpansionSteps", Skip("sum(k in 1..300: sum(j in 1..300: x[k]*y[j])) = 0", limits: new HandOffLimits { MaxExpansionSteps = 10_000 }));
        Assert.Contains("MaxExponent", Skip("x^1000 = 0"));
        Assert.Contains("MaxExponent", Skip("(x+1)^(2^70) = (x^2+2*x+1)^(2^69)"));
        Assert.Contains("MaxExponent", Skip("x^(-1000) = 0"));
        Assert.Contains("MaxConstantBits", Skip("fib(200) = 0", limits: new HandOffLimits { MaxConstantBits = 100 }));
        Assert.Contains("MaxConstantBits", Skip("fact(2000) = 0"));
    }

    [Fact]
    public void WhatTheCompilerRejects_IsSkipped_NotTranslated()
    {
        Assert.Contains("skew-symmetric", Skip("pf([[0,1],[2,0]]) = 1"));
        Assert.Contains("truncated power series identity (up to q^5)", Skip("prod(n in 1..inf: 1 - q^n) = 1 - q - q^2 up to q^5"));
        Assert.Contains("differ in type", Skip("[[a,b]] = a"));
        Assert.Contains("divides by zero", Skip("x/(2-2) = x"));
    }

    [Fact]
    public void PushPopBlock_WrapsOneCandidate()
    {
        var block = SmtLibWriter.Block(Sample, SmtLibWriter.Translate(Some.Entry("x + 1 = 1 + x")).Value!);
        Assert.Contains("(push 1)\n  (declare-const x Real)\n", block);
        Assert.EndsWith("  (check-sat)\n(pop 1)\n", block);
        Assert.DoesNotContain("set-logic", block);
    }

    [Fact]
    public void Numerals_AreStandardSmtLib()
    {
        Assert.Equal("5", HandOffNumeral(5, 1));
        Assert.Equal("(- 5)", HandOffNumeral(-5, 1));
        Assert.Equal("(/ (- 5) 6)", HandOffNumeral(-5, 6));
    }

    private static string HandOffNumeral(int p, int q) => TermGraph.Numeral(Rational.Create(p, q));
}
