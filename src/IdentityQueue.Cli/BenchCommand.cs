using System.CommandLine;
using System.Diagnostics;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics.X86;
using System.Text.Json;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;

namespace IdentityQueue.Cli;

/// <summary>
/// <c>idq bench [--json]</c>: a quick measurement of the evaluation kernels through the real code paths, on one thread,
/// with the figures of the C reference kernels (<c>modmul-ref.c</c>) under the same names so that the two can be run
/// side by side: multiply-adds per second of a random straight-line program on blocks of points on the 62- and 31-bit
/// rungs, and determinants and a permanent mod a 62-bit prime. Each figure is the median of five runs after a warm-up.
/// </summary>
public static class BenchCommand
{
    /// <summary>How much work one measurement does; <see cref="Quick"/> keeps the sizes (the keys mean the same) and cuts the repetitions.</summary>
    internal sealed record Sizes(int Runs, int Registers, int Steps, int BlockSize, int Blocks62, int Blocks31, double WarmupSeconds, int CatalogueRounds)
    {
        public static readonly Sizes Full = new(5, 64, 4096, BlockEvaluator.DefaultBlockSize, 200, 400, 0.4, 3);
        public static readonly Sizes Quick = new(1, 64, 256, BlockEvaluator.DefaultBlockSize, 2, 2, 0, 1);
    }

    /// <summary>The measured figures (rates per second, times in milliseconds).</summary>
    internal sealed record Report(
        double Slp62OpsPerSecond, double Slp31OpsPerSecond, double Det20Ms, double Det100Ms, double Det200Ms, double Perm20Ms,
        double CandidatesPerSecond, int CatalogueSize, string Kernel62, string Kernel31, int BlockSize, int Steps, int Registers,
        int Runs, bool Quick);

    public static Command Create(TextWriter output, TextWriter error)
    {
        var json = new Option<bool>("--json") { Description = "Print one JSON object instead of a table." };
        var quick = new Option<bool>("--quick") { Description = "Few repetitions and a short program (for tests).", Hidden = true };
        var command = new Command("bench", "Measure the evaluation kernels on this machine (one thread, well under a minute).\n" +
            "Keys slp62_ops_per_s, slp31_ops_per_s and det100_ms match the C reference modmul-ref.c; run both, alternating.\n\n" +
            "Examples:\n  idq bench\n  idq bench --json > bench.json")
        {
            json, quick,
        };
        command.SetAction(parse => Execute(parse.GetValue(quick) ? Sizes.Quick : Sizes.Full, parse.GetValue(json), output));
        return command;
    }

    internal static int Execute(Sizes sizes, bool json, TextWriter output)
    {
        var report = Measure(sizes);
        if (json) WriteJson(output, report);
        else WriteText(output, report);
        return ExitCodes.Success;
    }

    internal static Report Measure(Sizes sizes)
    {
        var random = new Xoshiro256(0x1D0_BE7C);
        var program = BlockProgram.Prepare(SyntheticPrograms.RandomMultiplyAdd(sizes.Registers, sizes.Steps, random.NextUInt64()));

        var f62 = PrimeField62.CreateRandom(ref random);
        var e62 = new BlockEvaluator<PrimeField62, Residue62>(f62, program, sizes.BlockSize);
        var slp62 = Slp(e62, f62, sizes, sizes.Blocks62, ref random);

        var f31 = PrimeField31.CreateRandom(ref random);
        var e31 = new BlockEvaluator<PrimeField31, Residue31>(f31, program, sizes.BlockSize);
        var slp31 = Slp(e31, f31, sizes, sizes.Blocks31, ref random);

        var det20 = Determinant(20, sizes, ref random);
        var det100 = Determinant(100, sizes, ref random);
        var det200 = Determinant(200, sizes, ref random);
        var perm20 = Permanent(20, sizes, ref random);
        var (candidates, catalogueSize) = Catalogue(sizes);
        return new Report(slp62, slp31, det20, det100, det200, perm20, candidates, catalogueSize, e62.Kernel, e31.Kernel,
            sizes.BlockSize, sizes.Steps, sizes.Registers, sizes.Runs, ReferenceEquals(sizes, Sizes.Quick));
    }

    /// <summary>Multiply-adds per second: the block evaluator on <paramref name="blocks"/> blocks per run.</summary>
    private static double Slp<TField, T>(BlockEvaluator<TField, T> evaluator, TField field, Sizes sizes, int blocks, ref Xoshiro256 random)
        where TField : struct, IField<T> where T : struct
    {
        var b = evaluator.BlockSize;
        var points = new T[evaluator.Program.Program.Variables.Length * b];
        for (var i = 0; i < points.Length; i++) points[i] = field.Sample(ref random);
        var outputs = new T[evaluator.Program.Program.Outputs.Length * b];
        var defined = new bool[b];
        Warm(sizes, () => evaluator.Evaluate(points, outputs, defined));
        var rates = new double[sizes.Runs];
        for (var run = 0; run < sizes.Runs; run++)
        {
            var clock = Stopwatch.StartNew();
            for (var k = 0; k < blocks; k++) evaluator.Evaluate(points, outputs, defined);
            rates[run] = (double)blocks * sizes.Steps * b / clock.Elapsed.TotalSeconds;
        }
        return Median(rates);
    }

    /// <summary>Milliseconds for one n×n determinant of random residues mod a random 62-bit prime (the copy is not timed).</summary>
    private static double Determinant(int n, Sizes sizes, ref Xoshiro256 random)
    {
        var field = PrimeField62.CreateRandom(ref random);
        var matrix = new Residue62[n * n];
        for (var i = 0; i < matrix.Length; i++) matrix[i] = field.Sample(ref random);
        var work = new Residue62[n * n];
        Warm(sizes, () => { matrix.CopyTo(work, 0); MatrixKernels.Determinant(field, work.AsSpan(), n); });
        var times = new double[sizes.Runs];
        for (var run = 0; run < sizes.Runs; run++)
        {
            matrix.CopyTo(work, 0);
            var clock = Stopwatch.StartNew();
            MatrixKernels.Determinant(field, work.AsSpan(), n);
            times[run] = clock.Elapsed.TotalMilliseconds;
        }
        return Median(times);
    }

    /// <summary>Milliseconds for one n×n permanent (Ryser's formula) mod a random 62-bit prime.</summary>
    private static double Permanent(int n, Sizes sizes, ref Xoshiro256 random)
    {
        var field = PrimeField62.CreateRandom(ref random);
        var matrix = new Residue62[n * n];
        for (var i = 0; i < matrix.Length; i++) matrix[i] = field.Sample(ref random);
        var times = new double[sizes.Runs];
        MatrixKernels.Permanent<PrimeField62, Residue62>(field, matrix, n); // one run warms it: 2^n steps
        for (var run = 0; run < sizes.Runs; run++)
        {
            var clock = Stopwatch.StartNew();
            MatrixKernels.Permanent<PrimeField62, Residue62>(field, matrix, n);
            times[run] = clock.Elapsed.TotalMilliseconds;
        }
        return Median(times);
    }

    /// <summary>
    /// A small catalogue of the usual kinds (expanded products and powers, binomial and q-binomial sums, Vandermonde and
    /// Cauchy determinants, a Pfaffian), about half of them false, screened to 2^-64 by the real screener.
    /// </summary>
    private static readonly string[] TypicalCatalogue =
    [
        "(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2",
        "(x+y)^5 = x^5 + 5*x^4*y + 10*x^3*y^2 + 10*x^2*y^3 + 5*x*y^4 + y^5",
        "(x+y)^5 = x^5 + 5*x^4*y + 10*x^3*y^2 + 10*x^2*y^3 + 4*x*y^4 + y^5",
        "(4*x1*x5 + 2*x2 - x4)^3 = 64*x1^3*x5^3 + 96*x1^2*x2*x5^2 - 48*x1^2*x4*x5^2 + 48*x1*x2^2*x5 - 48*x1*x2*x4*x5 + 12*x1*x4^2*x5 + 8*x2^3 - 12*x2^2*x4 + 6*x2*x4^2 - x4^3",
        "sum(k in 0..8: binom(8,k)*x^k) = (1+x)^8",
        "sum(k in 0..8: binom(8,k)*x^k) = (1+x)^8 + x",
        "qbinom(6, 3, q) = q^3*qbinom(5, 2, q) + qbinom(5, 3, q)",
        "qbinom(6, 3, q) = q^2*qbinom(5, 2, q) + qbinom(5, 3, q)",
        "det(matrix(i in 1..5, j in 1..5: x[i]^(j-1))) = prod(i in 1..5: prod(j in i+1..5: x[j] - x[i]))",
        "det(matrix(i in 1..5, j in 1..5: x[i]^(j-1))) = 2*prod(i in 1..5: prod(j in i+1..5: x[j] - x[i]))",
        "det(matrix(i in 1..3, j in 1..3: 1/(x[i] + y[j]))) = prod(i in 1..3: prod(j in i+1..3: (x[j] - x[i])*(y[j] - y[i]))) / prod(i in 1..3: prod(j in 1..3: x[i] + y[j]))",
        "pf([[0, a, b, c], [-a, 0, d, e], [-b, -d, 0, f], [-c, -e, -f, 0]]) = a*f - b*e + c*d",
    ];

    /// <summary>Candidates per second when the sample catalogue is parsed, compiled and screened (median of the rounds).</summary>
    private static (double PerSecond, int Count) Catalogue(Sizes sizes)
    {
        var options = new ScreeningOptions { Seed = 1, Certify = false };
        void Screen()
        {
            for (var i = 0; i < TypicalCatalogue.Length; i++)
            {
                var parsed = CatalogueParser.ParseIdentity(TypicalCatalogue[i], options.Limits);
                if (!parsed.Success) throw new InvalidOperationException($"bench catalogue: {parsed.Error}");
                var compiled = IdentityCompiler.Compile(parsed.Value, null, options.Limits);
                if (!compiled.Success) throw new InvalidOperationException($"bench catalogue: {compiled.Error}");
                Screener.Screen(compiled.Value!, options, (ulong)i);
            }
        }
        Warm(sizes, Screen);
        var rates = new double[sizes.CatalogueRounds];
        for (var round = 0; round < rates.Length; round++)
        {
            var clock = Stopwatch.StartNew();
            Screen();
            rates[round] = TypicalCatalogue.Length / clock.Elapsed.TotalSeconds;
        }
        return (Median(rates), TypicalCatalogue.Length);
    }

    /// <summary>Runs <paramref name="work"/> until the warm-up time is spent, so that the measured code is fully optimised.</summary>
    private static void Warm(Sizes sizes, Action work)
    {
        var clock = Stopwatch.StartNew();
        do work();
        while (clock.Elapsed.TotalSeconds < sizes.WarmupSeconds);
    }

    private static double Median(double[] values)
    {
        var sorted = (double[])values.Clone();
        Array.Sort(sorted);
        return sorted.Length % 2 == 1 ? sorted[sorted.Length / 2] : (sorted[sorted.Length / 2 - 1] + sorted[sorted.Length / 2]) / 2;
    }

    private static IEnumerable<(string Name, bool Supported)> VectorSupport()
    {
        yield return ("sse4.2", Sse42.IsSupported);
        yield return ("avx2", Avx2.IsSupported);
        yield return ("bmi2", Bmi2.IsSupported);
        yield return ("avx512f", Avx512F.IsSupported);
        yield return ("avx512dq", Avx512DQ.IsSupported);
        yield return ("avx512bw", Avx512BW.IsSupported);
        yield return ("avx10.1", Avx10v1.IsSupported);
    }

    private static void WriteJson(TextWriter output, Report r)
    {
        using var stream = new MemoryStream();
        using (var w = new Utf8JsonWriter(stream, new JsonWriterOptions { Indented = true }))
        {
            w.WriteStartObject();
            w.WriteNumber("slp62_ops_per_s", Round(r.Slp62OpsPerSecond));
            w.WriteNumber("slp31_ops_per_s", Round(r.Slp31OpsPerSecond));
            w.WriteNumber("det100_ms", Round(r.Det100Ms));
            w.WriteNumber("det20_ms", Round(r.Det20Ms));
            w.WriteNumber("det200_ms", Round(r.Det200Ms));
            w.WriteNumber("perm20_ms", Round(r.Perm20Ms));
            w.WriteNumber("candidates_per_s", Round(r.CandidatesPerSecond));
            w.WriteNumber("catalogue_size", r.CatalogueSize);
            w.WriteNumber("block_size", r.BlockSize);
            w.WriteNumber("slp_steps", r.Steps);
            w.WriteNumber("slp_registers", r.Registers);
            w.WriteString("kernel62", r.Kernel62);
            w.WriteString("kernel31", r.Kernel31);
            w.WriteStartObject("cpu");
            w.WriteString("architecture", RuntimeInformation.ProcessArchitecture.ToString());
            w.WriteNumber("processors", Environment.ProcessorCount);
            foreach (var (name, supported) in VectorSupport()) w.WriteBoolean(name, supported);
            w.WriteEndObject();
            w.WriteString("dotnet", RuntimeInformation.FrameworkDescription);
            w.WriteNumber("runs", r.Runs);
            w.WriteBoolean("quick", r.Quick);
            w.WriteEndObject();
        }
        output.WriteLine(System.Text.Encoding.UTF8.GetString(stream.ToArray()));
    }

    private static void WriteText(TextWriter o, Report r)
    {
        o.WriteLine($"idq bench: one thread, median of {r.Runs} run(s){(r.Quick ? " (quick: few repetitions)" : "")}");
        o.WriteLine();
        o.WriteLine("  kernel                                              figure");
        o.WriteLine($"  SLP {r.Steps} multiply-adds, {r.Registers} registers, 62-bit   {r.Slp62OpsPerSecond,14:E3} multiply-adds/s");
        o.WriteLine($"  SLP {r.Steps} multiply-adds, {r.Registers} registers, 31-bit   {r.Slp31OpsPerSecond,14:E3} multiply-adds/s");
        o.WriteLine($"  determinant 20×20, 62-bit prime                  {r.Det20Ms,14:F4} ms");
        o.WriteLine($"  determinant 100×100, 62-bit prime                {r.Det100Ms,14:F3} ms");
        o.WriteLine($"  determinant 200×200, 62-bit prime                {r.Det200Ms,14:F3} ms");
        o.WriteLine($"  permanent 20×20 (Glynn), 62-bit prime            {r.Perm20Ms,14:F2} ms");
        o.WriteLine();
        o.WriteLine($"  blocks of {r.BlockSize} points; 62-bit: {r.Kernel62}; 31-bit: {r.Kernel31}");
        o.WriteLine($"  CPU: {RuntimeInformation.ProcessArchitecture}, {string.Join(" ", VectorSupport().Where(v => v.Supported).Select(v => v.Name))}; {RuntimeInformation.FrameworkDescription}");
        o.WriteLine();
        o.WriteLine($"about {r.CandidatesPerSecond:F0} candidates per second for a typical catalogue " +
            $"(screened to 2^-64 on one thread; measured on {r.CatalogueSize} sample candidates)");
    }

    /// <summary>Four significant digits, as the C reference prints them.</summary>
    private static double Round(double x) => double.IsFinite(x) ? double.Parse(x.ToString("G4", System.Globalization.CultureInfo.InvariantCulture), System.Globalization.CultureInfo.InvariantCulture) : 0;
}
