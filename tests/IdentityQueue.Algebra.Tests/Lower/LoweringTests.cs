using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Lower;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Lower;

public class LoweringTests
{
    private static IdentityEntry Entry(string text) => CatalogueParser.ParseIdentity(text).Value;

    // The shape of the sides is part of the lowered form: null for scalars, (rows, columns) for matrices, 0×0 included
    // (common practice: the empty matrix is the identity matrix of order 0, so zero(0) = id(0)).
    [Theory]
    [InlineData("(x+1)^2 = x^2 + 2*x + 1", -1, -1)]
    [InlineData("transpose([[a, b, c]]) = [[a], [b], [c]]", 3, 1)]
    [InlineData("zero(0) = id(0)", 0, 0)]
    public void Lower_GivesTheProgramAndTheShapeOfTheSides(string text, int rows, int columns)
    {
        var lowered = Lowering.Lower(Entry(text));
        Assert.True(lowered.Success, lowered.Error?.ToString());
        Assert.Equal(rows < 0 ? null : (rows, columns), lowered.Value.Shape);
        Assert.Equal(rows <= 0 ? 1 : rows * columns, lowered.Value.Program.Outputs.Length);
    }

    // The compiler is the lowering plus the bounds: the same program, instruction for instruction.
    [Theory]
    [InlineData("det(matrix(i in 1..n, j in 1..n: x[i]^(j-1))) = prod(i in 1..n: prod(j in i+1..n: x[j] - x[i]))")]
    [InlineData("qbinom(n, 2, q) = sum(k in 0..2: q^k) * qint(n - 1, q) / (1 + q)")]
    public void Compile_IsTheLoweringWithItsBounds(string text)
    {
        var parameters = new Dictionary<string, BigInteger> { ["n"] = 4 };
        var lowered = Lowering.Lower(Entry(text), parameters).Value;
        var compiled = IdentityCompiler.Compile(Entry(text), parameters).Value;
        Assert.Equal(lowered.Program.Instructions, compiled.Program.Instructions);
        Assert.Equal(lowered.Program.Constants, compiled.Program.Constants);
    }

    // An error keeps its position and context, as from the compiler.
    [Fact]
    public void Lower_ReportsErrorsWithTheirPosition()
    {
        var lowered = Lowering.Lower(Entry("x/(2-2) = x"));
        Assert.False(lowered.Success);
        Assert.Equal("line 1, column 2, lhs: division by zero", lowered.Error.ToString());
    }
}
