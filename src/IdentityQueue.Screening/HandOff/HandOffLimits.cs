namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// How large a candidate may be for the hand-off to a prover (<see cref="SmtLibWriter"/>). A candidate over a limit is
/// skipped with a message naming it; nothing is truncated. Immutable; share freely.
/// </summary>
public sealed record HandOffLimits
{
    public static readonly HandOffLimits Default = new();

    /// <summary>
    /// Steps of expansion allowed for one candidate: every node visited and every arithmetic operation formed (sums,
    /// products, matrix products and the expansions of det, perm and pf each count). Also bounds the script's size.
    /// </summary>
    public int MaxExpansionSteps { get; init; } = 200_000;

    /// <summary>
    /// Largest order of a matrix whose det, perm or pf is expanded. The expansion shares minors (Laplace along the
    /// first row, one definition per set of columns), so it costs about n·2^(n−1) products rather than n!.
    /// </summary>
    public int MaxExpansionOrder { get; init; } = 10;

    /// <summary>Largest number of rows or columns of any matrix in the identity.</summary>
    public int MaxMatrixOrder { get; init; } = 16;

    /// <summary>Largest exponent of <c>^</c> (powers become products by repeated squaring; a prover sees the degree).</summary>
    public int MaxExponent { get; init; } = 512;

    /// <summary>Largest integer constant, in bits, that the expansion may form (fact(n), binom's k!, folded constants).</summary>
    public int MaxConstantBits { get; init; } = 4096;
}
