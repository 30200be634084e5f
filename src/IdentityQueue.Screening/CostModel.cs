using System.Collections.Concurrent;
using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening;

/// <summary>
/// What one trial of a compiled program costs, counted before it runs, in field operations of three kinds that run at
/// different speeds: plain instructions (with the multiplications of powers and inverses), the Gray-code walk of
/// permanents (vectorised across the lanes of a block), and eliminations (determinants and Pfaffians, lane by lane). The
/// largest piece is named for the messages. Immutable.
/// </summary>
public readonly record struct TrialCost(double Instructions, double PermanentOperations, double EliminationOperations, string Largest)
{
    /// <summary>Field operations of one trial, all told.</summary>
    public double FieldOperations => Instructions + PermanentOperations + EliminationOperations;

    /// <summary>
    /// Counts one trial of <paramref name="program"/>: an add, subtract, multiply, negate, constant or variable is one
    /// operation; a^e costs 2·bits(e) multiplications (square-and-multiply); an inverse about 64 (the extended Euclidean
    /// algorithm on a machine-word modulus); a determinant or Pfaffian of order n about 2n³/3 (Gaussian elimination: n³/3
    /// multiply-adds; the Pfaffian's Schur complements do two per entry on every second step); a permanent of order n
    /// 2^(n−1)·(3n+1) with Glynn's formula (odd characteristic: per sign pattern n double updates of the column sums and n
    /// products) or 2^n·(2n+1) with Ryser's (characteristic 2). Common practice for operation counts; the formulas' step
    /// counts are those of the kernels in <see cref="MatrixKernels"/>.
    /// </summary>
    public static TrialCost Of(StraightLineProgram program, bool oddCharacteristic)
    {
        double instructions = program.Length, permanents = 0, eliminations = 0, largest = program.Length;
        var largestName = $"{program.Length} instructions";
        foreach (var ins in program.Instructions)
        {
            switch (ins.Op)
            {
                case OpCode.Power:
                    instructions += 2.0 * Math.Max(1, (double)program.Exponents[ins.B].GetBitLength());
                    break;
                case OpCode.Invert:
                    instructions += 64;
                    break;
                case OpCode.Determinant or OpCode.Pfaffian:
                {
                    var ops = 2.0 * Math.Pow(ins.B, 3) / 3;
                    eliminations += ops;
                    if (ops > largest) (largest, largestName) = (ops, $"{(ins.Op == OpCode.Determinant ? "determinant" : "Pfaffian")} of order {ins.B}");
                    break;
                }
                case OpCode.Permanent:
                {
                    var ops = PermanentCount(ins.B, oddCharacteristic);
                    permanents += ops;
                    if (ops > largest) (largest, largestName) = (ops, $"permanent of order {ins.B}");
                    break;
                }
            }
        }
        return new TrialCost(instructions, permanents, eliminations, largestName);
    }

    /// <summary>Field operations of one permanent of order <paramref name="n"/> (see <see cref="Of"/>).</summary>
    public static double PermanentCount(int n, bool oddCharacteristic) =>
        n <= 0 ? 1
        : oddCharacteristic && n >= 4 ? Math.Pow(2, n - 1) * (3 * n + 1)
        : Math.Pow(2, n) * (2 * n + 1);

    /// <summary>"2^38": the operation count as the messages write it.</summary>
    public static string Log2Text(double operations) => $"2^{Math.Log2(Math.Max(operations, 1)):F0}";
}

/// <summary>How fast one rung evaluates here: nanoseconds per operation of each kind of <see cref="TrialCost"/>, per trial. Immutable.</summary>
public sealed record RungSpeed(double NanosecondsPerInstruction, double NanosecondsPerPermanentOperation, double NanosecondsPerEliminationOperation)
{
    /// <summary>One speed for every kind of operation.</summary>
    public static RungSpeed Uniform(double nanoseconds) => new(nanoseconds, nanoseconds, nanoseconds);

    /// <summary>The estimated time of one trial of <paramref name="cost"/>.</summary>
    public TimeSpan TimeOf(TrialCost cost) =>
        TimeSpan.FromSeconds(Math.Min((cost.Instructions * NanosecondsPerInstruction + cost.PermanentOperations * NanosecondsPerPermanentOperation
            + cost.EliminationOperations * NanosecondsPerEliminationOperation) / 1e9, TimeSpan.MaxValue.TotalSeconds / 2));
}

/// <summary>
/// The cost of a trial in time, per rung: a <see cref="TrialCost"/> times the rung's <see cref="RungSpeed"/> on this
/// machine. <see cref="Calibrated"/> measures each rung (and field) once per process, the first time a costly program
/// needs it, by running two small programs through the same trial runners the screen uses (a permanent for the kernel
/// rate, a determinant for the elimination rate, a long product for the instruction rate; each at two sizes, the fastest of several runs). Programs under
/// <see cref="CheapOperations"/> are never measured for: one trial of them takes well under a second on any rung.
/// Thread-safe.
/// </summary>
public sealed class CostModel
{
    /// <summary>Below this many field operations a trial is cheap on every rung, and no rung is calibrated for it.</summary>
    public const double CheapOperations = 1 << 16;

    /// <summary>How long a calibration runs its programs before it measures them (so that the JIT has optimised the kernels).</summary>
    public static readonly TimeSpan WarmUp = TimeSpan.FromMilliseconds(400);

    /// <summary>The process's calibrated model.</summary>
    public static CostModel Calibrated { get; } = new(null);

    private readonly RungSpeed? _fixed;
    private readonly ConcurrentDictionary<string, Lazy<RungSpeed>> _speeds = new(StringComparer.Ordinal);

    private CostModel(RungSpeed? fixedSpeed) => _fixed = fixedSpeed;

    /// <summary>A model with one speed for every rung (tests: to let an expensive trial start, or to refuse a cheap one).</summary>
    public static CostModel Fixed(RungSpeed speed) => new(speed);

    /// <summary>The estimated time of one trial on <paramref name="rung"/> (per lane of a block on the 31- and 62-bit rungs over Q).</summary>
    public TimeSpan TrialTime(CompiledIdentity identity, Rung rung, TrialCost cost)
    {
        if (_fixed is not null) return _fixed.TimeOf(cost);
        if (cost.FieldOperations < CheapOperations) return TimeSpan.FromSeconds(cost.FieldOperations * 1e-7);
        return SpeedOf(identity.Field, rung).TimeOf(cost);
    }

    /// <summary>The speed of <paramref name="rung"/> for candidates over <paramref name="field"/>, measured on first use.</summary>
    public RungSpeed SpeedOf(FieldSpec field, Rung rung) =>
        _fixed ?? _speeds.GetOrAdd($"{field}|{rung.PrimeBits}|{rung.ExtensionDegree}", _ => new Lazy<RungSpeed>(() => Calibrate(field, rung))).Value;

    /// <summary>
    /// Measures <paramref name="rung"/>: products of two lengths (plain instructions), permanents of two orders and
    /// determinants of two orders. Each rate is the slope between the two sizes, so that a trial's fixed costs (drawing the
    /// prime and the point, preparing the constants) do not count as operations.
    /// </summary>
    public static RungSpeed Calibrate(FieldSpec field, Rung rung)
    {
        var fast = field.IsRationals && rung.PrimeBits <= 127;
        var (small, large) = fast ? (11, 15) : (6, 9);
        var (smallDet, largeDet) = fast ? (24, 64) : (8, 16);
        var odd = !field.Characteristic.IsEven || field.IsRationals;
        var products = (Compile("prod(k in 1..500: x + k) = 0", field), Compile("prod(k in 1..2500: x + k) = 0", field));
        var permanents = (Compile(Permanent(small), field), Compile(Permanent(large), field));
        var determinants = (Compile(Determinant(smallDet), field), Compile(Determinant(largeDet), field));
        // Warm up first: early in a process the kernels run unoptimised code (tiered JIT) several times slower, and the
        // rates must be those of the optimised code that screens for the rest of the process.
        var warm = System.Diagnostics.Stopwatch.StartNew();
        do
        {
            foreach (var c in new[] { products.Item2, permanents.Item2, determinants.Item2 }) FastestTrial(c, rung, runs: 1);
        } while (warm.Elapsed < WarmUp);
        var perInstruction = Slope(products.Item1, products.Item2, rung, c => TrialCost.Of(c.Program, odd).Instructions);
        var perPermanent = Slope(permanents.Item1, permanents.Item2, rung, c => TrialCost.Of(c.Program, odd).PermanentOperations);
        var perElimination = Slope(determinants.Item1, determinants.Item2, rung, c => TrialCost.Of(c.Program, odd).EliminationOperations);
        return new RungSpeed(Math.Max(perInstruction, 0.05), Math.Max(perPermanent, 0.05), Math.Max(perElimination, 0.05));
    }

    private static string Determinant(int n) => $"det(matrix(i in 1..{n}, j in 1..{n}: a[i,j])) = 0";

    private static string Permanent(int n) => $"perm(matrix(i in 1..{n}, j in 1..{n}: a[i,j])) = 0";

    /// <summary>Nanoseconds per counted operation: the difference of the two programs' times over the difference of their counts.</summary>
    private static double Slope(CompiledIdentity small, CompiledIdentity large, Rung rung, Func<CompiledIdentity, double> count) =>
        (FastestTrial(large, rung) - FastestTrial(small, rung)) * 1e3 / (count(large) - count(small));

    private static CompiledIdentity Compile(string text, FieldSpec field)
    {
        var entry = CatalogueParser.ParseIdentity(text).Value with { Field = field };
        return IdentityCompiler.Compile(entry).Value!;
    }

    /// <summary>Microseconds of one trial of <paramref name="identity"/> on <paramref name="rung"/>, the fastest of several runs.</summary>
    private static double FastestTrial(CompiledIdentity identity, Rung rung, int runs = 25)
    {
        var best = double.MaxValue;
        var block = BlockTrialRunner.Handles(identity, rung) ? BlockProgram.Prepare(identity.Program) : null;
        var seeds = new ulong[block is null ? 1 : BlockTrialRunner.MaxLanes(rung)];
        var clock = System.Diagnostics.Stopwatch.StartNew();
        for (var run = 0; run < runs && (run < 3 || clock.ElapsedMilliseconds < 40); run++)
        {
            for (var l = 0; l < seeds.Length; l++) seeds[l] = (ulong)(run * 64 + l + 1);
            var micros = block is null
                ? TrialRunner.Run(identity, rung, 1, seeds[0]).ElapsedMicroseconds
                : BlockTrialRunner.Run(identity, block, rung, 1, seeds)[0].ElapsedMicroseconds;
            best = Math.Min(best, Math.Max(micros, 0.01));
        }
        return best;
    }
}
