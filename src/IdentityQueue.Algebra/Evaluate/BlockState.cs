using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The register file and the per-lane state of one <see cref="BlockEvaluator{TField, T}"/>, shared with its interpreter and
/// the block functions: registers as [slot][lane], each lane's field, which lanes are undefined, and the scratch buffers.
/// Allocated once per evaluator; mutable, not thread-safe.
/// </summary>
internal sealed class BlockState<TField, T> where TField : struct, IField<T> where T : struct
{
    public BlockState(BlockProgram program, int blockSize)
    {
        Program = program;
        B = blockSize;
        Registers = new T[checked(program.SlotCount * blockSize)];
        Undefined = new bool[blockSize];
        ConstantUndefined = new bool[blockSize];
        Fields = new TField[blockSize];
        LaneScratch = new T[blockSize];
        Matrix = new T[program.MaxMatrixEntries];
        PermanentScratch = new T[program.MaxPermanentOrder == 0 ? 0 : (program.MaxPermanentOrder + 3) * blockSize];
    }

    public BlockProgram Program { get; }

    /// <summary>Lanes per block.</summary>
    public int B { get; }

    /// <summary>Slot s of lane l at <c>s·B + l</c>.</summary>
    public T[] Registers { get; }

    /// <summary>The lanes that a division by zero (or an undefined constant) made undefined in the evaluation running now.</summary>
    public bool[] Undefined { get; }

    /// <summary>The lanes where a constant's denominator vanishes in the lane's field.</summary>
    public bool[] ConstantUndefined { get; }

    /// <summary>Each lane's field.</summary>
    public TField[] Fields { get; }

    /// <summary>Every lane is in the same field.</summary>
    public bool Uniform { get; set; }

    /// <summary>Every lane's field has odd characteristic (permanents may use Glynn's formula).</summary>
    public bool OddCharacteristic { get; set; }

    /// <summary>The token of the evaluation running now.</summary>
    public CancellationToken Cancellation { get; set; }

    /// <summary>One value per lane (prefix products of a batch inversion).</summary>
    public T[] LaneScratch { get; }

    /// <summary>One lane's matrix (determinants and Pfaffians, lane by lane).</summary>
    public T[] Matrix { get; }

    /// <summary>Column sums, a product and two accumulators, each one value per lane (permanents on all lanes together).</summary>
    public T[] PermanentScratch { get; }
}
