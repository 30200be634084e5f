using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Algebra.Tests.Reference;
using Xunit.Abstractions;

namespace IdentityQueue.Algebra.Tests.Bounds;

/// <summary>
/// The degree bound D is never below the true total degree of lhs − rhs, found by exact expansion with the test-side
/// reference polynomials; and the height bound covers the true coefficient 1-norm of division-free differences.
/// </summary>
public class DegreeBoundPropertyTests(ITestOutputHelper output)
{
    private static IdentityEntry Entry(Expr lhs, Expr rhs) => new(null, lhs, rhs, FieldSpec.Rationals, [], 1, "");

    [Theory]
    [InlineData(1UL)]
    [InlineData(2UL)]
    [InlineData(3UL)]
    public void DegreeBound_IsNeverBelowTheExpandedDegree(ulong seed)
    {
        var random = new RandomExpressions(seed);
        int checkedCount = 0, exact = 0;
        double slack = 0;
        for (var i = 0; i < 1500; i++)
        {
            var identity = random.NextIdentity();
            var compiled = IdentityCompiler.Compile(Entry(identity.Left, identity.Right));
            Assert.True(compiled.Success, $"{identity.Text}: {compiled.Error}");
            var difference = PolynomialExpander.ExpandIdentity(identity.Left, identity.Right);
            var trueDegree = difference.TotalDegree;
            var bound = (int)compiled.Value!.Bounds.Degree;
            Assert.True(bound >= trueDegree, $"D = {bound} < true degree {trueDegree} for {identity.Text}");
            if (trueDegree >= 0)
            {
                checkedCount++;
                if (bound == trueDegree) exact++;
                slack += bound - trueDegree;
            }
        }
        output.WriteLine($"seed {seed}: {checkedCount} nonzero differences, D exact for {exact} ({100.0 * exact / checkedCount:F1}%), mean excess {slack / checkedCount:F2}");
    }

    // Each side alone: the degree of one expression is where tightness shows (a difference may cancel its top terms).
    [Fact]
    public void DegreeBound_OfSingleExpressions_IsTightOnDivisionFreeForms()
    {
        var random = new RandomExpressions(11, new RandomExpressionOptions { AllowSpecialFunctions = false });
        int total = 0, exact = 0;
        for (var i = 0; i < 3000; i++)
        {
            var e = random.Next();
            var compiled = IdentityCompiler.Compile(Entry(e.Expression, new IntegerLiteral(0, new SourcePosition(1, 1))));
            Assert.True(compiled.Success, $"{e.Text}: {compiled.Error}");
            var expanded = new PolynomialExpander().Expand(e.Expression);
            var bound = (int)compiled.Value!.Bounds.Degree;
            Assert.True(bound >= Math.Max(0, expanded.TotalDegree), $"D = {bound} < {expanded.TotalDegree} for {e.Text}");
            if (expanded.IsZero) continue;
            total++;
            if (bound == expanded.TotalDegree) exact++;
        }
        output.WriteLine($"single expressions: D exact for {exact} of {total} ({100.0 * exact / total:F1}%)");
        Assert.True(exact > total * 0.8, $"D exact for only {exact} of {total}");
    }

    [Fact]
    public void HeightBound_CoversTheOneNormOfDivisionFreeDifferences()
    {
        var random = new RandomExpressions(21, new RandomExpressionOptions { AllowSpecialFunctions = false });
        for (var i = 0; i < 1500; i++)
        {
            var identity = random.NextIdentity();
            var compiled = IdentityCompiler.Compile(Entry(identity.Left, identity.Right));
            Assert.True(compiled.Success, $"{identity.Text}: {compiled.Error}");
            var difference = PolynomialExpander.ExpandIdentity(identity.Left, identity.Right).Scalar!;
            if (difference.IsZero || !difference.DenominatorLcm().IsOne) continue;
            var norm = difference.OneNormLog2();
            Assert.True(compiled.Value!.Bounds.HeightLog2 >= norm - 1e-9, $"H = 2^{compiled.Value.Bounds.HeightLog2} < 2^{norm} for {identity.Text}");
        }
    }
}
