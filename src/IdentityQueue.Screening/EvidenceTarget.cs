using System.Globalization;
using IdentityQueue.Algebra;

namespace IdentityQueue.Screening;

/// <summary>
/// The evidence wanted for a survivor: a false identity survives with probability at most 2^-<see cref="Bits"/>, that is
/// an accumulated error bound of at most <see cref="BoundLog2"/> = −Bits. The default (64) and the range (1 to 4096) live
/// here only; a user's value is validated once, where it enters (<see cref="Create"/>), a stored one is trusted
/// (<see cref="FromStored"/>). Immutable.
/// </summary>
public readonly record struct EvidenceTarget
{
    public const int DefaultBits = 64;
    public const int MinBits = 1;
    public const int MaxBits = 4096;

    public static readonly EvidenceTarget Default = new(DefaultBits);

    private readonly int _bits;

    private EvidenceTarget(int bits) => _bits = bits;

    /// <summary>B in 2^-B.</summary>
    public int Bits => _bits == 0 ? DefaultBits : _bits;

    /// <summary>log2 of the error bound this target means: −<see cref="Bits"/>.</summary>
    public double BoundLog2 => -Bits;

    /// <summary>Whether an accumulated error bound (log2) meets the target.</summary>
    public bool IsMetBy(double accumulatedLog2) => accumulatedLog2 <= BoundLog2;

    /// <summary>A target given by a user (<c>--target-bits</c>), or why it is out of range.</summary>
    public static Result<EvidenceTarget> Create(int bits) =>
        bits is >= MinBits and <= MaxBits
            ? Result<EvidenceTarget>.Ok(new EvidenceTarget(bits))
            : Result<EvidenceTarget>.Fail($"--target-bits must be between {MinBits} and {MaxBits}, got {bits}");

    /// <summary>A target read from a store (<c>catalogue.target_bits</c>), written there from a validated one.</summary>
    public static EvidenceTarget FromStored(int bits) =>
        bits is >= MinBits and <= MaxBits ? new EvidenceTarget(bits)
            : throw new ArgumentOutOfRangeException(nameof(bits), bits, $"a stored evidence target is between {MinBits} and {MaxBits} bits");

    /// <summary>As the messages write it: "2^-64".</summary>
    public override string ToString() => "2^-" + Bits.ToString(CultureInfo.InvariantCulture);
}
