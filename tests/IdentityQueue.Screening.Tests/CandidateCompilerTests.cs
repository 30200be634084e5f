using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;

namespace IdentityQueue.Screening.Tests;

/// <summary>The worker's compiler shares one compilation per scalar-parameter family and screens each instance as compiling it alone would.</summary>
public class CandidateCompilerTests
{
    // (x + a)^2 = x^2 + a^2 + 2x holds exactly when 2a = 2, i.e. a = 1 (the binomial theorem, common practice).
    [Fact]
    public void ScalarFamily_IsSharedAndGivesTheSameVerdicts()
    {
        var entry = Some.Entry("(x + a)^2 = x^2 + a^2 + 2*x for a in -3..3");
        var compiler = new CandidateCompiler(Limits.Default);
        var family = FamilyExpander.Expand(entry);
        var options = new ScreeningOptions { Seed = 5 };
        foreach (var (parameters, i) in family.Instances.Select((p, i) => (p, i)))
        {
            var shared = compiler.Compile(entry, parameters).Value!;
            Assert.True(compiler.IsShared(entry, parameters));
            var alone = IdentityCompiler.Compile(entry, parameters).Value!;
            var a = Screener.Screen(shared, options, (ulong)i);
            var b = Screener.Screen(alone, options, (ulong)i);
            Assert.Equal(parameters["a"] == 1 ? Verdict.Survived : Verdict.Refuted, a.Verdict);
            Assert.Equal(b.Verdict, a.Verdict);
        }
    }

    [Fact]
    public void StructuralFamily_IsCompiledInstanceByInstance()
    {
        // The row sums of Pascal's triangle (the binomial theorem at x = 1, common practice); n shapes the sum.
        var entry = Some.Entry("sum(k in 0..n: binom(n, k)) = 2^n for n in 0..5");
        var compiler = new CandidateCompiler(Limits.Default);
        foreach (var parameters in FamilyExpander.Expand(entry).Instances)
        {
            var compiled = compiler.Compile(entry, parameters);
            Assert.True(compiled.Success);
            Assert.Equal(Verdict.Survived, Screener.Screen(compiled.Value!, new ScreeningOptions { Seed = 5 }, 1).Verdict);
        }
        Assert.False(compiler.IsShared(entry, FamilyExpander.Expand(entry).Instances[0]));
    }

    // The same text is another family when other names are parameters: with b a variable, a*x + b = a*x + 1 is false
    // for every a; with b a parameter too, the instance b = 1 is true (common practice).
    [Fact]
    public void SameText_WithOtherParameters_IsAnotherFamily()
    {
        var compiler = new CandidateCompiler(Limits.Default);
        var options = new ScreeningOptions { Seed = 5 };
        // as the store binds them: the text without the ranges
        var onlyA = Some.Entry("a*x + b = a*x + 1 for a in 1..2") with { Text = "a*x + b = a*x + 1" };
        foreach (var p in FamilyExpander.Expand(onlyA).Instances)
            Assert.Equal(Verdict.Refuted, Screener.Screen(compiler.Compile(onlyA, p).Value!, options, 1).Verdict);
        var both = Some.Entry("a*x + b = a*x + 1 for a in 1..2, b in 1..2") with { Text = "a*x + b = a*x + 1" };
        foreach (var p in FamilyExpander.Expand(both).Instances)
            Assert.Equal(p["b"] == 1 ? Verdict.Survived : Verdict.Refuted, Screener.Screen(compiler.Compile(both, p).Value!, options, 1).Verdict);
    }
}
