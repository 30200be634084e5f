using BenchmarkDotNet.Attributes;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Benchmarks;

/// <summary>
/// The block evaluator on the workload of the C reference kernels (modmul-ref.c): 4,096 multiply-adds r_c ← r_a·r_b + r_c
/// over 64 registers, on blocks of points, on the 62- and 31-bit rungs. The reported time is per block operation (one
/// multiply-add on all lanes of a block); divide by the block size for the time per multiply-add.
/// </summary>
[MemoryDiagnoser]
public class BlockEvaluatorBenchmarks
{
    private const int Steps = 4096;
    private BlockEvaluator<PrimeField62, Residue62> _e62 = null!;
    private BlockEvaluator<PrimeField31, Residue31> _e31 = null!;
    private Residue62[] _points62 = [], _outputs62 = [];
    private Residue31[] _points31 = [], _outputs31 = [];
    private bool[] _defined = [];

    [Params(16, 32, 64, 128)]
    public int BlockSize { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var random = new Xoshiro256(11);
        var program = BlockProgram.Prepare(SyntheticPrograms.RandomMultiplyAdd(64, Steps, 12));
        var f62 = PrimeField62.CreateRandom(ref random);
        var f31 = PrimeField31.CreateRandom(ref random);
        _e62 = new BlockEvaluator<PrimeField62, Residue62>(f62, program, BlockSize);
        _e31 = new BlockEvaluator<PrimeField31, Residue31>(f31, program, BlockSize);
        _points62 = new Residue62[64 * BlockSize];
        _points31 = new Residue31[64 * BlockSize];
        for (var i = 0; i < _points62.Length; i++)
        {
            _points62[i] = f62.Sample(ref random);
            _points31[i] = f31.Sample(ref random);
        }
        _outputs62 = new Residue62[64 * BlockSize];
        _outputs31 = new Residue31[64 * BlockSize];
        _defined = new bool[BlockSize];
    }

    [Benchmark(OperationsPerInvoke = Steps)]
    public int MultiplyAdd62() => _e62.Evaluate(_points62, _outputs62, _defined);

    [Benchmark(OperationsPerInvoke = Steps)]
    public int MultiplyAdd31() => _e31.Evaluate(_points31, _outputs31, _defined);
}

/// <summary>
/// A compiled identity (the chain of <see cref="EvaluatorBenchmarks"/>: about 8,200 instructions over 64 variables) through
/// the block evaluator, 64 points per block; the reported time is per point, to set beside
/// <see cref="EvaluatorBenchmarks"/>, which evaluates one point at a time.
/// </summary>
[MemoryDiagnoser]
public class BlockEvaluatorPointBenchmarks
{
    private const int Block = 64;
    private BlockEvaluator<PrimeField62, Residue62> _e62 = null!;
    private BlockEvaluator<PrimeField31, Residue31> _e31 = null!;
    private Residue62[] _points62 = [], _outputs62 = [];
    private Residue31[] _points31 = [], _outputs31 = [];
    private bool[] _defined = [];

    [GlobalSetup]
    public void Setup()
    {
        var random = new Xoshiro256(7);
        var text = EvaluatorBenchmarks.BuildChain(4096, ref random);
        var entry = CatalogueParser.ParseIdentity(text, Algebra.Limits.Default with { MaxNestingDepth = 100_000, MaxLineLength = 1 << 24 });
        if (!entry.Success) throw new InvalidOperationException(entry.Error!.ToString());
        var compiled = IdentityCompiler.Compile(entry.Value);
        if (!compiled.Success) throw new InvalidOperationException(compiled.Error!.ToString());
        var program = BlockProgram.Prepare(compiled.Value!.Program);
        var variables = compiled.Value.Program.Variables.Length;

        var f62 = PrimeField62.CreateRandom(ref random);
        var f31 = PrimeField31.CreateRandom(ref random);
        _e62 = new BlockEvaluator<PrimeField62, Residue62>(f62, program, Block);
        _e31 = new BlockEvaluator<PrimeField31, Residue31>(f31, program, Block);
        _points62 = new Residue62[variables * Block];
        _points31 = new Residue31[variables * Block];
        for (var i = 0; i < _points62.Length; i++)
        {
            _points62[i] = f62.Sample(ref random);
            _points31[i] = f31.Sample(ref random);
        }
        _outputs62 = new Residue62[Block];
        _outputs31 = new Residue31[Block];
        _defined = new bool[Block];
    }

    [Benchmark(OperationsPerInvoke = Block)]
    public int Chain62() => _e62.Evaluate(_points62, _outputs62, _defined);

    [Benchmark(OperationsPerInvoke = Block)]
    public int Chain31() => _e31.Evaluate(_points31, _outputs31, _defined);
}
