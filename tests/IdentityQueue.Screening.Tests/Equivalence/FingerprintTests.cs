using System.Numerics;
using System.Text.Json;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Screening.Equivalence;

namespace IdentityQueue.Screening.Tests.Equivalence;

/// <summary>Fingerprints and groups of entries written several ways, with expectations worked out by hand and by sympy.</summary>
public class FingerprintTests
{
    private static readonly RunSeed Seed = RunSeed.FromStored(20261205);
    private static readonly IReadOnlyDictionary<string, BigInteger> None = new Dictionary<string, BigInteger>();

    private static Fingerprint? Print(string line, RunSeed? seed = null) => Fingerprint.Of(Some.Entry(line), None, seed ?? Seed);

    private static Fingerprint PrintOf(string line)
    {
        var print = Print(line);
        Assert.True(print.HasValue, $"no fingerprint for {line}");
        return print.Value;
    }

    private static IReadOnlyList<EquivalentEntry> Groups(params string[] lines) =>
        EquivalenceGroups.Build(lines.Select((line, i) => ((long)(i + 1), Print(line))));

    [Fact]
    public void A_square_written_four_ways_is_one_group_and_a_false_cousin_is_another()
    {
        // (x+y)^2 = x^2 + 2xy + y^2 (the binomial square, any algebra text): every side of entries 1–4 is the same
        // polynomial, so all four are one group with both prints equal (swapping changes nothing). (x+y)^2 = x^2 + y^2 is
        // false over Q (worked by hand: the sides differ by 2xy), its own group; written with its sides swapped and the
        // sum reordered it joins that group, swapped.
        var rows = Groups(
            "(x+y)^2 = x^2+2*x*y+y^2",
            "x^2+2*x*y+y^2 = (x+y)^2",
            "(y+x)^2 = y^2 + 2*y*x + x^2",
            "x^2+2*x*y+y^2 = (x+y)*(x+y)",
            "(x+y)^2 = x^2+y^2",
            "y^2+x^2 = (y+x)^2",
            "(x+y)^2 = x^2+y^2 + x*y");
        Assert.Equal([new(2, 1, false), new(3, 1, false), new(4, 1, false), new EquivalentEntry(6, 5, true)], rows);
        var square = PrintOf("(x+y)^2 = x^2+2*x*y+y^2");
        Assert.Equal(square.Left, square.Right);
    }

    [Fact]
    public void The_same_identity_over_different_fields_never_groups_but_agrees_within_a_field()
    {
        // Over GF(2), 2xy = 0, so (x+y)^2 = x^2 + y^2 holds and is the same as (x+y)^2 = x^2 + y^2 + 2xy (worked by hand);
        // the same lines over Q and over GF(5) are other fields. Over GF(5), (x+y)^5 = x^5 + y^5 (the binomial
        // coefficients C(5,i), 0 < i < 5, are divisible by 5: "freshman's dream", any algebra text).
        var rows = Groups(
            "(x+y)^2 = x^2+2*x*y+y^2",
            "(x+y)^2 = x^2+2*x*y+y^2 over GF(5)",
            "(x+y)^2 = x^2+y^2 over GF(2)",
            "(x+y)^2 = x^2+y^2+2*x*y over GF(2)",
            "(x+y)^5 = x^5+y^5 over GF(5)",
            "x^5+y^5 = (y+x)^5 over GF(5)",
            "(x+y)^5 = x^5+y^5",
            "(x+y)^2 = x^2+2*x*y+y^2 over GF(5^2)");
        Assert.Equal([new(4, 3, false), new EquivalentEntry(6, 5, false)], rows);
        var dream = PrintOf("(x+y)^5 = x^5+y^5 over GF(5)");
        Assert.Equal(dream.Left, dream.Right);
        var overQ = PrintOf("(x+y)^5 = x^5+y^5");
        Assert.NotEqual(overQ.Left, overQ.Right);
        Assert.Equal("GF(5)", dream.Field);
        Assert.Equal("Q", overQ.Field);
    }

    [Fact]
    public void Large_prime_fields_are_fingerprinted_in_themselves()
    {
        // 2^61 - 1 and 2^127 - 1 are Mersenne primes (recalled from memory; the parser checks primality). A field of
        // 2^60 elements or more is used as it is, with other points for the second print.
        foreach (var p in new[] { "2305843009213693951", "170141183460469231731687303715884105727" })
        {
            var holds = PrintOf($"(x+y)^2 = x^2+2*x*y+y^2 over GF({p})");
            Assert.Equal(holds.Left, holds.Right);
            Assert.True(holds.FieldBits > 60);
            var fails = PrintOf($"(x+y)^2 = x^2+y^2 over GF({p})");
            Assert.NotEqual(fails.Left, fails.Right);
        }
    }

    [Fact]
    public void Vandermonde_as_a_bound_matrix_and_as_a_literal_group()
    {
        // The Vandermonde determinant det(x_i^(j-1)) = prod_{i<j} (x_j - x_i) (any linear algebra text), n = 3.
        var rows = Groups(
            "det(matrix(i in 1..3, j in 1..3: x[i]^(j-1))) = prod(j in 2..3: prod(i in 1..j-1: x[j]-x[i]))",
            "det([[1, x[1], x[1]^2], [1, x[2], x[2]^2], [1, x[3], x[3]^2]]) = (x[2]-x[1])*(x[3]-x[1])*(x[3]-x[2])",
            "(x[2]-x[1])*(x[3]-x[1])*(x[3]-x[2]) = det(transpose([[1, x[1], x[1]^2], [1, x[2], x[2]^2], [1, x[3], x[3]^2]]))",
            // the sign reversed: false (the product over i > j is (-1)^3 times the one over i < j)
            "det([[1, x[1], x[1]^2], [1, x[2], x[2]^2], [1, x[3], x[3]^2]]) = (x[1]-x[2])*(x[1]-x[3])*(x[2]-x[3])");
        Assert.Equal([new(2, 1, false), new EquivalentEntry(3, 1, false)], rows);
    }

    [Fact]
    public void Matrix_sides_group_entrywise_and_a_transposed_side_does_not()
    {
        // (AB)^T = B^T A^T (any linear algebra text), once with products and once written out entry by entry.
        var rows = Groups(
            "transpose([[a,b],[c,d]]*[[e,f],[g,h]]) = transpose([[e,f],[g,h]])*transpose([[a,b],[c,d]])",
            "[[a*e+b*g, c*e+d*g], [a*f+b*h, c*f+d*h]] = [[e*a+g*b, e*c+g*d], [f*a+h*b, f*c+h*d]]",
            // (AB)^T = A^T B^T is false in general; its sides are other matrices
            "transpose([[a,b],[c,d]]*[[e,f],[g,h]]) = transpose([[a,b],[c,d]])*transpose([[e,f],[g,h]])",
            // the entries of the first side, not transposed: another matrix
            "[[a*e+b*g, a*f+b*h], [c*e+d*g, c*f+d*h]] = [[a*e+b*g, a*f+b*h], [c*e+d*g, c*f+d*h]]");
        Assert.Equal([new EquivalentEntry(2, 1, false)], rows);
        var print = PrintOf("transpose([[a,b],[c,d]]) = [[a,c],[b,d]]");
        Assert.Equal("[1,1],[1,2],[2,1],[2,2]", print.Shape);
        Assert.Equal(print.Left, print.Right);
    }

    [Fact]
    public void Pfaffians_group_and_their_side_conditions_are_not_part_of_a_side()
    {
        // The Pfaffian of a 4×4 skew-symmetric matrix is af − be + cd (any text on Pfaffians, e.g. Wikipedia "Pfaffian").
        var rows = Groups(
            "pf([[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]]) = a*f - b*e + c*d",
            "c*d + a*f - b*e = pf([[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]])",
            "pf([[0,a,b,c],[-a,0,d,e],[-b,-d,0,f],[-c,-e,-f,0]]) = a*f + b*e + c*d");
        Assert.Equal([new EquivalentEntry(2, 1, false)], rows);
        // [[0, a], [b, 0]] is not written skew: its compiled side carries the condition a + b = 0 as an output before the
        // Pfaffian; the print is of the Pfaffian alone, the [1,2] entry a (the 2×2 Pfaffian, worked by hand).
        Assert.NotEmpty(Some.Compiled("pf([[0,a],[b,0]]) = 0").Program.ConditionNames);
        var print = PrintOf("pf([[0,a],[b,0]]) = a");
        Assert.Equal(print.Left, print.Right);
    }

    [Fact]
    public void Binomials_written_with_binom_and_with_factorials_group()
    {
        // Pascal's formula C(x+1, 2) = C(x, 1) + C(x, 2) (any combinatorics text), with binom and written out; and
        // C(6, 2) = 6!/(2! 4!) = 15 = C(5, 1) + C(5, 2) = 5 + 10 (worked by hand).
        var rows = Groups(
            "binom(x+1, 2) = binom(x, 1) + binom(x, 2)",
            "(x+1)*x/2 = x + x*(x-1)/2",
            "binom(x, 1) + binom(x, 2) = binom(x+1, 2)",
            "binom(6, 2) = binom(5, 1) + binom(5, 2)",
            "fact(6)/(fact(2)*fact(4)) = fact(5)/(fact(1)*fact(4)) + fact(5)/(fact(2)*fact(3))",
            "binom(6, 2) = 16");
        Assert.Equal([new(2, 1, false), new(3, 1, false), new EquivalentEntry(5, 4, false)], rows);
    }

    [Fact]
    public void A_Gaussian_binomial_written_as_qbinom_as_a_quotient_and_expanded_groups()
    {
        // [4 choose 2]_q = (1-q^4)(1-q^3)/((1-q)(1-q^2)) = 1 + q + 2q^2 + q^3 + q^4 (the Gaussian binomial; G. E.
        // Andrews, The Theory of Partitions, ch. 3; the expansion worked by hand). A wrong middle coefficient does not group.
        var rows = Groups(
            "qbinom(4, 2, q) = 1 + q + 2*q^2 + q^3 + q^4",
            "(1-q^4)*(1-q^3)/((1-q)*(1-q^2)) = 1 + q + 2*q^2 + q^3 + q^4",
            "1 + q + 2*q^2 + q^3 + q^4 = qbinom(4, 2, q)",
            "qbinom(4, 2, q) = 1 + q + q^2 + q^3 + q^4");
        Assert.Equal([new(2, 1, false), new EquivalentEntry(3, 1, false)], rows);
    }

    [Fact]
    public void A_rational_side_is_fingerprinted_as_a_function()
    {
        // (x^2 - y^2)/(x - y) = x + y as rational functions (worked by hand); the fixed points are not on x = y.
        var print = PrintOf("(x^2-y^2)/(x-y) = x+y");
        Assert.Equal(print.Left, print.Right);
    }

    [Fact]
    public void Series_and_undefined_entries_get_no_fingerprint_and_never_group()
    {
        // a truncated series identity (1/(1-q) = 1 + q + q^2 + … up to q^3, the geometric series) is not fingerprinted;
        // 1/(x - x) is undefined at every point.
        Assert.Null(Print("1/(1-q) = 1 + q + q^2 + q^3 up to q^3"));
        Assert.Null(Print("1/(x-x) = 1"));
        Assert.Empty(EquivalenceGroups.Build([(1, null), (2, null), (3, Print("x = x")), (4, null)]));
    }

    /// <summary>x's value at point <paramref name="k"/> of the first field over Q, as an integer.</summary>
    private static ulong XAt(int k)
    {
        var field = Fingerprint.RationalsField(Seed, 0);
        var random = Fingerprint.PointRandom(Seed, 0, k, "x");
        return field.ToUInt64(field.Sample(ref random));
    }

    [Fact]
    public void A_side_undefined_at_a_fingerprint_point_moves_to_the_next_point()
    {
        // 1/(x - c0) with c0 the value of x at the first point of the first field: undefined there, so points 1 and 2
        // are used. 1/(x - c0) + 1 = (1 + x - c0)/(x - c0) (worked by hand), so the two entries below are one, swapped.
        var c = Enumerable.Range(0, 4).Select(XAt).ToArray();
        var rows = Groups($"1/(x-{c[0]}) + 1 = y", $"y = (1 + x - {c[0]})/(x - {c[0]})");
        Assert.Equal([new EquivalentEntry(2, 1, true)], rows);
        // undefined at three points of five: still two left; at four: no fingerprint
        Assert.NotNull(Print($"1/((x-{c[0]})*(x-{c[1]})*(x-{c[2]})) = y"));
        Assert.Null(Print($"1/((x-{c[0]})*(x-{c[1]})*(x-{c[2]})*(x-{c[3]})) = y"));
    }

    [Fact]
    public void Instances_of_families_group_instance_by_instance()
    {
        // The binomial theorem (1+x)^n = sum_k C(n,k) x^k (any algebra text), written twice; the instance n of one line
        // groups with the instance n of the other and with no other n.
        var first = Some.Entry("(1+x)^n = sum(k in 0..n: binom(n, k)*x^k) for n in 1..4");
        var second = Some.Entry("sum(k in 0..n: binom(n, k)*x^(n-k)) = (x+1)^n for n in 1..4");
        var entries = new List<(long, Fingerprint?)>();
        foreach (var entry in new[] { first, second })
        {
            var family = FamilyExpander.Expand(entry);
            Assert.True(family.Success);
            foreach (var parameters in family.Instances) entries.Add((entries.Count + 1, Fingerprint.Of(entry, parameters, Seed)));
        }
        Assert.Equal([new(5, 1, false), new(6, 2, false), new(7, 3, false), new EquivalentEntry(8, 4, false)], EquivalenceGroups.Build(entries));
    }

    [Fact]
    public void The_fingerprint_depends_on_the_seed_alone()
    {
        // the same entry gives the same print for the same seed; another seed gives other points and primes
        Assert.Equal(PrintOf("(x+y)^3 = x^3+y^3"), Print("(x+y)^3 = x^3+y^3"));
        Assert.NotEqual(PrintOf("(x+y)^3 = x^3+y^3").Left, Print("(x+y)^3 = x^3+y^3", RunSeed.FromStored(7))!.Value.Left);
        // the same variable gets the same value in every entry: x alone is the same side in two entries
        Assert.Equal(PrintOf("x = y").Left, PrintOf("x = z").Left);
        Assert.NotEqual(PrintOf("x = y").Right, PrintOf("x = z").Right);
    }

    [Fact]
    public void Representatives_are_the_smallest_ids_whatever_the_order_given()
    {
        var a = PrintOf("(x+y)^2 = x^2+y^2");
        var b = PrintOf("x^2+y^2 = (x+y)^2");
        var rows = EquivalenceGroups.Build([(30, b), (10, b), (20, a)]);
        Assert.Equal([new(20, 10, true), new EquivalentEntry(30, 10, false)], rows);
    }

    [Fact]
    public void The_false_match_bound_follows_the_lemma()
    {
        // Over Q with fields of ≥ 61 bits, K = 2 points, two fields: the content term 2^-55 per field dominates (d/p)^2,
        // so the bound is about 2·(2^-55)^2 = 2^-109. Over GF(5) (extensions of 5^26 ≈ 2^60.4 elements) d = 10 gives
        // 2·((10/2^60.4)^2)^2 ≈ 2^-227, below the 2^-128 of a digest collision, so about 2^-127.
        var q = PrintOf("(x+y)^2 = x^2+y^2");
        Assert.InRange(q.FalseMatchLog2(10), -110, -108);
        Assert.True(q.FalseMatchLog2(10, 61 * 100) > q.FalseMatchLog2(10));
        var gf5 = PrintOf("(x+y)^2 = x^2+y^2 over GF(5)");
        Assert.InRange(gf5.FieldBits, 60, 63);
        Assert.InRange(gf5.FalseMatchLog2(10), -128, -126);
        // a degree near the field size makes the lemma say nothing
        Assert.Equal(0, gf5.FalseMatchLog2(Math.Pow(2, 62)));
    }

    [Fact]
    public void The_bound_for_two_grouped_entries_comes_from_the_differences_of_their_sides()
    {
        // (x+y)^2 = x^2+2xy+y^2 and its sides swapped: the paired differences have degree 2 and small coefficients (worked
        // by hand; the compiler's bound may be larger, not smaller), so the content term 2^-55 per prime dominates:
        // about 2·(2^-55)^2 = 2^-109.
        var a = Some.Entry("(x+y)^2 = x^2+2*x*y+y^2");
        var b = Some.Entry("x^2+2*x*y+y^2 = (y+x)*(x+y)");
        var print = PrintOf("(x+y)^2 = x^2+2*x*y+y^2");
        var bound = print.FalseMatchLog2(a, None, b, None, swapped: true);
        Assert.NotNull(bound);
        Assert.InRange(bound.Value, -110, -100);
        // a rational side over GF(5): no content term, so below the digest's 2^-127
        var r = Some.Entry("(x^2-y^2)/(x-y) = x+y over GF(5)");
        var s = Some.Entry("x+y = (x^2-y^2)/(x-y) over GF(5)");
        var overGf5 = PrintOf("(x^2-y^2)/(x-y) = x+y over GF(5)").FalseMatchLog2(r, None, s, None, swapped: true);
        Assert.NotNull(overGf5);
        Assert.InRange(overGf5.Value, -128, -120);
        // two instances giving n different values cannot be compiled together: no bound
        var family = Some.Entry("(1+x)^n = sum(k in 0..n: binom(n, k)*x^k) for n in 1..4");
        var three = new Dictionary<string, BigInteger> { ["n"] = 3 };
        var four = new Dictionary<string, BigInteger> { ["n"] = 4 };
        Assert.Null(print.FalseMatchLog2(family, three, family, four, swapped: false));
        Assert.NotNull(print.FalseMatchLog2(family, three, family, three, swapped: false));
    }

    [Fact]
    public void Side_prints_agree_exactly_when_sympy_says_the_polynomials_are_equal()
    {
        // tests/fixtures/equivalence-pairs.jsonl: random products of sparse factors against their expansion, their
        // refactoring, a perturbed expansion or another product; "same" decided by sympy's expand(a - b) == 0
        // (tests/fixtures/make_equivalence_pairs.py).
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "equivalence-pairs.jsonl");
        var checkedPairs = 0;
        foreach (var line in File.ReadLines(path))
        {
            using var row = JsonDocument.Parse(line);
            var lhs = row.RootElement.GetProperty("lhs").GetString()!;
            var rhs = row.RootElement.GetProperty("rhs").GetString()!;
            var same = row.RootElement.GetProperty("same").GetBoolean();
            var print = PrintOf($"{lhs} = {rhs}");
            Assert.True(same == (print.Left == print.Right), $"{lhs} = {rhs}: sympy says same = {same}");
            // and as two entries: "lhs = 0" and "rhs = 0" group exactly when the sides are equal
            var rows = EquivalenceGroups.Build([(1, Print($"{lhs} = 0")), (2, Print($"{rhs} = 0"))]);
            Assert.Equal(same ? 1 : 0, rows.Count);
            checkedPairs++;
        }
        Assert.Equal(120, checkedPairs);
    }
}
