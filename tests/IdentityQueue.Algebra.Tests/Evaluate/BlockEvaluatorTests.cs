using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Algebra.Tests.Reference;
using static IdentityQueue.Algebra.Tests.Reference.CatalogueText;

namespace IdentityQueue.Algebra.Tests.Evaluate;

/// <summary>
/// The block evaluator computes, lane by lane, what the one-point <see cref="Evaluator"/> computes at that lane's point:
/// the same outputs and the same undefined points, on every rung of the ladder and in an extension field, for random
/// identities, random expressions, divisions that vanish on some lanes, and determinants, Pfaffians and permanents.
/// </summary>
public class BlockEvaluatorTests
{
    // ---- the comparison ----

    /// <summary>
    /// Evaluates <paramref name="program"/> on one block and every lane alone, and asserts they agree. Lanes with
    /// l mod 5 = 1 give every variable the same value and lanes with l mod 5 = 2 set one variable to 0, so that
    /// denominators such as x − y or x vanish on some lanes and not on others. Returns the number of defined lanes.
    /// </summary>
    internal static int Agree<TField, T>(TField field, StraightLineProgram program, int blockSize, ref Xoshiro256 random,
        bool fuse = true, LaneKernel kernel = LaneKernel.Avx512, string? what = null)
        where TField : struct, IField<T> where T : struct
    {
        var variables = program.Variables.Length;
        var points = new T[variables * blockSize];
        for (var i = 0; i < points.Length; i++) points[i] = field.Sample(ref random);
        for (var l = 0; l < blockSize && variables > 0; l++)
        {
            if (l % 5 == 1) for (var v = 1; v < variables; v++) points[v * blockSize + l] = points[l];
            if (l % 5 == 2) points[(int)random.NextBelow((ulong)variables) * blockSize + l] = field.Zero;
        }

        var evaluator = new BlockEvaluator<TField, T>(field, BlockProgram.Prepare(program, fuse), blockSize, kernel);
        var outputs = new T[program.Outputs.Length * blockSize];
        var defined = new bool[blockSize];
        var count = evaluator.Evaluate(points, outputs, defined);

        var expectedCount = 0;
        for (var l = 0; l < blockSize; l++)
            if (LaneAgrees(field, program, points, outputs, defined, l, what)) expectedCount++;
        Assert.Equal(expectedCount, count);
        return count;
    }

    /// <summary>Evaluates lane <paramref name="l"/> alone in <paramref name="field"/>, asserts the block agrees, and says whether the lane is defined.</summary>
    private static bool LaneAgrees<TField, T>(TField field, StraightLineProgram program, T[] points, T[] outputs, bool[] defined, int l, string? what)
        where TField : struct, IField<T> where T : struct
    {
        var b = defined.Length;
        var point = new T[program.Variables.Length];
        for (var v = 0; v < point.Length; v++) point[v] = points[v * b + l];
        var registers = new T[program.Length];
        var ok = Evaluator.TryPrepareConstants<TField, T>(field, program, out var constants)
            && Evaluator.Evaluate<TField, T>(field, program, constants, point, registers);
        Assert.True(ok == defined[l], $"{what}: lane {l} is {(defined[l] ? "defined" : "undefined")} in the block, {(ok ? "defined" : "undefined")} alone");
        if (ok)
            for (var o = 0; o < program.Outputs.Length; o++)
                Assert.True(field.AreEqual(registers[program.Outputs[o]], outputs[o * b + l]), $"{what}: lane {l}, output {o} differs");
        return ok;
    }

    private static StraightLineProgram Compile(Expr left, Expr right, string text)
    {
        var compiled = IdentityCompiler.Compile(new IdentityEntry(null, left, right, FieldSpec.Rationals, [], 1, text));
        Assert.True(compiled.Success, $"{text}: {compiled.Error}");
        return compiled.Value!.Program;
    }

    private static StraightLineProgram Compile(string text)
    {
        var parsed = CatalogueParser.ParseIdentity(text);
        Assert.True(parsed.Success, $"{text}: {parsed.Error}");
        var compiled = IdentityCompiler.Compile(parsed.Value);
        Assert.True(compiled.Success, $"{text}: {compiled.Error}");
        return compiled.Value!.Program;
    }

    /// <summary>Random identities (half false), random expressions e = 0 (so the output is e itself), and both with division.</summary>
    private static IEnumerable<(StraightLineProgram Program, string Text)> RandomPrograms(ulong seed, int count, bool division)
    {
        var generator = new RandomExpressions(seed, new RandomExpressionOptions { AllowDivision = division });
        var denominators = new Func<Expr>[]
        {
            () => Sub(Name("x"), Name("y")),
            () => Name("z"),
            () => Sub(Mul(Name("x"), Name("y")), Mul(Name("z"), Name("w"))),
            () => Add(Sub(Name("x"), Name("w")), Int(0)),
        };
        var random = new Xoshiro256(seed ^ 0x5eed);
        for (var i = 0; i < count; i++)
        {
            var identity = generator.NextIdentity();
            yield return (Compile(identity.Left, identity.Right, identity.Text), identity.Text);
            var e = generator.Next();
            yield return (Compile(e.Expression, Int(0), e.Text + " = 0"), e.Text + " = 0");
            if (!division) continue;
            // A variable denominator that vanishes on some lanes, inside a larger expression.
            var d = denominators[(int)random.NextBelow((ulong)denominators.Length)]();
            var f = generator.Next();
            var left = Add(Div(e.Expression, d), Mul(f.Expression, Div(Int(1), Sub(Name("y"), Name("w")))));
            var text = FormatIdentity(left, identity.Right);
            yield return (Compile(left, identity.Right, text), text);
        }
    }

    private static void AgreeOnRandomPrograms<TField, T>(TField field, ulong seed, int count, bool division = true, int blockSize = 37)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed * 7919);
        var defined = 0;
        var lanes = 0;
        foreach (var (program, text) in RandomPrograms(seed, count, division))
        {
            defined += Agree<TField, T>(field, program, blockSize, ref random, what: text);
            lanes += blockSize;
        }
        Assert.True(defined > lanes / 2, $"only {defined} of {lanes} lanes were defined");
    }

    // ---- random programs on every rung ----

    [Fact]
    public void Rung31_AgreesWithTheOnePointEvaluator()
    {
        var r = new Xoshiro256(11);
        AgreeOnRandomPrograms<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 11, 120);
    }

    [Fact]
    public void Rung62_AgreesWithTheOnePointEvaluator()
    {
        var r = new Xoshiro256(12);
        AgreeOnRandomPrograms<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 12, 120);
    }

    [Fact]
    public void Rung127_AgreesWithTheOnePointEvaluator()
    {
        var r = new Xoshiro256(13);
        AgreeOnRandomPrograms<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), 13, 80);
    }

    [Fact]
    public void BigRung256_AgreesWithTheOnePointEvaluator()
    {
        var r = new Xoshiro256(14);
        AgreeOnRandomPrograms<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(256, ref r), 14, 40, blockSize: 9);
    }

    [Fact]
    public void ExtensionOfGF7_AgreesWithTheOnePointEvaluator()
    {
        // Division by a multiple of 7 makes the constants undefined in GF(7^12): then every lane is undefined in both.
        var r = new Xoshiro256(15);
        var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(7), 12, ref r);
        var random = new Xoshiro256(15);
        foreach (var (program, text) in RandomPrograms(15, 40, division: true))
            Agree<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, program, 6, ref random, what: text);
    }

    [Fact]
    public void SmallPrimeField_WhereSamplesOftenVanish_AgreesWithTheOnePointEvaluator()
    {
        // In GF(13) random values are often 0 or equal, so many lanes are undefined for reasons of their own.
        var field = SmallPrimeField.Create(13);
        var random = new Xoshiro256(16);
        var undefined = 0;
        foreach (var (program, text) in RandomPrograms(16, 60, division: true))
            undefined += 21 - Agree<SmallPrimeField, SmallResidue>(field, program, 21, ref random, what: text);
        Assert.True(undefined > 0);
    }

    [Fact]
    public void ExactRationals_AgreeWithTheOnePointEvaluator()
    {
        var random = new Xoshiro256(17);
        foreach (var (program, text) in RandomPrograms(17, 15, division: true))
            Agree<RationalField, Exact.Rational>(default, program, 5, ref random, what: text);
    }

    // ---- undefined lanes ----

    [Fact]
    public void DivisionByZero_MakesOnlyItsLanesUndefined()
    {
        var program = Compile("1/(x - y) + 1/z = (z + x - y)/((x - y)*z)");
        var r = new Xoshiro256(21);
        var field = PrimeField62.CreateRandom(ref r);
        const int b = 16;
        var points = new Residue62[3 * b];
        for (var i = 0; i < points.Length; i++) points[i] = field.Sample(ref r);
        points[1 * b + 3] = points[0 * b + 3]; // lane 3: y = x
        points[2 * b + 7] = field.Zero;        // lane 7: z = 0
        var evaluator = BlockEvaluator.Create<PrimeField62, Residue62>(field, BlockProgram.Prepare(program), b);
        var outputs = new Residue62[b];
        var defined = new bool[b];
        Assert.Equal(b - 2, evaluator.Evaluate(points, outputs, defined));
        for (var l = 0; l < b; l++)
        {
            Assert.Equal(l is not (3 or 7), defined[l]);
            if (defined[l]) Assert.True(field.IsZero(outputs[l]));
        }
        Agree<PrimeField62, Residue62>(field, program, b, ref r);
    }

    [Fact]
    public void UndefinedConstants_MakeEveryLaneUndefined()
    {
        // 1/7 has no value in GF(7^2).
        var program = Compile("x/7 = x");
        var r = new Xoshiro256(22);
        var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(7), 2, ref r);
        var evaluator = new BlockEvaluator<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, BlockProgram.Prepare(program), 4);
        Assert.False(evaluator.ConstantsDefined);
        var defined = new bool[4];
        Assert.Equal(0, evaluator.Evaluate(new ExtElement<SmallResidue>[4], new ExtElement<SmallResidue>[4], defined));
        Assert.All(defined, Assert.False);
    }

    // ---- matrix functions ----

    private static string Matrix(int n, Func<int, int, string> entry) =>
        "[" + string.Join(", ", Enumerable.Range(1, n).Select(i => "[" + string.Join(", ", Enumerable.Range(1, n).Select(j => entry(i, j))) + "]")) + "]";

    private static string Skew(int n) => Matrix(n, (i, j) => i == j ? "0" : i < j ? $"a[{i},{j}]" : $"-a[{j},{i}]");

    /// <summary>Determinants (general, with zero diagonals, singular when the variables coincide), Pfaffians, permanents.</summary>
    private static IEnumerable<string> MatrixIdentities()
    {
        for (var n = 1; n <= 9; n++) yield return $"det(matrix(i in 1..{n}, j in 1..{n}: m[i,j])) = 0";
        for (var n = 2; n <= 7; n++) yield return $"det({Matrix(n, (i, j) => i == j ? "0" : $"m[{i},{j}]")}) = 1";
        for (var n = 2; n <= 6; n++)
            yield return $"det(matrix(i in 1..{n}, j in 1..{n}: x[i]^(j-1))) = prod(i in 1..{n}: prod(j in i+1..{n}: x[j] - x[i]))";
        yield return "det(matrix(i in 1..4, j in 1..4: 1/(x[i] + y[j]))) = 1";
        for (var n = 2; n <= 8; n += 2) yield return $"pf({Skew(n)})^2 = det({Skew(n)})";
        for (var n = 2; n <= 8; n += 2) yield return $"pf({Skew(n)}) = a[1,2]";
        for (var n = 1; n <= 7; n++) yield return $"perm(matrix(i in 1..{n}, j in 1..{n}: m[i,j])) = 0";
        yield return "perm([[x, y, 0], [0, x, y], [y, 0, x]]) = x^3 + y^3";
        yield return "det([[a, b], [c, d]]) * perm([[a, b], [c, d]]) + pf([[0, a], [-a, 0]]) = (a*d)^2 - (b*c)^2 + a";
    }

    private static void AgreeOnMatrices<TField, T>(TField field, ulong seed, int blockSize)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        foreach (var text in MatrixIdentities())
            Agree<TField, T>(field, Compile(text), blockSize, ref random, what: text);
    }

    [Fact]
    public void MatrixFunctions_Rung31() { var r = new Xoshiro256(31); AgreeOnMatrices<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 31, 20); }

    [Fact]
    public void MatrixFunctions_Rung62() { var r = new Xoshiro256(32); AgreeOnMatrices<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 32, 20); }

    [Fact]
    public void MatrixFunctions_Rung127() { var r = new Xoshiro256(33); AgreeOnMatrices<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), 33, 7); }

    [Fact]
    public void MatrixFunctions_BigRung() { var r = new Xoshiro256(34); AgreeOnMatrices<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(200, ref r), 34, 4); }

    [Fact]
    public void MatrixFunctions_ExtensionOfGF5()
    {
        var r = new Xoshiro256(35);
        var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(5), 3, ref r);
        AgreeOnMatrices<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, 35, 5);
    }

    [Fact]
    public void MatrixFunctions_CharacteristicTwo()
    {
        // Glynn's permanent divides by 2^(n−1): in characteristic 2 the lanes run Ryser's formula instead.
        var r = new Xoshiro256(37);
        var field = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create(2), 5, ref r);
        AgreeOnMatrices<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(field, 37, 6);
        AgreeOnMatrices<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(2), 38, 16);
    }

    [Fact]
    public void MatrixFunctions_SmallPrimeWithManySingularLanes() => AgreeOnMatrices<SmallPrimeField, SmallResidue>(SmallPrimeField.Create(3), 36, 24);

    // ---- the block program ----

    [Fact]
    public void Fusion_GivesTheSameResultsAsSeparateProducts()
    {
        var r = new Xoshiro256(41);
        var field = PrimeField62.CreateRandom(ref r);
        foreach (var (program, text) in RandomPrograms(41, 40, division: true))
        {
            var fused = Agree<PrimeField62, Residue62>(field, program, 16, ref r, fuse: true, what: text);
            var plain = Agree<PrimeField62, Residue62>(field, program, 16, ref r, fuse: false, what: text);
            Assert.True(fused >= 0 && plain >= 0);
        }
    }

    [Fact]
    public void SyntheticMultiplyAddProgram_FusesEveryStepAndStaysInFewSlots()
    {
        var program = SyntheticPrograms.RandomMultiplyAdd(64, 4096, 5);
        var block = BlockProgram.Prepare(program);
        Assert.Equal(4096, block.FusedMultiplies);
        Assert.Equal(64 + 4096, block.OperationCount);
        Assert.True(block.SlotCount <= 66, $"{block.SlotCount} slots");
        var r = new Xoshiro256(42);
        Agree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), program, 8, ref r);
        Agree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), program, 8, ref r);
    }

    [Fact]
    public void SlotsAreReused_SoTheRegisterFileIsSmallerThanTheProgram()
    {
        var program = Compile("sum(k in 1..200: (x + k)^2 * (y - k)) = 0");
        var block = BlockProgram.Prepare(program);
        Assert.True(block.SlotCount < program.Length / 4, $"{block.SlotCount} slots for {program.Length} instructions");
    }

    [Theory]
    [InlineData(1)]
    [InlineData(7)]
    [InlineData(16)]
    [InlineData(33)]
    [InlineData(64)]
    [InlineData(100)]
    public void EveryBlockSize_Agrees(int blockSize)
    {
        var r = new Xoshiro256(50 + (ulong)blockSize);
        var f31 = PrimeField31.CreateRandom(ref r);
        var f62 = PrimeField62.CreateRandom(ref r);
        foreach (var (program, text) in RandomPrograms(50 + (ulong)blockSize, 10, division: true))
        {
            Agree<PrimeField31, Residue31>(f31, program, blockSize, ref r, what: text);
            Agree<PrimeField62, Residue62>(f62, program, blockSize, ref r, what: text);
        }
    }

    [Fact]
    public void LargePowers_MatchSquareAndMultiply()
    {
        var program = Compile("x^1099511627779 + y^65536 * x^3 = 0");
        var r = new Xoshiro256(60);
        Agree<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), program, 12, ref r);
        Agree<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), program, 12, ref r);
        Agree<BigPrimeField, BigResidue>(BigPrimeField.CreateRandom(100, ref r), program, 3, ref r);
    }

    [Fact]
    public void UseField_GivesWhatAFreshEvaluatorGives()
    {
        var r = new Xoshiro256(65);
        foreach (var (program, text) in RandomPrograms(65, 15, division: true))
        {
            var block = BlockProgram.Prepare(program);
            var reused = new BlockEvaluator<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), block, 8);
            for (var trial = 0; trial < 3; trial++)
            {
                var field = PrimeField62.CreateRandom(ref r);
                var fresh = new BlockEvaluator<PrimeField62, Residue62>(field, block, 8);
                Assert.Equal(fresh.ConstantsDefined, reused.UseField(field));
                var points = new Residue62[program.Variables.Length * 8];
                for (var i = 0; i < points.Length; i++) points[i] = field.Sample(ref r);
                var (outputs1, defined1) = (new Residue62[program.Outputs.Length * 8], new bool[8]);
                var (outputs2, defined2) = (new Residue62[program.Outputs.Length * 8], new bool[8]);
                fresh.Evaluate(points, outputs1, defined1);
                reused.Evaluate(points, outputs2, defined2);
                Assert.Equal(defined1, defined2);
                Assert.True(outputs1.AsSpan().SequenceEqual(outputs2), text);
            }
        }
    }

    [Fact]
    public void BadArguments_AreRejected()
    {
        var program = BlockProgram.Prepare(Compile("x*y = y*x"));
        var r = new Xoshiro256(70);
        var field = PrimeField62.CreateRandom(ref r);
        Assert.Throws<ArgumentOutOfRangeException>(() => new BlockEvaluator<PrimeField62, Residue62>(field, program, 0));
        Assert.Throws<ArgumentOutOfRangeException>(() => new BlockEvaluator<PrimeField62, Residue62>(field, program, BlockEvaluator.MaxBlockSize + 1));
        var evaluator = new BlockEvaluator<PrimeField62, Residue62>(field, program, 4);
        Assert.Throws<ArgumentException>(() => evaluator.Evaluate(new Residue62[7], new Residue62[4], new bool[4]));
        Assert.Throws<ArgumentException>(() => evaluator.Evaluate(new Residue62[8], new Residue62[3], new bool[4]));
        Assert.Throws<ArgumentException>(() => evaluator.Evaluate(new Residue62[8], new Residue62[4], new bool[3]));
    }

    // ---- one field per lane: independent trials evaluated together ----

    /// <summary>
    /// Lane l in its own field <paramref name="fields"/>[l] (as the screener runs independent trials, each with its own
    /// random prime): every lane agrees with the one-point evaluator in that lane's field, for every lane kernel.
    /// </summary>
    private static void AgreeLaneByLane<TField, T>(TField[] fields, StraightLineProgram program, ref Xoshiro256 random, string what)
        where TField : struct, IField<T> where T : struct
    {
        var b = fields.Length;
        var variables = program.Variables.Length;
        var points = new T[variables * b];
        for (var l = 0; l < b; l++)
            for (var v = 0; v < variables; v++)
                points[v * b + l] = l % 7 == 3 && v == 0 ? fields[l].Zero : fields[l].Sample(ref random);
        foreach (var kernel in new[] { LaneKernel.Scalar, LaneKernel.Avx2, LaneKernel.Avx512 })
        {
            var evaluator = new BlockEvaluator<TField, T>(fields[0], BlockProgram.Prepare(program), b, kernel);
            var definedConstants = evaluator.UseFields(fields);
            var outputs = new T[program.Outputs.Length * b];
            var defined = new bool[b];
            var count = evaluator.Evaluate(points, outputs, defined);
            var expectedCount = 0;
            var expectedConstants = 0;
            for (var l = 0; l < b; l++)
            {
                if (Evaluator.TryPrepareConstants<TField, T>(fields[l], program, out _)) expectedConstants++;
                if (LaneAgrees(fields[l], program, points, outputs, defined, l, $"{what} ({kernel})")) expectedCount++;
            }
            Assert.Equal(expectedCount, count);
            Assert.Equal(expectedConstants, definedConstants);
        }
    }

    private static IEnumerable<(StraightLineProgram Program, string Text)> LaneFieldPrograms(ulong seed) =>
        RandomPrograms(seed, 12, division: true)
            .Concat(MatrixIdentities().Select(t => (Compile(t), t)))
            .Append((Compile("x^12345 * (x + 1/3) = y^7 / (x - y)"), "powers, a constant 1/3 and a division"))
            .Append((SyntheticPrograms.RandomMultiplyAdd(16, 300, seed), "synthetic multiply-add program"));

    private delegate TField FieldDraw<TField>(ref Xoshiro256 random);

    /// <summary>Each lane its own random prime of the rung, on every program of <see cref="LaneFieldPrograms"/>.</summary>
    private static void OneFieldPerLane<TField, T>(int blockSize, ulong seed, FieldDraw<TField> draw)
        where TField : struct, IField<T> where T : struct
    {
        var random = new Xoshiro256(seed);
        var fields = new TField[blockSize];
        for (var l = 0; l < blockSize; l++) fields[l] = draw(ref random);
        foreach (var (program, text) in LaneFieldPrograms(seed))
            AgreeLaneByLane<TField, T>(fields, program, ref random, text);
    }

    [Theory]
    [InlineData(16)]
    [InlineData(13)]
    [InlineData(64)]
    public void OneFieldPerLane_Rung31_EachLaneAgreesWithItsOwnField(int blockSize) =>
        OneFieldPerLane<PrimeField31, Residue31>(blockSize, 7101, static (ref Xoshiro256 r) => PrimeField31.CreateRandom(ref r));

    [Theory]
    [InlineData(8)]
    [InlineData(5)]
    [InlineData(24)]
    public void OneFieldPerLane_Rung62_EachLaneAgreesWithItsOwnField(int blockSize) =>
        OneFieldPerLane<PrimeField62, Residue62>(blockSize, 7102, static (ref Xoshiro256 r) => PrimeField62.CreateRandom(ref r));

    [Fact]
    public void OneFieldPerLane_SmallPrimes_ConstantsUndefinedOnlyWhereTheirDenominatorVanishes()
    {
        // GF(3) lanes cannot hold 1/3 (common practice: a denominator divisible by p has no value mod p).
        ulong[] primes = [3, 5, 7, 3, 11, 13, 3, 17, 19];
        var fields = primes.Select(p => SmallPrimeField.Create(p)).ToArray();
        var random = new Xoshiro256(7103);
        var program = Compile("x^5 * (x + 1/3) = y^2 / (x - y) + 1/6");
        AgreeLaneByLane<SmallPrimeField, SmallResidue>(fields, program, ref random, "small primes");
        var evaluator = new BlockEvaluator<SmallPrimeField, SmallResidue>(fields[0], BlockProgram.Prepare(program), fields.Length);
        Assert.Equal(primes.Count(p => p != 3), evaluator.UseFields(fields));
        Assert.False(evaluator.ConstantsDefined);
        Assert.Equal(13UL, (ulong)evaluator.LaneField(5).Characteristic);
    }

    [Fact]
    public void UseFields_NeedsOneFieldPerLane()
    {
        var random = new Xoshiro256(7104);
        var field = PrimeField31.CreateRandom(ref random);
        var evaluator = new BlockEvaluator<PrimeField31, Residue31>(field, BlockProgram.Prepare(Compile("x = y")), 16);
        Assert.Throws<ArgumentException>(() => evaluator.UseFields(new PrimeField31[15]));
    }

    // ---- the vector kernels against the scalar fallback ----

    private static void VectorKernelsAgreeWithScalar<TField, T>(TField field, ulong seed)
        where TField : struct, IField<T> where T : struct
    {
        var r = new Xoshiro256(seed);
        var programs = RandomPrograms(seed, 30, division: true).Select(p => p.Program)
            .Concat(MatrixIdentities().Select(Compile))
            .Append(SyntheticPrograms.RandomMultiplyAdd(16, 500, seed + 1));
        foreach (var program in programs)
        {
            foreach (var blockSize in new[] { 64, 40, 13 })
            {
                var points = new T[program.Variables.Length * blockSize];
                for (var i = 0; i < points.Length; i++) points[i] = field.Sample(ref r);
                if (points.Length > 0) points[^1] = field.Zero;
                var results = new[] { LaneKernel.Scalar, LaneKernel.Avx2, LaneKernel.Avx512 }.Select(kernel =>
                {
                    var evaluator = new BlockEvaluator<TField, T>(field, BlockProgram.Prepare(program), blockSize, kernel);
                    var outputs = new T[program.Outputs.Length * blockSize];
                    var defined = new bool[blockSize];
                    evaluator.Evaluate(points, outputs, defined);
                    return (outputs, defined);
                }).ToList();
                foreach (var (outputs, defined) in results.Skip(1))
                {
                    Assert.Equal(results[0].defined, defined);
                    Assert.Equal(results[0].outputs, outputs);
                }
            }
        }
    }

    [Fact]
    public void VectorKernels31_GiveTheSameResultsAsTheScalarFallback()
    {
        var r = new Xoshiro256(80);
        VectorKernelsAgreeWithScalar<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), 80);
    }

    [Fact]
    public void VectorKernels62_GiveTheSameResultsAsTheScalarFallback()
    {
        var r = new Xoshiro256(85);
        VectorKernelsAgreeWithScalar<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), 85);
    }

    /// <summary>x·y + z − w·x − (y − z) − (−w) through each kernel, against the field's own arithmetic, on edge values.</summary>
    private static void EdgeValues<TField, T>(TField field, T[] edges, ref Xoshiro256 r)
        where TField : struct, IField<T> where T : struct
    {
        var program = Compile("x*y + z - w*x - (y - z) - (-w) = 0");
        const int b = 48;
        foreach (var kernel in new[] { LaneKernel.Scalar, LaneKernel.Avx2, LaneKernel.Avx512 })
        {
            var points = new T[4 * b];
            for (var i = 0; i < points.Length; i++) points[i] = i % 3 == 0 ? field.Sample(ref r) : edges[(int)r.NextBelow((ulong)edges.Length)];
            var block = new BlockEvaluator<TField, T>(field, BlockProgram.Prepare(program), b, kernel);
            var outputs = new T[b];
            Assert.Equal(b, block.Evaluate(points, outputs, new bool[b]));
            for (var l = 0; l < b; l++)
            {
                var (x, y, z, w) = (points[l], points[b + l], points[2 * b + l], points[3 * b + l]);
                var expected = field.Add(field.Subtract(field.Subtract(field.Add(field.Multiply(x, y), z), field.Multiply(w, x)), field.Subtract(y, z)), w);
                Assert.True(field.AreEqual(expected, outputs[l]), $"{kernel}, lane {l}");
            }
        }
    }

    [Fact]
    public void VectorKernels_EdgeValues()
    {
        // p − 1, 0, 1, p/2 and 2 in every combination, with primes at the top of each rung and small ones.
        var r = new Xoshiro256(90);
        foreach (var p in new uint[] { 2147483647, 2147483629, 1073741827, 65537 })
        {
            var f = PrimeField31.Create(p);
            EdgeValues<PrimeField31, Residue31>(f, [f.Zero, f.One, f.FromUInt32(p - 1), f.FromUInt32(p / 2), f.FromUInt32(2)], ref r);
        }
        foreach (var p in new ulong[] { 4611686018427387847, 2305843009213693951, 4294967311, 65537 })
        {
            var f = PrimeField62.Create(p);
            EdgeValues<PrimeField62, Residue62>(f, [f.Zero, f.One, f.FromUInt64(p - 1), f.FromUInt64(p / 2), f.FromUInt64(2), f.FromUInt64(1UL << 32)], ref r);
        }
    }

    [Fact]
    public void KernelDescription_NamesTheRung()
    {
        var program = BlockProgram.Prepare(Compile("x = x"));
        var r = new Xoshiro256(95);
        Assert.Contains("62-bit", new BlockEvaluator<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), program).Kernel);
        Assert.Contains("scalar", new BlockEvaluator<PrimeField31, Residue31>(PrimeField31.CreateRandom(ref r), program, 64, LaneKernel.Scalar).Kernel);
        Assert.Contains("scalar", new BlockEvaluator<PrimeField62, Residue62>(PrimeField62.CreateRandom(ref r), program, 64, LaneKernel.Scalar).Kernel);
        Assert.Contains("generic", new BlockEvaluator<PrimeField127, Residue127>(PrimeField127.CreateRandom(ref r), program).Kernel);
    }

    private static ElementLayout LayoutOf<TField>() where TField : IElementLayout => TField.Layout;

    [Fact]
    public void FieldsNameTheirLayout_OnlyTheMontgomeryRungsRunOnRawRepresentatives()
    {
        // The layouts as the fields document them (PrimeField31: R = 2^32, PrimeField62: R = 2^64); every other field is generic.
        Assert.Equal(ElementLayout.Montgomery31, LayoutOf<PrimeField31>());
        Assert.Equal(ElementLayout.Montgomery62, LayoutOf<PrimeField62>());
        Assert.Equal(ElementLayout.Generic, LayoutOf<PrimeField127>());
        Assert.Equal(ElementLayout.Generic, LayoutOf<SmallPrimeField>());
        Assert.Equal(ElementLayout.Generic, LayoutOf<ExtensionField<SmallPrimeField, SmallResidue>>());
    }

    [Fact]
    public void Kernel_IsTheWidestThatTheCpuRunsAndTheBlockFills()
    {
        // The rule of BlockInterpreter.Create (this code's design, not an outside fact): a vector kernel only for a block of
        // whole vectors, else the next narrower one; LanesPerInstruction is the width of the widest.
        var program = BlockProgram.Prepare(Compile("x*y + 1 = y*x + 1"));
        var r = new Xoshiro256(96);
        var f31 = PrimeField31.CreateRandom(ref r);
        var f62 = PrimeField62.CreateRandom(ref r);
        var avx512 = System.Runtime.Intrinsics.X86.Avx512F.IsSupported;
        var avx2 = System.Runtime.Intrinsics.X86.Avx2.IsSupported;
        var avx512dq = avx512 && System.Runtime.Intrinsics.X86.Avx512DQ.IsSupported;
        Assert.Equal(avx512 ? 16 : avx2 ? 8 : 1, BlockEvaluator.LanesPerInstruction<PrimeField31>());
        Assert.Equal(avx512dq ? 8 : 1, BlockEvaluator.LanesPerInstruction<PrimeField62>());
        Assert.Equal(1, BlockEvaluator.LanesPerInstruction<PrimeField127>());

        Assert.Contains(avx512 ? "AVX-512" : avx2 ? "AVX2" : "scalar", new BlockEvaluator<PrimeField31, Residue31>(f31, program, 64).Kernel);
        Assert.Contains(avx2 ? "AVX2" : "scalar", new BlockEvaluator<PrimeField31, Residue31>(f31, program, 8).Kernel);
        Assert.Contains(avx2 ? "AVX2" : "scalar", new BlockEvaluator<PrimeField31, Residue31>(f31, program, 64, LaneKernel.Avx2).Kernel);
        Assert.Contains("scalar", new BlockEvaluator<PrimeField31, Residue31>(f31, program, 20).Kernel);
        Assert.Contains(avx512dq ? "AVX-512" : "scalar", new BlockEvaluator<PrimeField62, Residue62>(f62, program, 64).Kernel);
        Assert.Contains("scalar", new BlockEvaluator<PrimeField62, Residue62>(f62, program, 12).Kernel);
        Assert.Contains("scalar", new BlockEvaluator<PrimeField62, Residue62>(f62, program, 64, LaneKernel.Avx2).Kernel);
    }
}
