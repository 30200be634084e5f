using System.Numerics;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Screening.Counterexamples;

namespace IdentityQueue.Screening.Tests.Counterexamples;

/// <summary>Issue #15, point 1: the smallest integer counterexample of a refuted entry.</summary>
public sealed class CounterexampleSearchTests
{
    private static Counterexample? Find(string line, CounterexampleBudget? budget = null) =>
        CounterexampleSearch.Find(Some.Compiled(line), budget ?? CounterexampleBudget.Default);

    [Fact]
    public void TheIssuesExample_FailsAtAOneBZero()
    {
        // 4a² + ab − (2a + ab) = 2a(2a − 1) vanishes where a = 0, so the least point is the first of max-norm 1 with a ≠ 0:
        // (0, ±1) come before (1, 0) in the order (sum of absolute values, then a, then b, ranked 0, 1, −1, …); worked by hand.
        var cx = Find("4*a^2 + a*b = 2*a + a*b")!;
        Assert.Equal("fails at a = 1, b = 0: lhs = 4, rhs = 2", cx.Describe());
        Assert.True(cx.Exhaustive);
        Assert.Equal(1, cx.MaxAbs);
        Assert.Equal(1, cx.CompleteShells); // the origin
        Assert.Equal(4, cx.PointsTried);    // (0,0), (0,1), (0,−1), (1,0)
        Assert.Null(cx.Entry);
    }

    [Fact]
    public void AnIdentityWithoutVariables_FailsAtTheEmptyPoint()
    {
        var cx = Find("2 = 3")!;
        Assert.Equal("fails: lhs = 2, rhs = 3", cx.Describe());
        Assert.True(cx.Exhaustive);
    }

    [Fact]
    public void APointWhereADenominatorVanishes_IsSkipped()
    {
        // 1/(xy) is undefined on the axes, where every point of max-norm ≤ 1 with |x| + |y| ≤ 1 lies; worked by hand.
        var cx = Find("1/(x*y) = 1/(x*y) + 1")!;
        Assert.Equal("fails at x = 1, y = 1: lhs = 1, rhs = 2", cx.Describe());
        Assert.True(cx.Exhaustive);
        Assert.Equal(6, cx.PointsTried); // (0,0), (0,1), (0,−1), (1,0), (−1,0) undefined; (1,1)
    }

    [Fact]
    public void RationalValues_ArePrintedExactly()
    {
        // (x + 1)/2 at x = 0 is 1/2; worked by hand.
        Assert.Equal("fails at x = 0: lhs = 1/2, rhs = 0", Find("(x + 1)/2 = 0*x")!.Describe());
    }

    [Fact]
    public void AMatrixIdentity_NamesTheDifferingEntry()
    {
        // Only the entry in row 2, column 1 differs (0 against b); the least point with b ≠ 0 is a = 0, b = 1.
        var cx = Find("[[a, 1], [0, a]] = [[a, 1], [b, a]]")!;
        Assert.Equal("[2,1]", cx.Entry);
        Assert.Equal("fails at a = 0, b = 1 at entry [2,1]: lhs = 0, rhs = 1", cx.Describe());
    }

    [Fact]
    public void OverGFp_TheLeastResidueIsFound()
    {
        // x³ − x vanishes at 0, 1, −1 (Fermat: x^p ≡ x only for p = 3; here p = 5, and 2³ = 8 ≡ 3); worked by hand.
        var cx = Find("x^3 = x over GF(5)")!;
        Assert.Equal("fails at x = 2: lhs = 3, rhs = 2", cx.Describe());
        Assert.True(cx.Exhaustive);
    }

    [Theory]
    [InlineData("x^5 = x over GF(5)")]        // Fermat's little theorem: x^p = x on all of GF(p)
    [InlineData("x^2*y = x*y over GF(2)")]
    [InlineData("x^7 + y^7 = x + y over GF(7)")]
    public void AFunctionThatVanishesOnAllOfGFp_HasNoCounterexampleThere(string line)
    {
        // Fermat's little theorem (x^p ≡ x mod p): the polynomial is nonzero, yet zero at every point of GF(p)^n.
        Assert.Null(Find(line));
    }

    [Fact]
    public void ManyVariables_BeyondTheBox_LinesAndShrinkingFindTheAllOnesPoint()
    {
        // x1⋯x12 is nonzero only where no coordinate is 0: 3^12 − 2^12 points of max-norm ≤ 1 come before (1, …, 1), more than
        // the box budget, so lines find such a point and shrinking moves every coordinate to 1 (the sign of the product
        // changes, not whether it vanishes); worked by hand.
        var names = Enumerable.Range(1, 12).Select(i => $"x{i}").ToList();
        var budget = new CounterexampleBudget { MaxBoxPoints = 2_000 };
        var cx = Find($"{string.Join("*", names)} = 0", budget)!;
        Assert.NotNull(cx);
        Assert.False(cx.Exhaustive);
        Assert.Equal(1, cx.CompleteShells);
        Assert.All(cx.Point, v => Assert.Equal(BigInteger.One, v.Value));
        Assert.Equal("1", cx.LhsValue);
        Assert.True(cx.PointsTried <= budget.MaxBoxPoints + budget.MaxLines * budget.PointsPerLine + budget.MaxShrinkPoints);
    }

    [Fact]
    public void ASearchThatFindsNothing_EndsWithinItsCountedAttempts()
    {
        // x^p·y = x·y vanishes on all of GF(10007)² (Fermat), too many points for this box: the lines are attempts, counted
        // whether or not they find anything, so the search ends (an earlier draft looped here).
        var budget = new CounterexampleBudget { MaxBoxPoints = 100, MaxLines = 20, PointsPerLine = 5 };
        Assert.Null(Find("x^10007*y = x*y over GF(10007)", budget));
    }

    [Fact]
    public void TheWorkBudget_StopsASearch()
    {
        var budget = new CounterexampleBudget { MaxEvaluationBits = 1, MaxLines = 3 };
        Assert.Null(Find("x = x + 1", budget));
    }

    [Fact]
    public void ACancelledSearch_Throws()
    {
        using var cancelled = new CancellationTokenSource();
        cancelled.Cancel();
        Assert.ThrowsAny<OperationCanceledException>(() =>
            CounterexampleSearch.Find(Some.Compiled("x = x + 1"), CounterexampleBudget.Default, cancellation: cancelled.Token));
    }

    [Fact]
    public void ABadBudget_IsRejected()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => Find("x = 1", new CounterexampleBudget { MaxBoxPoints = 0 }));
        Assert.Throws<ArgumentOutOfRangeException>(() => Find("x = 1", new CounterexampleBudget { PointsPerLine = 0 }));
    }

    [Fact]
    public void RandomLowDegreeDifferences_AreFoundInTheBox_AndTheLeastPointIsTheBruteForceOne()
    {
        // Alon's Combinatorial Nullstellensatz (Combin. Probab. Comput. 8 (1999), Theorem 1.2 [memory]): a nonzero polynomial of
        // degree at most d in each variable has a nonzero point in S^n for any |S| > d; with S = [−m, m], 2m + 1 > d.
        // The differences are products of univariate polynomials with d roots among the small integers (zero on most of the
        // box) plus, half the time, a random sparse polynomial of the same degrees; the least point is found by brute force
        // over the box, sorted by the issue's order, with the polynomial evaluated from its terms here.
        var random = new Random(1515);
        for (var round = 0; round < 150; round++)
        {
            var n = random.Next(1, 5);
            var d = random.Next(1, n <= 3 ? 6 : 5);
            var m = (d + 1) / 2; // the least m with 2m + 1 > d
            var names = Enumerable.Range(0, n).Select(i => ((char)('a' + i)).ToString()).ToArray();
            var difference = TestPolynomial.Constant(n, random.Next(1, 4) * (random.Next(2) == 0 ? 1 : -1));
            for (var i = 0; i < n; i++)
                for (var k = 0; k < d; k++)
                    difference *= TestPolynomial.Linear(n, i, random.Next(-m, m + 1));
            if (random.Next(2) == 0) difference += TestPolynomial.Random(random, n, d, terms: 3);
            if (difference.IsZero) continue;
            var other = TestPolynomial.Random(random, n, d, terms: 4);
            var line = $"{(difference + other).Text(names)} = {other.Text(names)}";

            var compiled = Some.Compiled(line);
            var cx = CounterexampleSearch.Find(compiled, CounterexampleBudget.Default);
            Assert.True(cx is not null, line);
            Assert.True(cx.Exhaustive, line);
            Assert.True(cx.MaxAbs <= m, $"{line}: {cx.Describe()}");

            // ties are broken in the program's variable order (first appearance); absent variables last (they stay 0)
            var order = Enumerable.Range(0, n).OrderBy(i => Array.IndexOf(compiled.Program.Variables, names[i]) is var k && k >= 0 ? k : n + i).ToArray();
            var least = BruteForceLeast(difference, n, m, order);
            var byName = cx.Point.ToDictionary(v => v.Variable, v => v.Value);
            var found = names.Select(v => byName.TryGetValue(v, out var value) ? (long)value : 0).ToArray();
            Assert.True(least.SequenceEqual(found), $"{line}: brute force ({string.Join(", ", least)}), search {cx.Describe()}");
            Assert.Equal((difference + other).At(least).ToString(), cx.LhsValue);
            Assert.Equal(other.At(least).ToString(), cx.RhsValue);
        }
    }

    /// <summary>Every point of [−m, m]^n, sorted by max-norm, sum of absolute values, then ranks 0, 1, −1, … of the coordinates taken in <paramref name="order"/>; the first nonzero.</summary>
    private static long[] BruteForceLeast(TestPolynomial f, int n, int m, int[] order)
    {
        var points = new List<long[]>();
        var total = (int)Math.Pow(2 * m + 1, n);
        for (var code = 0; code < total; code++)
        {
            var point = new long[n];
            var c = code;
            for (var i = 0; i < n; i++) { point[i] = c % (2 * m + 1) - m; c /= 2 * m + 1; }
            points.Add(point);
        }
        static long Rank(long v) => v > 0 ? 2 * v - 1 : -2 * v;
        var ordered = points.OrderBy(p => p.Max(Math.Abs)).ThenBy(p => p.Sum(Math.Abs));
        for (var i = 0; i < n; i++)
        {
            var k = order[i];
            ordered = ordered.ThenBy(p => Rank(p[k]));
        }
        return ordered.First(p => !f.At(p).IsZero);
    }
}

/// <summary>
/// Issue #16: over Q a polynomial program is evaluated by residues modulo primes below 2^62 with a bound on the values; the
/// search must find exactly what evaluating every point over the rationals finds.
/// </summary>
public sealed class CounterexampleByResiduesTests
{
    [Theory]
    // Vandermonde's determinant det(x_i^(j−1)) = Π_{i<j} (x_j − x_i) (a published identity), in the three false forms of
    // ../shared/bench/gen-catalogue.py: twice the product (zero wherever two coordinates agree), a sign flipped, an off-by-one.
    [InlineData("det(matrix(i in 1..4, j in 1..4: x[i]^(j-1))) = 2*prod(i in 1..4: prod(j in i+1..4: x[j] - x[i]))")]
    [InlineData("det(matrix(i in 1..5, j in 1..5: x[i]^(j-1))) = prod(i in 1..5: prod(j in i+1..5: x[j] + x[i]))")]
    [InlineData("det(matrix(i in 1..4, j in 1..4: x[i]^(j-1))) = prod(i in 1..4: prod(j in i..4: x[j] - x[i] + 1))")]
    // The permanent is not the determinant (they agree on 2×2 matrices with a zero product off the diagonal only).
    [InlineData("perm(matrix(i in 1..3, j in 1..3: x[i]^(j-1))) = det(matrix(i in 1..3, j in 1..3: x[i]^(j-1)))")]
    // The Pfaffian of a 4×4 skew-symmetric matrix is af − be + cd (a standard formula); here with a wrong sign.
    [InlineData("pf([[0, a, b, c], [-a, 0, d, e], [-b, -d, 0, f], [-c, -e, -f, 0]]) = a*f + b*e + c*d")]
    // A matrix identity: the entry [2,2] differs.
    [InlineData("[[a, b], [c, d]]^2 = [[a^2 + b*c, a*b + b*d], [a*c + c*d, d^2]]")]
    // Values above 2^62: the difference −4611686018427387847·x is a multiple of the first modulus (the largest prime below
    // 2^62, sympy prevprime(2**62)), so a second prime must show it nonzero.
    [InlineData("x = x + 4611686018427387847")]
    [InlineData("x*y = x*y + 4611686018427387847*4611686018427387817*x")]
    [InlineData("(x + y)^9 = x^9 + y^9 + 9*x*y*(x^7 + y^7)")]
    public void ResiduesFindWhatRationalsFind(string line)
    {
        var compiled = Some.Compiled(line);
        var exact = CounterexampleSearch.FindWith(compiled, CounterexampleBudget.Default, 7, byResidues: false);
        var residues = CounterexampleSearch.FindWith(compiled, CounterexampleBudget.Default, 7, byResidues: true, exactFirst: 0);
        Assert.NotNull(exact);
        Assert.NotNull(residues);
        Assert.Equal(exact.Describe(), residues.Describe());
        Assert.Equal(exact.PointsTried, residues.PointsTried);
        Assert.Equal(exact.Exhaustive, residues.Exhaustive);
        Assert.Equal(exact.CompleteShells, residues.CompleteShells);
    }

    [Fact]
    public void AMultipleOfTheFirstModulus_IsNotTakenForZero()
    {
        // lhs − rhs = −4611686018427387847 (the largest prime below 2^62, sympy prevprime(2**62)) everywhere: the origin; worked by hand.
        var cx = CounterexampleSearch.FindWith(Some.Compiled("x = x + 4611686018427387847"), CounterexampleBudget.Default, 0, byResidues: true, exactFirst: 0)!;
        Assert.Equal("fails at x = 0: lhs = 0, rhs = 4611686018427387847", cx.Describe());
        Assert.Equal(1, cx.PointsTried);
        // p1·p2·x vanishes modulo both of the first two moduli: the first point with x ≠ 0 of the order, (1, 0); worked by hand.
        var two = CounterexampleSearch.FindWith(Some.Compiled("x*y = x*y + 4611686018427387847*4611686018427387817*x"), CounterexampleBudget.Default, 0, byResidues: true, exactFirst: 0)!;
        Assert.Equal("fails at x = 1, y = 0: lhs = 0, rhs = 21267647932558653302378126310941659999", two.Describe());
    }
}
