using IdentityQueue.Algebra.Syntax;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Reference;

public class RandomExpressionsTests
{
    [Fact]
    public void Deterministic_for_a_seed()
    {
        var a = new RandomExpressions(42);
        var b = new RandomExpressions(42);
        var c = new RandomExpressions(43);
        var textsA = Enumerable.Range(0, 40).Select(_ => a.Next().Text).Concat(Enumerable.Range(0, 40).Select(_ => a.NextIdentity().Text)).ToList();
        var textsB = Enumerable.Range(0, 40).Select(_ => b.Next().Text).Concat(Enumerable.Range(0, 40).Select(_ => b.NextIdentity().Text)).ToList();
        var textsC = Enumerable.Range(0, 40).Select(_ => c.Next().Text).Concat(Enumerable.Range(0, 40).Select(_ => c.NextIdentity().Text)).ToList();
        Assert.Equal(textsA, textsB);
        Assert.NotEqual(textsA, textsC);
        Assert.True(textsA.Distinct().Count() > 40);
    }

    [Fact]
    public void Generated_identities_are_true_or_false_as_labelled()
    {
        var generator = new RandomExpressions(7, new RandomExpressionOptions { AllowDivision = true });
        var trueCount = 0;
        var constructions = new HashSet<string>();
        const int count = 300;
        for (var t = 0; t < count; t++)
        {
            var identity = generator.NextIdentity();
            Assert.Equal(FormatIdentity(identity.Left, identity.Right), identity.Text);
            var difference = PolynomialExpander.ExpandIdentity(identity.Left, identity.Right);
            Assert.True(identity.IsTrue == difference.IsZero, $"{identity.Construction} labelled {identity.IsTrue}: {identity.Text} → {difference}");
            if (identity.IsTrue) trueCount++;
            constructions.Add(identity.Construction.Replace("+perturbed", ""));
        }
        Assert.InRange(trueCount, count * 35 / 100, count * 65 / 100);
        Assert.Equal(14, constructions.Count); // every construction occurs (reindexing counts as two)
    }

    [Fact]
    public void Expressions_respect_the_degree_bound_and_the_variable_universe()
    {
        foreach (var options in new[]
        {
            new RandomExpressionOptions(),
            new RandomExpressionOptions { MaxDegree = 3, MaxVariables = 2, AllowDivision = true },
            new RandomExpressionOptions { MaxDegree = 8, MaxDepth = 5, MaxSize = 20, AllowIndexed = false },
            new RandomExpressionOptions { AllowBoundForms = false, AllowSpecialFunctions = false, AllowLargeLiterals = false },
        })
        {
            var generator = new RandomExpressions(3, options);
            var degrees = new HashSet<int>();
            for (var t = 0; t < 150; t++)
            {
                var e = generator.Next();
                Assert.Equal(Format(e.Expression), e.Text);
                var p = new PolynomialExpander().Expand(e.Expression);
                Assert.True(p.TotalDegree <= options.MaxDegree, $"{e.Text} has degree {p.TotalDegree}");
                Assert.All(p.Variables, v => Assert.Contains(v, RandomExpressions.VariableUniverse));
                if (!options.AllowIndexed) Assert.DoesNotContain("[", e.Text);
                if (!options.AllowBoundForms) Assert.DoesNotContain("sum(", e.Text);
                if (!options.AllowSpecialFunctions) Assert.DoesNotContain("binom(", e.Text);
                degrees.Add(p.TotalDegree);
            }
            Assert.True(degrees.Count >= 3, "the degrees should vary");
        }
    }

    [Fact]
    public void Expressions_exercise_the_whole_scalar_language()
    {
        var generator = new RandomExpressions(1, new RandomExpressionOptions { AllowDivision = true });
        var text = string.Join("\n", Enumerable.Range(0, 400).Select(_ => generator.Next().Text));
        foreach (var piece in new[] { "sum(", "prod(", "binom(", "qint(", "qfact(", "qbinom(", "fact(", "x[k]", "x[1]", "^", "/", "(-", "^(k + 1)", "^k" })
            Assert.Contains(piece, text);
        Assert.Matches(@"\d{21}", text); // a literal near 2^70
    }

    [Fact]
    public void Emitter_parenthesises_everything()
    {
        Assert.Equal("(-(x^2))", Format(Neg(Pow(Name("x"), 2))));
        Assert.Equal("((x - y) - z)", Format(Sub(Sub(Name("x"), Name("y")), Name("z"))));
        Assert.Equal("(2^(3^2))", Format(Pow(Int(2), Pow(Int(3), 2))));
        Assert.Equal("sum(k in 0..(n - 1): (binom(n, k)*(x[k]^k)))",
            Format(Sum("k", Int(0), Sub(Name("n"), Int(1)), Mul(Call(Builtins.Binom, Name("n"), Name("k")), Pow(Indexed("x", Name("k")), Name("k"))))));
        Assert.Equal("det(matrix(i in 1..3, j in 1..3: a[i,j]))",
            Format(Call(Builtins.Det, MatrixOf("i", Int(1), Int(3), "j", Int(1), Int(3), Indexed("a", Name("i"), Name("j"))))));
        Assert.Equal("[[1, x], [(-1), y]]", Format(MatrixOf([[Int(1), Name("x")], [Int(-1), Name("y")]])));
        Assert.Equal("x = (x*1)", FormatIdentity(Name("x"), Mul(Name("x"), Int(1))));
    }

    [Fact]
    public void Polynomials_convert_back_to_expressions()
    {
        var p = new PolynomialExpander().Expand(Sub(Div(Pow(Add(Indexed("x", 3), Indexed("a", 1, -2)), 3), Int(4)), Name("y")));
        var e = FromPolynomial(p);
        Assert.Equal(p, new PolynomialExpander().Expand(e));
        Assert.Contains("a[1,(-2)]", Format(e));
        Assert.Equal("0", Format(FromPolynomial(ReferencePolynomial.Zero)));
    }
}
