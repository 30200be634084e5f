using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Compile;

/// <summary>
/// Input that parses but cannot be compiled: each gives a diagnostic naming the position and the problem, never an
/// exception, and limits are checked before the work they guard.
/// </summary>
public class CompileErrorTests
{
    public static TheoryData<string, string, int> Cases => new()
    {
        { "[[a,b],[c,d]]^(-1) = 1", "a matrix has only non-negative integer powers", 16 },
        { "0^(-1) = x", "0 raised to the negative power -1", 2 },
        { "x^y = 1", "'y' is a variable", 3 },
        { "x^(10^1000) = 1", "the limit MaxExponentBits", 4 },
        { "x^(-2^600) = 1", "the exponent has 601 bits; the limit MaxExponentBits is 512", 4 },
        { "2^(2^5000) = 0", "the limit MaxParameterBits", 5 },
        { "x^(1/2) = 0", "an exponent must be an integer, but it is 1/2", 4 },
        { "sum(k in 1..10^15: x^k) = 0", "the limit MaxProgramSize", 1 },
        { "prod(k in 1..10^7: x + k) = 0", "the limit MaxProgramSize", 1 },
        { "sum(k in 1..n: x) = 0", "'n' is a variable", 13 },
        { "fact(10^6) = 1", "the limit MaxFunctionArgument", 6 },
        { "fact(-1) = 1", "must be non-negative", 6 },
        { "qint(-1, q) = 0", "must be non-negative", 6 },
        { "binom(x, y) = 0", "binom's second argument must be an integer expression in the parameters, but 'y' is a variable", 10 },
        { "1/(2-2) = x", "division by zero", 2 },
        { "x[1/2] = 0", "an index must be an integer, but it is 1/2", 3 },
        { "det([[a,b,c],[d,e,f]]) = 0", "det needs a square matrix, not a 2×3 matrix", 5 },
        { "det(x) = 0", "det's argument must be a matrix, but it is a scalar", 5 },
        { "tr([[a,b]]) = 0", "tr needs a square matrix", 4 },
        { "pf([[0,1],[2,0]]) = 0", "entry [2,1] is not the negative of entry [1,2] (their sum is 3)", 4 },
        { "pf([[1,a],[-a,0]]) = 0", "entry [1,1] is 1, not 0", 4 },
        { "pf([[0,a,b],[-a,0,c],[-b,-c,0]]) = 0", "even order", 4 },
        { "perm(matrix(i in 1..31, j in 1..31: a[i,j])) = 0", "the limit MaxPermanentOrder", 1 },
        { "[[a,b],[c,d]] + [[a,b,c],[d,e,f]] = 0", "cannot add a 2×2 matrix and a 2×3 matrix", 15 },
        { "[[a,b],[c,d]] - [[a,b,c],[d,e,f]] = 0", "cannot subtract a 2×3 matrix from a 2×2 matrix", 15 },
        { "[[a,b]] * [[c,d]] = 0", "cannot multiply a 1×2 matrix by a 1×2 matrix", 9 },
        { "x + [[a]] = 0", "cannot add a scalar and a 1×1 matrix", 3 },
        { "x/[[a]] = 0", "cannot divide by a matrix", 3 },
        { "[[a,b]]^2 = 0", "only a square matrix has powers", 1 },
        { "[[a,b],[c,d]] = x", "the two sides differ in type", 17 },
        { "det(matrix(i in 1..0, j in 1..2: x)) = 0", "det needs a square matrix, not a 0×2 matrix", 5 },
        { "matrix(i in 1..3000, j in 1..2: x) = 0", "the limit MaxMatrixOrder", 1 },
        { "[[x]] + 1 = 0", "cannot add a 1×1 matrix and a scalar", 7 },
        { "id(-1) = 0", "id's argument is -1; it must be between 0 and", 4 },
        { "n[1] = x for n in 1..2", "'n' is an integer parameter here and cannot be indexed", 1 },
        { "[[x]]^n = 1 for n in -2..2", "a matrix has only non-negative integer powers", 7 },
        { "fib(x) = 1", "an argument of fib must be an integer expression in the parameters, but 'x' is a variable", 5 },
        { "mod(n, n - 1) = 0 for n in 1..2", "mod by zero", 8 },
        { "stirling1(-1, 0) = 0", "stirling1's first argument must be non-negative, but it is -1", 1 },
        { "catalan(n) = 0 for n in -1..0", "catalan's argument must be non-negative", 1 },
        { "harmonic(-3) = 0", "harmonic's argument must be non-negative", 1 },
        { "stirling2(3000, 1500) = 0", "the limit MaxNumberFunctionWork", 1 },
        { "fib(10^4) = 0", "fib(10000) has more than 4096 bits (the limit MaxParameterBits)", 1 },
        { "bernoulli(2000) = 0", "the limit MaxParameterBits", 1 },
        { "when(n < 0, fact(n), 1/(n - n)) = 0 for n in 0..1", "division by zero", 23 },
        { "binom(x, 2^40) = 0", "the limit MaxFunctionArgument", 10 },
        { "qbinom(3000, 1500, q) = 0", "the limit MaxProgramSize", 1 },
    };

    [Theory]
    [MemberData(nameof(Cases))]
    public void CompileError_NamesThePositionAndTheProblem(string line, string fragment, int column)
    {
        var parsed = CatalogueParser.ParseIdentity(line);
        Assert.True(parsed.Success, $"parse failed: {parsed.Error}");
        var family = FamilyExpander.Expand(parsed.Value);
        Assert.True(family.Success, family.Error?.ToString());
        var compiled = IdentityCompiler.Compile(parsed.Value, family.Instances[0]);
        Assert.False(compiled.Success, $"{line} compiled");
        Assert.Contains(fragment, compiled.Error!.Message);
        Assert.Equal(new SourcePosition(1, column), compiled.Error.Position);
    }

    [Fact]
    public void FamilyTooLarge_IsRefusedBeforeExpansion()
    {
        var parsed = CatalogueParser.ParseIdentity("x = y for n in 1..10^12");
        var family = FamilyExpander.Expand(parsed.Value);
        Assert.False(family.Success);
        Assert.Contains("the limit MaxFamilySize", family.Error!.Message);
    }

    [Fact]
    public void EmptyFamily_IsAnError()
    {
        var family = FamilyExpander.Expand(CatalogueParser.ParseIdentity("x = y for n in 5..2").Value);
        Assert.False(family.Success);
        Assert.Contains("no instances", family.Error!.Message);
    }

    [Fact]
    public void TriangularFamily_UsesEarlierParameters()
    {
        var family = FamilyExpander.Expand(CatalogueParser.ParseIdentity("binom(n, k) = binom(n, n-k) for n in 0..3, k in 0..n").Value);
        Assert.True(family.Success);
        Assert.Equal(10, family.Instances.Count);
    }
}
