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
/// largest piece is named for the messages. Besides the operations, the program's constants: each is brought into the
/// field once per trial (once per lane of a block, whose lanes have fields of their own), which a long program with many
/// distinct constants pays more for than for its instructions. Immutable.
/// </summary>
public readonly record struct TrialCost(double Instructions, double PermanentOperations, double EliminationOperations, string Largest, double Constants = 0)
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
        return new TrialCost(instructions, permanents, eliminations, largestName, program.Constants.Length);
    }

    /// <summary>Field operations of one permanent of order <paramref name="n"/> (see <see cref="Of"/>).</summary>
    public static double PermanentCount(int n, bool oddCharacteristic) =>
        n <= 0 ? 1
        : oddCharacteristic && n >= 4 ? Math.Pow(2, n - 1) * (3 * n + 1)
        : Math.Pow(2, n) * (2 * n + 1);

    /// <summary>"2^38": the operation count as the messages write it.</summary>
    public static string Log2Text(double operations) => $"2^{Math.Log2(Math.Max(operations, 1)):F0}";
}

/// <summary>
/// How fast one rung evaluates here: nanoseconds per operation of each kind of <see cref="TrialCost"/>, per lane of a block
/// as it is computed (a block of whole vectors on the 31- and 62-bit rungs over Q, one trial elsewhere), and nanoseconds
/// per constant brought into one trial's field. Immutable.
/// </summary>
public sealed record RungSpeed(double NanosecondsPerInstruction, double NanosecondsPerPermanentOperation, double NanosecondsPerEliminationOperation,
    double NanosecondsPerConstant = 0)
{
    /// <summary>One speed for every kind of operation (constants cost nothing apart).</summary>
    public static RungSpeed Uniform(double nanoseconds) => new(nanoseconds, nanoseconds, nanoseconds);

    /// <summary>
    /// The estimated time of <paramref name="trials"/> trials of <paramref name="cost"/> computed as <paramref name="lanes"/>
    /// lanes (the block padded to whole vectors; 1 and 1 off the block rungs): the operations run on every lane computed, the
    /// constants are prepared per trial.
    /// </summary>
    public TimeSpan TimeOf(TrialCost cost, int trials = 1, int lanes = 1) =>
        TimeSpan.FromSeconds(Math.Min((lanes * (cost.Instructions * NanosecondsPerInstruction + cost.PermanentOperations * NanosecondsPerPermanentOperation
            + cost.EliminationOperations * NanosecondsPerEliminationOperation) + trials * cost.Constants * NanosecondsPerConstant) / 1e9, TimeSpan.MaxValue.TotalSeconds / 2));
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

    /// <summary>
    /// The estimated time of <paramref name="trials"/> trials on <paramref name="rung"/>: one block of them on the 31- and
    /// 62-bit rungs over Q (it costs its lanes padded to whole vectors), one trial elsewhere.
    /// </summary>
    public TimeSpan TrialTime(CompiledIdentity identity, Rung rung, TrialCost cost, int trials = 1)
    {
        var lanes = BlockTrialRunner.Handles(identity, rung) ? BlockTrialRunner.PaddedLanes(rung, trials) : 1;
        if (lanes == 1) trials = 1;
        if (_fixed is not null) return _fixed.TimeOf(cost, trials, lanes);
        if (cost.FieldOperations < CheapOperations) return TimeSpan.FromSeconds(lanes * cost.FieldOperations * 1e-7);
        return SpeedOf(identity.Field, rung).TimeOf(cost, trials, lanes);
    }

    /// <summary>The speed of <paramref name="rung"/> for candidates over <paramref name="field"/>, measured on first use.</summary>
    public RungSpeed SpeedOf(FieldSpec field, Rung rung) =>
        _fixed ?? _speeds.GetOrAdd($"{field}|{rung.PrimeBits}|{rung.ExtensionDegree}", _ => new Lazy<RungSpeed>(() => Calibrate(field, rung))).Value;

    /// <summary>
    /// Measures <paramref name="rung"/>: products of two lengths (plain instructions, and their constants), permanents of
    /// two orders and determinants of two orders. Each rate is the slope between the two sizes, so that a trial's fixed
    /// costs (drawing the prime and the point) do not count as operations. On the block rungs the products also run as a
    /// single trial (its block padded to a whole vector) beside a full block: the two separate the constants, prepared per
    /// trial, from the instructions, computed per lane.
    /// </summary>
    public static RungSpeed Calibrate(FieldSpec field, Rung rung)
    {
        var fast = field.IsRationals && rung.PrimeBits <= 127;
        var (small, large) = fast ? (11, 15) : (6, 9);
        var (smallDet, largeDet) = fast ? (24, 64) : (8, 16);
        var odd = !field.Characteristic.IsEven || field.IsRationals;
        var products = (Compile("prod(k in 1..1000: x + k) = 0", field), Compile("prod(k in 1..10000: x + k) = 0", field));
        var permanents = (Compile(Permanent(small), field), Compile(Permanent(large), field));
        var determinants = (Compile(Determinant(smallDet), field), Compile(Determinant(largeDet), field));
        var block = BlockTrialRunner.Handles(products.Item1, rung);
        var full = block ? BlockTrialRunner.MaxLanes(rung) : 1;
        var (single, fullLanes) = block ? (BlockTrialRunner.PaddedLanes(rung, 1), BlockTrialRunner.PaddedLanes(rung, full)) : (1, 1);
        // Warm up first: early in a process the kernels and the field arithmetic they call run unoptimised code (tiered
        // JIT) several times slower, and the rates must be those of the optimised code that screens for the rest of the
        // process. The JIT optimises when it gets round to it (later on a busy machine), so the rates are measured again
        // until two measurements in a row agree.
        var warm = System.Diagnostics.Stopwatch.StartNew();
        do
        {
            foreach (var c in new[] { products.Item2, permanents.Item2, determinants.Item2 }) FastestBlock(c, rung, full, runs: 1);
        } while (warm.Elapsed < WarmUp);
        // Other work on the machine only ever slows a measurement down, and so does code the JIT has not optimised yet: each
        // rate is the least of the rounds measured.
        var speed = Measure();
        for (var round = 0; round < MaxCalibrationRounds; round++)
        {
            var again = Measure();
            var agree = Agree(speed, again);
            speed = Least(speed, again);
            if (agree) break;
        }
        return speed;

        RungSpeed Measure()
        {
            double Slope((CompiledIdentity Small, CompiledIdentity Large) pair, int trials, Func<TrialCost, double> count) =>
                (FastestBlock(pair.Large, rung, trials) - FastestBlock(pair.Small, rung, trials)) * 1e3
                / (count(TrialCost.Of(pair.Large.Program, odd)) - count(TrialCost.Of(pair.Small.Program, odd)));
            var perPermanent = Slope(permanents, full, c => c.PermanentOperations) / fullLanes;
            var perElimination = Slope(determinants, full, c => c.EliminationOperations) / fullLanes;
            // The products: per added instruction (with its share of the constants, one per three instructions), a full block
            // costs fullLanes·i + full·c/3 and a single trial single·i + c/3. When a single trial is a block of one lane
            // (no vectors here) the two cannot be told apart, and the constants ride on the instructions.
            var perProductFull = Slope(products, full, c => c.Instructions);
            var perProductSingle = Slope(products, 1, c => c.Instructions);
            var constantsPerInstruction = (TrialCost.Of(products.Item2.Program, odd).Constants - TrialCost.Of(products.Item1.Program, odd).Constants)
                / (TrialCost.Of(products.Item2.Program, odd).Instructions - TrialCost.Of(products.Item1.Program, odd).Instructions);
            double perInstruction, perConstant = 0;
            var determinant = (double)fullLanes - full * single;
            if (block && Math.Abs(determinant) > 0.5)
            {
                perInstruction = (perProductFull - full * perProductSingle) / determinant;
                perConstant = (fullLanes * perProductSingle - single * perProductFull) / determinant / constantsPerInstruction;
                if (perInstruction <= 0 || perConstant < 0) (perInstruction, perConstant) = (perProductFull / fullLanes, 0);
            }
            else perInstruction = perProductFull / fullLanes;
            return new RungSpeed(Math.Max(perInstruction, 0.05), Math.Max(perPermanent, 0.05), Math.Max(perElimination, 0.05), Math.Max(perConstant, 0));
        }
    }

    /// <summary>How many times a calibration measures again when its measurements disagree (the JIT still optimising).</summary>
    private const int MaxCalibrationRounds = 4;

    /// <summary>Each rate the least of the two measurements'.</summary>
    private static RungSpeed Least(RungSpeed a, RungSpeed b) =>
        new(Math.Min(a.NanosecondsPerInstruction, b.NanosecondsPerInstruction), Math.Min(a.NanosecondsPerPermanentOperation, b.NanosecondsPerPermanentOperation),
            Math.Min(a.NanosecondsPerEliminationOperation, b.NanosecondsPerEliminationOperation), Math.Min(a.NanosecondsPerConstant, b.NanosecondsPerConstant));

    /// <summary>Two measurements of a rung agree when every rate is within a third of the other.</summary>
    private static bool Agree(RungSpeed a, RungSpeed b)
    {
        static bool Near(double x, double y) => Math.Max(x, y) <= 1.33 * Math.Min(x, y) + 0.05;
        return Near(a.NanosecondsPerInstruction, b.NanosecondsPerInstruction) && Near(a.NanosecondsPerPermanentOperation, b.NanosecondsPerPermanentOperation)
            && Near(a.NanosecondsPerEliminationOperation, b.NanosecondsPerEliminationOperation) && Near(a.NanosecondsPerConstant, b.NanosecondsPerConstant);
    }

    private static string Determinant(int n) => $"det(matrix(i in 1..{n}, j in 1..{n}: a[i,j])) = 0";

    private static string Permanent(int n) => $"perm(matrix(i in 1..{n}, j in 1..{n}: a[i,j])) = 0";

    private static CompiledIdentity Compile(string text, FieldSpec field)
    {
        var entry = CatalogueParser.ParseIdentity(text).Value with { Field = field };
        return IdentityCompiler.Compile(entry).Value!;
    }

    /// <summary>
    /// Microseconds of <paramref name="trials"/> trials of <paramref name="identity"/> on <paramref name="rung"/> (one block
    /// on the block rungs, else one trial), the fastest of several runs, each timed around the call in fractional
    /// microseconds: a small program's trial takes a few microseconds, and whole microseconds would blur the slope.
    /// </summary>
    private static double FastestBlock(CompiledIdentity identity, Rung rung, int trials, int runs = 40)
    {
        var best = double.MaxValue;
        var block = BlockTrialRunner.Handles(identity, rung) ? BlockProgram.Prepare(identity.Program) : null;
        var seeds = new ulong[block is null ? 1 : trials];
        var clock = System.Diagnostics.Stopwatch.StartNew();
        for (var run = 0; run < runs && (run < 7 || clock.ElapsedMilliseconds < 100); run++)
        {
            for (var l = 0; l < seeds.Length; l++) seeds[l] = (ulong)(run * 64 + l + 1);
            var start = System.Diagnostics.Stopwatch.GetTimestamp();
            if (block is null) TrialRunner.Run(identity, rung, 1, seeds[0]);
            else BlockTrialRunner.Run(identity, block, rung, 1, seeds);
            best = Math.Min(best, Math.Max(System.Diagnostics.Stopwatch.GetElapsedTime(start).TotalMicroseconds, 0.01));
        }
        return best;
    }
}
