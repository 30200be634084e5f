using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Compile;

/// <summary>
/// A family whose parameters enter only as scalars is compiled once: each instance binds its values into the shared
/// program, which then computes what compiling the instance alone computes (checked at random points mod random primes),
/// with bounds no smaller. A family whose parameters shape the program gets no shared program.
/// </summary>
public class FamilyTemplateTests
{
    private static IdentityEntry Entry(string line)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, $"{line}: {parsed.Error}");
        return parsed.Value;
    }

    private static IReadOnlyList<IReadOnlyDictionary<string, BigInteger>> Instances(IdentityEntry entry)
    {
        var family = FamilyExpander.Expand(entry);
        Assert.True(family.Success, $"{entry.Text}: {family.Error}");
        return family.Instances;
    }

    // Binomial theorem and the product of linear factors (common practice); the false ones hold for some parameters only.
    [Theory]
    [InlineData("(x + a)^2 = x^2 + 2*a*x + a^2 for a in -3..3")]
    [InlineData("(x + a)*(x + b) = x^2 + (a + b)*x + a*b for a in 0..4, b in -2..2")]
    [InlineData("(x + a)^2 = x^2 + a^2 + 2*x for a in -2..2")]
    [InlineData("a/(x - a) + 1 = x/(x - a) for a in 0..3")]
    [InlineData("det([[x, a], [b, y]]) = x*y - a*b*c for a in 1..2, b in 1..2, c in 0..2")]
    [InlineData("sum(k in 1..3: k*a*x^k) = a*x + 2*a*x^2 + 3*a*x^3 for a in 1..3")]
    [InlineData("sum(a in 1..3: a*x) + a = 6*x + a for a in 5..6")] // the bound variable shadows the parameter
    [InlineData("[[a, 1], [0, a]]^2 = [[a^2, 2*a], [0, a^2]] for a in 1..3")]
    [InlineData("(x + 2)^2 = x^2 + 4*x + 4 for n in 1..3")] // a parameter that appears nowhere
    public void ScalarParameters_ShareOneCompilation_AndEachInstanceComputesWhatItsOwnCompilationDoes(string line)
    {
        var entry = Entry(line);
        var instances = Instances(entry);
        var template = IdentityCompiler.CompileTemplate(entry, instances[0]);
        Assert.NotNull(template);
        var random = new Xoshiro256(2027);
        foreach (var parameters in instances)
        {
            var shared = template!.Instance(parameters);
            var alone = IdentityCompiler.Compile(entry, parameters);
            Assert.True(shared.Success && alone.Success);
            Assert.Same(template.Program.Instructions, shared.Value!.Program.Instructions);
            Assert.True(shared.Value.Bounds.Degree >= alone.Value!.Bounds.Degree);
            Assert.True(shared.Value.Bounds.DivisorDegree >= alone.Value.Bounds.DivisorDegree);
            for (var trial = 0; trial < 20; trial++)
            {
                var field = PrimeField62.CreateRandom(ref random);
                var point = new Dictionary<string, Residue62>();
                foreach (var v in alone.Value.Program.Variables.Concat(shared.Value.Program.Variables))
                    if (!point.ContainsKey(v)) point[v] = field.Sample(ref random);
                var a = Outputs(field, alone.Value.Program, point);
                var s = Outputs(field, shared.Value.Program, point);
                Assert.Equal(a is null, s is null);
                if (a is not null) Assert.Equal(a, s);
            }
        }
    }

    private static ulong[]? Outputs(PrimeField62 field, StraightLineProgram program, Dictionary<string, Residue62> at)
    {
        if (!Evaluator.TryPrepareConstants<PrimeField62, Residue62>(field, program, out var constants)) return null;
        var point = program.Variables.Select(v => at[v]).ToArray();
        var registers = new Residue62[program.Length];
        if (!Evaluator.Evaluate<PrimeField62, Residue62>(field, program, constants, point, registers)) return null;
        return program.Outputs.Select(o => field.ToUInt64(registers[o])).ToArray();
    }

    [Theory]
    [InlineData("sum(k in 0..n: binom(n, k)) = 2^n for n in 0..4")] // a range and binom's argument
    [InlineData("(x + 1)^n = (x + 1)^n for n in 1..3")] // an exponent
    [InlineData("det(matrix(i in 1..n, j in 1..n: x[i]^(j - 1))) = 1 for n in 1..3")] // a matrix size
    [InlineData("x[n] = x[n] for n in 1..3")] // an index
    [InlineData("a*x^a = a*x^a for a in 1..3")] // a scalar and an exponent at once
    [InlineData("x*fib(n) = x*fib(n) for n in 1..3")] // a number function's value is a constant of the instance
    [InlineData("iverson(n < 2)*x = 0 for n in 1..3")] // a condition
    [InlineData("when(n < 2, x, y) = x for n in 1..3")] // a branch chosen by the parameter
    [InlineData("x^(n - 3) = 1 for n in 1..3")] // a negative exponent
    public void ParametersThatShapeTheProgram_GetNoSharedCompilation(string line)
    {
        var entry = Entry(line);
        Assert.Null(IdentityCompiler.CompileTemplate(entry, Instances(entry)[0]));
    }

    [Fact]
    public void ASingleIdentity_GetsNoSharedCompilation()
    {
        Assert.Null(IdentityCompiler.CompileTemplate(Entry("(x + 1)^2 = x^2 + 2*x + 1"), new Dictionary<string, BigInteger>()));
    }

    [Fact]
    public void WithParameters_NeedsEveryParameter()
    {
        var entry = Entry("(x + a)*(x + b) = x^2 + (a + b)*x + a*b for a in 0..1, b in 0..1");
        var template = IdentityCompiler.CompileTemplate(entry, Instances(entry)[0])!;
        Assert.Throws<ArgumentException>(() => template.Program.WithParameters(new Dictionary<string, BigInteger> { ["a"] = 1 }));
        var alone = IdentityCompiler.Compile(entry, Instances(entry)[0]).Value!.Program;
        Assert.Throws<InvalidOperationException>(() => alone.WithParameters(Instances(entry)[0]));
    }
}
