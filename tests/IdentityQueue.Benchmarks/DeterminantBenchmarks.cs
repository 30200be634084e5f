using BenchmarkDotNet.Attributes;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Benchmarks;

/// <summary>One determinant of an n×n matrix of random residues mod a random 62-bit prime, through the real kernel.</summary>
[MemoryDiagnoser]
public class DeterminantBenchmarks
{
    private PrimeField62 _field;
    private Residue62[] _matrix = [];
    private Residue62[] _work = [];

    [Params(20, 100, 200)]
    public int N { get; set; }

    [GlobalSetup]
    public void Setup()
    {
        var random = new Xoshiro256(42);
        _field = PrimeField62.CreateRandom(ref random);
        _matrix = new Residue62[N * N];
        for (var i = 0; i < _matrix.Length; i++) _matrix[i] = _field.Sample(ref random);
        _work = new Residue62[N * N];
    }

    [Benchmark]
    public Residue62 Determinant()
    {
        _matrix.CopyTo(_work, 0);
        return MatrixKernels.Determinant(_field, _work.AsSpan(), N);
    }
}

/// <summary>Permanent of a 20×20 matrix by Ryser's formula in Gray-code order (2^20·20 multiply-adds).</summary>
[MemoryDiagnoser]
public class PermanentBenchmarks
{
    private PrimeField62 _field;
    private Residue62[] _matrix = [];

    [GlobalSetup]
    public void Setup()
    {
        var random = new Xoshiro256(43);
        _field = PrimeField62.CreateRandom(ref random);
        _matrix = new Residue62[400];
        for (var i = 0; i < _matrix.Length; i++) _matrix[i] = _field.Sample(ref random);
    }

    [Benchmark]
    public Residue62 Permanent20() => MatrixKernels.Permanent<PrimeField62, Residue62>(_field, _matrix, 20);
}
