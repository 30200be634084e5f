using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Tests.Evaluate;

/// <summary>
/// The long kernels observe a cancellation token at a cheap interval (issue 12): with a cancelled token they throw
/// <see cref="OperationCanceledException"/> instead of finishing (the sizes are chosen so that finishing takes seconds, so
/// a kernel that ignores the token fails here rather than hangs); with a live token they give the same values as without.
/// </summary>
public class CancellationTests
{
    private static CancellationToken Cancelled() => new(canceled: true);

    private static T[] Random<TField, T>(TField f, int n, ulong seed) where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        var a = new T[n * n];
        for (var k = 0; k < a.Length; k++) a[k] = f.Sample(ref random);
        return a;
    }

    private static void PermanentObserves<TField, T>(TField f) where TField : struct, IField<T> where T : struct
    {
        Assert.Throws<OperationCanceledException>(() => MatrixKernels.Permanent<TField, T>(f, Random<TField, T>(f, 24, 1), 24, Cancelled()));
        var small = Random<TField, T>(f, 10, 2);
        using var live = new CancellationTokenSource();
        Assert.True(f.AreEqual(MatrixKernels.Permanent<TField, T>(f, small, 10), MatrixKernels.Permanent<TField, T>(f, small, 10, live.Token)));
    }

    [Fact]
    public void Permanent_Glynn31_ObservesCancellation() => PermanentObserves<PrimeField31, Residue31>(PrimeField31.Create(2147483629));

    [Fact]
    public void Permanent_Glynn62Avx512_ObservesCancellation() => PermanentObserves<PrimeField62, Residue62>(PrimeField62.Create(4611686018427387847));

    [Fact]
    public void Permanent_RyserInCharacteristicTwo_ObservesCancellation() => PermanentObserves<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(2));

    [Fact]
    public void DeterminantAndPfaffian_ObserveCancellation()
    {
        var f31 = PrimeField31.Create(2147483629);
        var f62 = PrimeField62.Create(4611686018427387847);
        Assert.Throws<OperationCanceledException>(() => MatrixKernels.Determinant(f31, Random<PrimeField31, Residue31>(f31, 300, 3), 300, Cancelled()));
        // the 62-bit rung's blocked elimination (order ≥ 24)
        Assert.Throws<OperationCanceledException>(() => MatrixKernels.Determinant(f62, Random<PrimeField62, Residue62>(f62, 300, 4), 300, Cancelled()));
        Assert.Throws<OperationCanceledException>(() => MatrixKernels.Pfaffian(f31, Random<PrimeField31, Residue31>(f31, 300, 5), 300, Cancelled()));
        var a = Random<PrimeField62, Residue62>(f62, 40, 6);
        using var live = new CancellationTokenSource();
        Assert.Equal(MatrixKernels.Determinant(f62, (Residue62[])a.Clone(), 40), MatrixKernels.Determinant(f62, (Residue62[])a.Clone(), 40, live.Token));
    }

    private static StraightLineProgram Program(string text)
    {
        var parsed = CatalogueParser.ParseIdentity(text);
        Assert.True(parsed.Success);
        var compiled = IdentityCompiler.Compile(parsed.Value);
        Assert.True(compiled.Success);
        return compiled.Value!.Program;
    }

    [Fact]
    public void Evaluator_ObservesCancellation_InLongProgramsAndInsideKernels()
    {
        var f = PrimeField62.Create(4611686018427387847);
        foreach (var text in new[] { "prod(k in 1..20000: x + k) = 0", "perm(matrix(i in 1..24, j in 1..24: a[i,j])) = 0" })
        {
            var program = Program(text);
            Assert.True(Evaluator.TryPrepareConstants<PrimeField62, Residue62>(f, program, out var constants));
            var point = new Residue62[program.Variables.Length];
            var random = new Xoshiro256(7);
            for (var i = 0; i < point.Length; i++) point[i] = f.Sample(ref random);
            var registers = new Residue62[program.Length];
            Assert.Throws<OperationCanceledException>(() => Evaluator.Evaluate<PrimeField62, Residue62>(f, program, constants, point, registers, Cancelled()));
        }
    }

    [Fact]
    public void BlockEvaluator_ObservesCancellation_InsideItsMatrixFunctions()
    {
        var f = PrimeField31.Create(2147483629);
        foreach (var text in new[] { "perm(matrix(i in 1..24, j in 1..24: a[i,j])) = 0", "det(matrix(i in 1..300, j in 1..300: a[i,j])) = 0" })
        {
            var program = Program(text);
            var evaluator = new BlockEvaluator<PrimeField31, Residue31>(f, BlockProgram.Prepare(program), 16);
            var points = new Residue31[program.Variables.Length * 16];
            var random = new Xoshiro256(8);
            for (var i = 0; i < points.Length; i++) points[i] = f.Sample(ref random);
            var outputs = new Residue31[program.Outputs.Length * 16];
            var defined = new bool[16];
            Assert.Throws<OperationCanceledException>(() => evaluator.Evaluate(points, outputs, defined, Cancelled()));
        }
    }
}
