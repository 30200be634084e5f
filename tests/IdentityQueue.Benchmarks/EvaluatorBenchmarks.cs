using BenchmarkDotNet.Attributes;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Benchmarks;

/// <summary>
/// The compiled evaluator on a straight-line program of about 4,096 multiply-add steps over 64 variables, one point at a
/// time, on the 31- and 62-bit rungs. Divide the time by 8,192 for the time per field operation.
/// </summary>
[MemoryDiagnoser]
public class EvaluatorBenchmarks
{
    private StraightLineProgram _program = null!;
    private PrimeField62 _f62;
    private PrimeField31 _f31;
    private Residue62[] _point62 = [], _registers62 = [], _constants62 = [];
    private Residue31[] _point31 = [], _registers31 = [], _constants31 = [];

    [GlobalSetup]
    public void Setup()
    {
        // r_k = r_a · r_b + r_c over 64 variables, 4096 steps, written as nested products and sums (no sharing to fold).
        var random = new Xoshiro256(7);
        var text = BuildChain(4096, ref random);
        var entry = CatalogueParser.ParseIdentity(text, Algebra.Limits.Default with { MaxNestingDepth = 100_000, MaxLineLength = 1 << 24 });
        if (!entry.Success) throw new InvalidOperationException(entry.Error!.ToString());
        var compiled = IdentityCompiler.Compile(entry.Value);
        if (!compiled.Success) throw new InvalidOperationException(compiled.Error!.ToString());
        _program = compiled.Value!.Program;

        _f62 = PrimeField62.CreateRandom(ref random);
        _f31 = PrimeField31.CreateRandom(ref random);
        _point62 = _program.Variables.Select(_ => _f62.Sample(ref random)).ToArray();
        _point31 = _program.Variables.Select(_ => _f31.Sample(ref random)).ToArray();
        _registers62 = new Residue62[_program.Length];
        _registers31 = new Residue31[_program.Length];
        Evaluator.TryPrepareConstants<PrimeField62, Residue62>(_f62, _program, out _constants62);
        Evaluator.TryPrepareConstants<PrimeField31, Residue31>(_f31, _program, out _constants31);
    }

    /// <summary>Horner-like chains t = t·x_i + x_j in 8 interleaved accumulators, summed at the end.</summary>
    internal static string BuildChain(int steps, ref Xoshiro256 random)
    {
        var chains = new string[8];
        for (var c = 0; c < 8; c++) chains[c] = $"x[{c}]";
        for (var k = 0; k < steps; k++)
        {
            var c = k % 8;
            chains[c] = $"({chains[c]})*x[{random.NextBelow(64UL)}] + x[{random.NextBelow(64UL)}]";
        }
        return string.Join(" + ", chains.Select(s => $"({s})")) + " = 0";
    }

    public int Instructions => _program.Length;

    [Benchmark]
    public bool Evaluate62() => Evaluator.Evaluate<PrimeField62, Residue62>(_f62, _program, _constants62, _point62, _registers62);

    [Benchmark]
    public bool Evaluate31() => Evaluator.Evaluate<PrimeField31, Residue31>(_f31, _program, _constants31, _point31, _registers31);
}
