using System.Diagnostics;
using System.Numerics;
using System.Text.Json;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Screening.Counterexamples;

namespace IdentityQueue.Screening.Tests.Counterexamples;

/// <summary>Issue #15, point 2: the difference lhs − rhs of a refuted entry, recovered exactly.</summary>
public sealed class DifferenceRecoveryTests
{
    private static RecoveredDifference? Recover(string line, DifferenceBudget? budget = null, ulong seed = Some.Seed) =>
        DifferenceRecovery.Recover(Some.Compiled(line), budget ?? DifferenceBudget.Default, seed);

    [Fact]
    public void TheSquareOfASum_LeavesTwiceTheProduct()
    {
        // (x + y)² − (x² + y²) = 2xy (the binomial theorem).
        var d = Recover("(x + y)^2 = x^2 + y^2")!;
        Assert.Equal("2*x*y", d.Text);
        Assert.Equal(1, d.Terms);
        Assert.Equal(2, d.TotalDegree);
        Assert.True(d.Verified);
        Assert.Null(d.EstimatedTerms);
        Assert.Equal("lhs - rhs = 2*x*y (1 term, total degree 2)", d.Describe());
    }

    [Fact]
    public void Terms_ArePrintedByDegreeDescending_ThenLexicographically_WithRationalCoefficients()
    {
        // lhs − rhs = −3z² + 2xy + x/2 − 1 (worked by hand), printed as the catalogue writes it.
        var d = Recover("2*x*y + x/2 = 3*z^2 + 1")!;
        Assert.Equal("2*x*y - 3*z^2 + 1/2*x - 1", d.Text);
        Assert.Equal(4, d.Terms);
    }

    [Fact]
    public void BigCoefficients_AreLiftedByTheChineseRemainderTheorem()
    {
        // (x + 12345678901234567890·y)² − x² = 24691357802469135780·xy + 152415787532388367501905199875019052100·y²
        // (python3: 2*12345678901234567890 and 12345678901234567890**2).
        var d = Recover("(x + 12345678901234567890*y)^2 = x^2")!;
        Assert.Equal("24691357802469135780*x*y + 152415787532388367501905199875019052100*y^2", d.Text);
        Assert.True(d.Verified);
    }

    [Fact]
    public void OverASmallPrime_TheDifferenceIsRecoveredAsAPolynomial()
    {
        // Over GF(3): (x + y)² − x² − y² = 2xy ≡ −xy; over GF(2), x² − x is a nonzero polynomial (zero as a function).
        Assert.Equal("-x*y", Recover("(x + y)^2 = x^2 + y^2 over GF(3)")!.Text);
        var fermat = Recover("x^2 = x over GF(2)")!;
        Assert.Equal("x^2 + x", fermat.Text);
        Assert.True(fermat.Verified);
        Assert.Equal("x^5 - x", Recover("x^5 = x over GF(5)")!.Text);
    }

    [Fact]
    public void ATrueIdentity_HasNothingToRecover()
    {
        // (x + y)³ ≡ x³ + y³ in characteristic 3 (the freshman's dream).
        Assert.Null(Recover("(x + y)^3 = x^3 + y^3 over GF(3)"));
        Assert.Null(Recover("(x + y)^2 = x^2 + 2*x*y + y^2"));
    }

    [Fact]
    public void AMatrixIdentity_RecoversTheFirstDifferingEntry()
    {
        var d = Recover("[[a, b], [c, a]] * [[1, 0], [0, 1]] = [[a, b], [c + a*b, a]]")!;
        Assert.Equal("[2,1]", d.Entry);
        Assert.Equal("-a*b", d.Text);
        Assert.Equal("(lhs - rhs)[2,1] = -a*b (1 term, total degree 2)", d.Describe());
    }

    [Theory]
    [InlineData("x + 1 = x", "1", 0)]
    [InlineData("2 = 3", "-1", 0)]
    [InlineData("x^300*y - 3 = x*y^299", "x^300*y - x*y^299 - 3", 301)]
    public void ConstantsAndHighDegrees_AreRecovered(string line, string text, int degree)
    {
        var d = Recover(line)!;
        Assert.Equal(text, d.Text);
        Assert.Equal(degree, d.TotalDegree);
        Assert.True(d.Verified);
    }

    [Fact]
    public void ACancelledRecovery_Throws()
    {
        using var cancelled = new CancellationTokenSource();
        cancelled.Cancel();
        Assert.ThrowsAny<OperationCanceledException>(() =>
            DifferenceRecovery.Recover(Some.Compiled("(x + y)^2 = x^2"), DifferenceBudget.Default, Some.Seed, cancelled.Token));
    }

    [Fact]
    public void ADegreeBeyondTheCap_IsNotRecovered()
    {
        // x^2000 exceeds MaxDegree 1000 in one variable: neither its terms nor its degree settle within the cap.
        var d = Recover("x^2000 = 0")!;
        Assert.Null(d.Text);
        Assert.Null(d.EstimatedTerms);
        Assert.Equal(-1, d.TotalDegree);
        Assert.Equal("lhs - rhs: terms not recovered, total degree unknown", d.Describe());
    }

    [Fact]
    public void ABadBudget_IsRejected()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => Recover("x = 1", new DifferenceBudget { MaxTerms = 0 }));
        Assert.Throws<ArgumentOutOfRangeException>(() => Recover("x = 1", new DifferenceBudget { EarlyTermination = 0 }));
    }

    [Fact]
    public void ARationalFunction_IsRecoveredOverTheProductOfItsDivisors()
    {
        // 1/x − x = (1 − x²)/x; x/(x+y) + y/(x+y) − 2 = (x + y)(…)/(x + y) = (−x − y)/(x + y), not reduced (worked by hand).
        var d = Recover("1/x = x")!;
        Assert.Equal("-x^2 + 1", d.Text);
        Assert.Equal("x", d.DenominatorText);
        Assert.True(d.Verified);
        Assert.Equal("lhs - rhs = (-x^2 + 1)/(x) (numerator: 2 terms, total degree 2)", d.Describe());
        var sum = Recover("x/(x + y) + y/(x + y) = 2")!;
        Assert.Equal("-x - y", sum.Text);
        Assert.Equal("x + y", sum.DenominatorText);
    }

    [Fact]
    public void ADivisorUsedTwiceOrInAPower_IsClearedInThatPower()
    {
        // 1/x is one register; (1/x)(y/x) − 1 = (y − x²)/x² and (1/x)³ − y = (1 − x³y)/x³ (worked by hand).
        var twice = Recover("(1/x)*(y/x) = 1")!;
        Assert.Equal("-x^2 + y", twice.Text);
        Assert.Equal("x^2", twice.DenominatorText);
        var cube = Recover("(1/x)^3 = y")!;
        Assert.Equal("-x^3*y + 1", cube.Text);
        Assert.Equal("x^3", cube.DenominatorText);
        Assert.True(cube.Verified);
    }

    [Fact]
    public void ADivisorWithADivisorOfItsOwn_IsNotRecovered()
    {
        var compiled = Some.Compiled("1/(1/x + 1) = x");
        Assert.StartsWith("not a polynomial, and a divisor has a divisor of its own", DifferenceRecovery.Unsupported(compiled));
        Assert.Null(DifferenceRecovery.Recover(compiled, DifferenceBudget.Default, Some.Seed));
    }

    [SympyFact]
    public void RationalDifferences_AgreeWithSympy()
    {
        // The oracle: sympy's cancel(N/D − (lhs − rhs)) is 0 for the recovered numerator N and denominator D.
        string[] lines =
        [
            "1/x + 1/y = 2/(x + y)",
            "(x^2 - y^2)/(x - y) = x + 2*y",
            "1/(x*y) - 3/(x + 1) = x/(y^2 + 1)",
            "(a + b)^2/(a*b) = a/b + b/a + 3",
            "x/(x - 1) + 1/(1 - x) = 1 + 1/x^3",
            "(1/x)*(y/x) + (1/x)^3 = y/(x + y)^2",
            "det([[1/a, b], [c, 1/d]]) = a*d",
        ];
        var checks = new List<string>();
        foreach (var line in lines)
        {
            var d = Recover(line)!;
            Assert.True(d is { Verified: true, DenominatorText: not null }, $"{line}: {d?.Describe()}");
            var sides = line.Split(" = ");
            checks.Add($"({d!.Text})/({d.DenominatorText}) - (({sides[0]}) - ({sides[1]}))");
        }
        var program = "import sys, sympy\n"
            + "for t in sys.argv[1:]:\n"
            + "    print(sympy.cancel(sympy.sympify(t.replace('^', '**'), locals={'det': lambda m: sympy.Matrix(m).det()})))\n";
        var start = new ProcessStartInfo(SympyFactAttribute.Python, ["-c", program, .. checks])
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
        };
        using var process = Process.Start(start)!;
        var output = process.StandardOutput.ReadToEnd();
        var errors = process.StandardError.ReadToEnd();
        process.WaitForExit();
        Assert.True(process.ExitCode == 0, errors);
        Assert.Equal(Enumerable.Repeat("0", lines.Length), output.Split('\n', StringSplitOptions.RemoveEmptyEntries));
    }

    [Fact]
    public void BeyondTheTermBudget_TheDegreeAndALowerBoundOnTheTermsAreGiven()
    {
        // (x + y + z + 1)^12 has binom(15, 3) = 455 terms, of total degree 12 (stars and bars).
        var d = Recover("(x + y + z + 1)^12 = 0", new DifferenceBudget { MaxTerms = 50 })!;
        Assert.Null(d.Text);
        Assert.Null(d.Terms);
        Assert.Equal(12, d.TotalDegree);
        Assert.NotNull(d.EstimatedTerms);
        Assert.InRange(d.EstimatedTerms!.Value, 51, 455);
        Assert.False(d.Verified);
        Assert.StartsWith("lhs - rhs: at least ", d.Describe());
        // within the default budget the whole expansion comes back
        var whole = Recover("(x + y + z + 1)^12 = 0")!;
        Assert.Equal(455, whole.Terms);
        Assert.True(whole.Verified);
    }

    [Fact]
    public void RationalReconstruction_FindsSmallFractions()
    {
        // Wang's reconstruction (common practice): 1/3 and −7/5 modulo a 62-bit prime come back; 2^40, above √(m/2), cannot
        // (another prime is needed), and whatever comes back is congruent to the residue.
        var m = BigInteger.Parse("4611686018427387847");
        Assert.True(DifferenceRecovery.TryReconstruct(BigInteger.ModPow(3, m - 2, m), m, out var third));
        Assert.Equal(Rational.Create(1, 3), third);
        Assert.True(DifferenceRecovery.TryReconstruct((m - 7) * BigInteger.ModPow(5, m - 2, m) % m, m, out var sevenFifths));
        Assert.Equal(Rational.Create(-7, 5), sevenFifths);
        var big = BigInteger.One << 40;
        if (DifferenceRecovery.TryReconstruct(big, m, out var other))
        {
            Assert.NotEqual(new Rational(big), other);
            Assert.Equal(BigInteger.Zero, BigInteger.Remainder(other.Numerator - big * other.Denominator, m));
        }
    }

    [Fact]
    public void TheRecoveredText_ReadsBackAsTheSameDifference()
    {
        var d = Recover("(x - 2*y)^3 + x*y/7 = x^3 + 1")!;
        var again = Recover($"{d.Text} = 0")!;
        Assert.Equal(d.Text, again.Text);
    }

    private sealed record FixtureTerm(int[] E, string C);

    private sealed record FixtureCase(string Lhs, string Rhs, string Over, string[] Variables, FixtureTerm[] Terms, int Degree);

    private static List<FixtureCase> Generate() => SympyFactAttribute.ReadFixture<FixtureCase>("make_difference_fixture.py");

    private static Rational ParseRational(string text) =>
        text.Split('/') is [var n, var d] ? Rational.Create(BigInteger.Parse(n), BigInteger.Parse(d)) : new Rational(BigInteger.Parse(text));

    [SympyFact]
    public void RandomRefutedIdentities_GiveSympysExpansionOfTheDifference()
    {
        // The oracle: sympy's Poly(expand(lhs - rhs)) over QQ, or with modulus=p (symmetric residues), of 350 random sparse
        // identities with one perturbation each (tests/fixtures/make_difference_fixture.py, fixed seed).
        var cases = Generate();
        Assert.Equal(350, cases.Count);
        var refuted = 0;
        foreach (var c in cases)
        {
            var line = $"{c.Lhs} = {c.Rhs}" + (c.Over == "Q" ? "" : $" over {c.Over}");
            var compiled = Some.Compiled(line);
            var d = DifferenceRecovery.Recover(compiled, DifferenceBudget.Default, Some.Seed);
            if (c.Terms.Length == 0)
            {
                Assert.True(d is null, $"{line}: sympy finds no difference, recovered {d?.Describe()}");
                continue;
            }
            refuted++;
            Assert.True(d is { Verified: true }, $"{line}: {d?.Describe() ?? "null"}");
            var variables = compiled.Program.Variables;
            string Key(IEnumerable<(string Name, int Exponent)> exponents) =>
                string.Join(",", exponents.Where(e => e.Exponent > 0).OrderBy(e => e.Name, StringComparer.Ordinal).Select(e => $"{e.Name}^{e.Exponent}"));
            var expected = c.Terms.ToDictionary(t => Key(c.Variables.Zip(t.E)), t => ParseRational(t.C));
            var actual = d!.TermList!.ToDictionary(t => Key(variables.Zip(t.Exponents)), t => t.Coefficient);
            Assert.True(expected.Count == actual.Count && expected.All(kv => actual.TryGetValue(kv.Key, out var v) && v == kv.Value),
                $"{line}: sympy {string.Join(" + ", expected.Select(kv => $"{kv.Value}*{kv.Key}"))}, recovered {d.Text}");
            Assert.Equal(c.Terms.Length, d.Terms);
            Assert.Equal(c.Degree, d.TotalDegree);
        }
        Assert.True(refuted >= 300, $"{refuted} refuted cases");
    }
}
