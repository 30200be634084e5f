namespace IdentityQueue.Algebra;

/// <summary>
/// Every input limit, by name. Exceeding one makes that candidate invalid or undecided with a message
/// naming the setting; it never crashes or hangs the worker. Immutable; share freely.
/// </summary>
public sealed record Limits
{
    public static readonly Limits Default = new();

    /// <summary>
    /// Longest catalogue line (and JSONL/CSV field), in characters: 64 MiB, room for an expanded polynomial of about
    /// 10^6 terms. A line is read with its bytes and its text in memory, never more than that line's own multiple.
    /// </summary>
    public int MaxLineLength { get; init; } = 1 << 26;

    /// <summary>Deepest nesting of parentheses, brackets and operators in one expression.</summary>
    public int MaxNestingDepth { get; init; } = 500;

    /// <summary>Most instances one family line may expand into.</summary>
    public int MaxFamilySize { get; init; } = 10_000;

    /// <summary>Most instructions in one compiled identity (the expression size after sums, products and matrices are expanded).</summary>
    public int MaxProgramSize { get; init; } = 4_000_000;

    /// <summary>
    /// Largest exponent allowed in <c>^</c> once parameters are fixed, in bits of its absolute value (a negative exponent is a
    /// reciprocal). Powers are evaluated by repeated squaring, so an exponent of b bits costs about 2b multiplications; the
    /// degree bound grows with the exponent and picks a rung large enough (a degree of 2^b needs a field of more than b + 16 bits).
    /// </summary>
    public int MaxExponentBits { get; init; } = 512;

    /// <summary>Largest integer parameter value (range ends, indices, exponents before the exponent check), in bits.</summary>
    public int MaxParameterBits { get; init; } = 4096;

    /// <summary>Largest n in <c>fact(n)</c>, <c>qfact(n, q)</c>, <c>qint(n, q)</c>, <c>qbinom(n, k, q)</c> and <c>binom(a, k)</c>'s k.</summary>
    public int MaxFunctionArgument { get; init; } = 100_000;

    /// <summary>Largest order of a matrix whose permanent is evaluated (Ryser's formula costs 2^n·n per point).</summary>
    public int MaxPermanentOrder { get; init; } = 30;

    /// <summary>Largest matrix order (rows or columns).</summary>
    public int MaxMatrixOrder { get; init; } = 2_000;

    /// <summary>Largest field used for a trial, in bits; a degree bound that needs more leaves the candidate undecided.</summary>
    public int MaxFieldBits { get; init; } = 4096;

    /// <summary>
    /// Most expression nodes one side of an entry may have once the definitions (<c>let</c> lines) it uses are written out
    /// (the stored side is that text, so it also keeps the stored text well below <see cref="MaxLineLength"/>).
    /// </summary>
    public int MaxExpandedNodes { get; init; } = 100_000;

    /// <summary>
    /// Most steps (table cells, terms, rational operations) one exact number function of integer arguments may take
    /// (<c>stirling1</c>, <c>stirling2</c>, <c>bernoulli</c>, <c>harmonic</c>, …); its value must also fit <see cref="MaxParameterBits"/>.
    /// </summary>
    public int MaxNumberFunctionWork { get; init; } = 2_000_000;

    /// <summary>N in <c>up to q^N</c>: the highest power of q a truncated power series identity compares.</summary>
    public int MaxSeriesOrder { get; init; } = 10_000;
}
