using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Algebra.Tests.Reference;

namespace IdentityQueue.Algebra.Tests.Evaluate;

/// <summary>
/// The compiled straight-line program (hash-consed, constant-folded, dead code removed) computes what a direct walk of the
/// expression tree computes, at random points, on every rung of the ladder and in an extension field.
/// </summary>
public class CompiledVsInterpretedTests
{
    private static void Agree<TField, T>(TField field, ulong seed, int count = 400, bool division = true)
        where TField : struct, IField<T> where T : struct
    {
        var generator = new RandomExpressions(seed, new RandomExpressionOptions { AllowDivision = division });
        var random = new Xoshiro256(seed * 7919);
        var agreed = 0;
        for (var i = 0; i < count; i++)
        {
            var identity = generator.NextIdentity();
            var entry = new IdentityEntry(null, identity.Left, identity.Right, FieldSpec.Rationals, [], 1, identity.Text);
            var compiled = IdentityCompiler.Compile(entry);
            Assert.True(compiled.Success, $"{identity.Text}: {compiled.Error}");
            var program = compiled.Value!.Program;

            var point = new Dictionary<string, T>();
            foreach (var name in RandomExpressions.VariableUniverse) point[name] = field.Sample(ref random);
            var values = program.Variables.Select(v => point[v]).ToArray();

            var interpreted = new TreeInterpreter<TField, T>(field, point).EvaluateDifference(identity.Left, identity.Right);
            var registers = new T[program.Length];
            var defined = Evaluator.TryPrepareConstants<TField, T>(field, program, out var constants)
                && Evaluator.Evaluate<TField, T>(field, program, constants, values, registers);
            if (interpreted.IsUndefined || !defined) continue; // the two may divide by different (equal) expressions
            Assert.True(field.AreEqual(interpreted.Scalar, registers[program.Outputs[0]]), $"disagree on {identity.Text}");
            agreed++;
        }
        Assert.True(agreed > count * 3 / 4, $"only {agreed} of {count} comparisons were defined");
    }

    /// <summary>Negative exponents (a reciprocal, b^(−e) = 1/b^e) and the integer functions: the program and the tree walk agree.</summary>
    [Theory]
    [InlineData("x^(-3)*y^2 - x^(k - n) = (x + y)^-2 for n in 0..4, k in 0..4")]
    [InlineData("qbinom(m, j, q)*q^(j - m) = q^(-m) for m in 0..4, j in 0..6")]
    [InlineData("(-1)^k*x^k = (-x)^k for k in -4..4")]
    [InlineData("when(n <= 2, x^(n - 3), y^min(n, 3)) + x^mod(n, 3)*y^floor(n/2) = iverson(n != 1)*x for n in 0..6")]
    [InlineData("when(n >= 1 and n <= 3 or n = 5, x^-n, y^abs(n - 4)) = iverson(n < 2 or n > 4 and n != 6)*x*delta(n, 2) for n in 0..6")]
    public void NegativeExponents_AndIntegerFunctions(string line)
    {
        var entry = CatalogueParser.ParseIdentity(line).Value;
        var family = FamilyExpander.Expand(entry);
        Assert.True(family.Success, family.Error?.ToString());
        var r = new Xoshiro256(17);
        var field = PrimeField62.CreateRandom(ref r);
        foreach (var parameters in family.Instances)
        {
            var compiled = IdentityCompiler.Compile(entry, parameters);
            Assert.True(compiled.Success, compiled.Error?.ToString());
            var program = compiled.Value!.Program;
            var point = new Dictionary<string, Residue62> { ["x"] = field.Sample(ref r), ["y"] = field.Sample(ref r), ["q"] = field.Sample(ref r) };
            var interpreted = new TreeInterpreter<PrimeField62, Residue62>(field, point, parameters).EvaluateDifference(entry.Left, entry.Right);
            var registers = new Residue62[program.Length];
            Assert.True(Evaluator.TryPrepareConstants<PrimeField62, Residue62>(field, program, out var constants));
            Assert.True(Evaluator.Evaluate<PrimeField62, Residue62>(field, program, constants, program.Variables.Select(v => point[v]).ToArray(), registers));
            Assert.False(interpreted.IsUndefined);
            Assert.True(field.AreEqual(interpreted.Scalar, registers[program.Outputs[0]]), $"disagree on {line} at {string.Join(", ", parameters)}");
        }
    }

    [Fact]
    public void Rung31() { var r = new Xoshiro256(1); Agree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 1); }

    [Fact]
    public void Rung62() { var r = new Xoshiro256(2); Agree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 2); }

    [Fact]
    public void Rung127() { var r = new Xoshiro256(3); Agree<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), 3); }

    [Fact]
    public void BigRung256() { var r = new Xoshiro256(4); Agree<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(256, ref r), 4, 150); }

    [Fact]
    public void ExtensionOfGF7()
    {
        var r = new Xoshiro256(5);
        var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(7), 12, ref r);
        Agree<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, 5, 150, division: false);
    }

    [Fact]
    public void ExactRationals()
    {
        Agree<RationalField, Exact.Rational>(default, 6, 100);
    }
}
