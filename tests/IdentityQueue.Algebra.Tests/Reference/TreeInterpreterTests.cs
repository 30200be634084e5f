using System.Numerics;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Reference;

public class TreeInterpreterTests
{
    private static readonly TestPrimeField Field = new(TestPrimeField.Mersenne31);

    private static Dictionary<string, TestResidue> RandomPoint(ref Xoshiro256 random, TestPrimeField field, IEnumerable<string> names)
    {
        var point = new Dictionary<string, TestResidue>();
        foreach (var n in names) point[n] = field.Sample(ref random);
        return point;
    }

    private static InterpreterResult<TestResidue> Interpret(Expr e, IReadOnlyDictionary<string, TestResidue> point, TestPrimeField? field = null) =>
        new TreeInterpreter<TestPrimeField, TestResidue>(field ?? Field, point).Evaluate(e);

    [Fact]
    public void Agrees_with_the_expanded_polynomial_on_random_expressions()
    {
        // The interpreter and ReferencePolynomial.Evaluate are independent routes to the same value mod p.
        var random = new Xoshiro256(2024);
        var checkedCount = 0;
        foreach (var (seed, division) in new[] { (11UL, false), (12UL, true) })
        {
            var generator = new RandomExpressions(seed, new RandomExpressionOptions { AllowDivision = division });
            for (var t = 0; t < 250; t++)
            {
                var e = generator.Next();
                var polynomial = new PolynomialExpander().Expand(e.Expression);
                var point = RandomPoint(ref random, Field, RandomExpressions.VariableUniverse);
                var result = Interpret(e.Expression, point);
                if (result.IsUndefined || !polynomial.TryEvaluate<TestPrimeField, TestResidue>(Field, point, out var expected)) continue;
                Assert.True(expected == result.Scalar, $"{e.Text}: interpreter {result.Scalar}, polynomial {expected}");
                checkedCount++;
            }
        }
        Assert.True(checkedCount >= 480, $"only {checkedCount} comparisons were defined");
    }

    [Fact]
    public void Agrees_with_the_expansion_on_matrix_expressions()
    {
        var random = new Xoshiro256(99);
        Expr M(string v, int n, Expr shift) => MatrixOf("i", Int(1), Int(n), "j", Int(1), Int(n), Add(Pow(Indexed(v, Name("i")), Name("j")), Mul(shift, Sub(Name("i"), Name("j")))));
        var a = M("x", 4, Name("y"));
        var b = M("x", 4, Name("z"));
        var expressions = new[]
        {
            Call(Builtins.Det, a),
            Call(Builtins.Det, Mul(a, b)),
            Call(Builtins.Permanent, a),
            Call(Builtins.Trace, Pow(a, 3)),
            Call(Builtins.Det, Add(Call(Builtins.Transpose, a), Mul(Name("w"), Call(Builtins.Identity, Int(4))))),
            Call(Builtins.Pfaffian, Sub(a, Call(Builtins.Transpose, a))),
            Call(Builtins.Det, Sum("k", Int(1), Int(2), Mul(Name("k"), a))),
        };
        foreach (var e in expressions)
        {
            var polynomial = new PolynomialExpander().Expand(e);
            for (var t = 0; t < 5; t++)
            {
                var point = RandomPoint(ref random, Field, RandomExpressions.VariableUniverse);
                Assert.Equal(polynomial.Evaluate<TestPrimeField, TestResidue>(Field, point), Interpret(e, point).Scalar);
            }
        }
        var interpreter = new TreeInterpreter<TestPrimeField, TestResidue>(Field, RandomPoint(ref random, Field, RandomExpressions.VariableUniverse));
        var matrix = interpreter.Evaluate(Mul(Int(2), a));
        Assert.True(matrix.Value!.IsMatrix);
        Assert.Equal(4, matrix.Value.Rows);
        // Matrix identities hold entrywise: Cayley–Hamilton for 2×2 (Cayley, 1858) holds, AB = BA does not.
        var c = MatrixOf([[Name("x"), Name("y")], [Name("z"), Name("w")]]);
        var d = MatrixOf([[Name("y"), Int(1)], [Name("x"), Int(2)]]);
        var cayleyHamilton = Add(Sub(Pow(c, 2), Mul(Call(Builtins.Trace, c), c)), Mul(Call(Builtins.Det, c), Call(Builtins.Identity, Int(2))));
        var zero = interpreter.EvaluateDifference(cayleyHamilton, MatrixOf([[Int(0), Int(0)], [Int(0), Int(0)]]));
        Assert.True(zero.Value!.IsMatrix && interpreter.IsZero(zero.Value));
        Assert.False(interpreter.IsZero(interpreter.EvaluateDifference(Mul(c, d), Mul(d, c)).Value!));
        Assert.Throws<ReferenceException>(() => interpreter.EvaluateDifference(c, Int(0)));
    }

    [Fact]
    public void Elimination_determinant_handles_pivoting_and_singular_matrices()
    {
        var point = new Dictionary<string, TestResidue> { ["x"] = new(5), ["y"] = new(7) };
        // A zero top-left entry forces a row swap: det [[0, 1], [1, 0]] = −1.
        Assert.Equal(Field.FromInteger(-1), Interpret(Call(Builtins.Det, MatrixOf([[Int(0), Int(1)], [Int(1), Int(0)]])), point).Scalar);
        // Two equal rows: det = 0.
        var singular = MatrixOf([[Name("x"), Name("y"), Int(1)], [Int(2), Int(3), Int(4)], [Name("x"), Name("y"), Int(1)]]);
        Assert.Equal(Field.Zero, Interpret(Call(Builtins.Det, singular), point).Scalar);
        // det [[x, y], [y, x]] = x² − y² = 25 − 49 = −24.
        Assert.Equal(Field.FromInteger(-24), Interpret(Call(Builtins.Det, MatrixOf([[Name("x"), Name("y")], [Name("y"), Name("x")]])), point).Scalar);
        // perm of the all-ones 6×6 matrix is 6! = 720.
        Assert.Equal(Field.FromInteger(720), Interpret(Call(Builtins.Permanent, MatrixOf("i", Int(1), Int(6), "j", Int(1), Int(6), Int(1))), point).Scalar);
    }

    [Fact]
    public void Vanished_denominators_are_undefined()
    {
        var x = Name("x");
        var y = Name("y");
        var same = new Dictionary<string, TestResidue> { ["x"] = new(3), ["y"] = new(3) };
        var different = new Dictionary<string, TestResidue> { ["x"] = new(3), ["y"] = new(1) };
        var quotient = Div(Int(1), Sub(x, y));
        Assert.True(Interpret(quotient, same).IsUndefined);
        Assert.Contains("division by zero", Interpret(quotient, same).UndefinedReason);
        Assert.Equal(Field.FromInteger((TestPrimeField.Mersenne31 + 1) / 2), Interpret(quotient, different).Scalar); // 1/2
        // A vanished denominator makes the whole value undefined, even multiplied by 0.
        Assert.True(Interpret(Mul(Int(0), quotient), same).IsUndefined);
        Assert.True(new TreeInterpreter<TestPrimeField, TestResidue>(Field, same).EvaluateDifference(quotient, Int(0)).IsUndefined);
        // binom(x, k) needs 1/k!: undefined in GF(7) for k ≥ 7, fine for k = 6.
        var gf7 = new TestPrimeField(7);
        Assert.True(Interpret(Call(Builtins.Binom, x, Int(7)), different, gf7).IsUndefined);
        Assert.False(Interpret(Call(Builtins.Binom, x, Int(6)), different, gf7).IsUndefined);
        // binom(3, 6) = 0 in any field where 6! is invertible.
        Assert.Equal(gf7.Zero, Interpret(Call(Builtins.Binom, x, Int(6)), different, gf7).Scalar);
    }

    [Fact]
    public void Interprets_the_integer_and_q_functions()
    {
        var point = new Dictionary<string, TestResidue> { ["q"] = new(2), ["x"] = new(10) };
        // qint(5, 2) = 31, qfact(3, 2) = 1·3·7 = 21, qbinom(4, 2, 2) = 1 + 2 + 8 + 8 + 16 = 35, fact(6) = 720.
        Assert.Equal(Field.FromInteger(31), Interpret(Call(Builtins.QInt, Int(5), Name("q")), point).Scalar);
        Assert.Equal(Field.FromInteger(21), Interpret(Call(Builtins.QFact, Int(3), Name("q")), point).Scalar);
        Assert.Equal(Field.FromInteger(35), Interpret(Call(Builtins.QBinom, Int(4), Int(2), Name("q")), point).Scalar);
        Assert.Equal(Field.Zero, Interpret(Call(Builtins.QBinom, Int(4), Int(5), Name("q")), point).Scalar);
        Assert.Equal(Field.FromInteger(720), Interpret(Call(Builtins.Fact, Int(6)), point).Scalar);
        Assert.Equal(Field.FromInteger(120), Interpret(Call(Builtins.Binom, Name("x"), Int(3)), point).Scalar); // C(10, 3)
        // The family parameter n is an integer, so x^n uses it as an exponent.
        var interpreter = new TreeInterpreter<TestPrimeField, TestResidue>(Field, point, new Dictionary<string, BigInteger> { ["n"] = 3 });
        Assert.Equal(Field.FromInteger(1000), interpreter.Evaluate(Pow(Name("x"), Name("n"))).Scalar);
        Assert.Throws<ReferenceException>(() => Interpret(Name("y"), point));
    }

    [Fact]
    public void True_generated_identities_vanish_at_random_points()
    {
        var random = new Xoshiro256(5);
        var generator = new RandomExpressions(77, new RandomExpressionOptions { AllowDivision = true });
        for (var t = 0; t < 150; t++)
        {
            var identity = generator.NextIdentity();
            var point = RandomPoint(ref random, Field, RandomExpressions.VariableUniverse);
            var result = new TreeInterpreter<TestPrimeField, TestResidue>(Field, point).EvaluateDifference(identity.Left, identity.Right);
            if (result.IsUndefined) continue;
            if (identity.IsTrue) Assert.True(Field.IsZero(result.Scalar), identity.Text);
        }
    }
}
