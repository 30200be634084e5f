using IdentityQueue.Algebra;

namespace IdentityQueue.Screening.Catalogues;

/// <summary>
/// The open family budget: how many instances of an open-ended family (<c>for n &gt;= A</c>) are screened at most
/// (<see cref="Instances"/>, default 64), and how many are made at a time (<see cref="Chunk"/>, default 8). A family grows by
/// a chunk when every instance made so far is final and none is refuted; it stops at its first refuted instance (the rest
/// of that chunk is still screened) or when the budget is reached. Chosen at import and stored with the family.
/// Made only by <see cref="Create"/>. Immutable.
/// </summary>
public readonly record struct OpenFamilyBudget
{
    public const int DefaultInstances = 64;

    public const int DefaultChunk = 8;

    private OpenFamilyBudget(int instances, int chunk)
    {
        Instances = instances;
        Chunk = chunk;
    }

    public static readonly OpenFamilyBudget Default = new(DefaultInstances, DefaultChunk);

    /// <summary>The most instances an open-ended family gets.</summary>
    public int Instances { get; }

    /// <summary>Instances made at a time.</summary>
    public int Chunk { get; }

    /// <summary>
    /// A budget of 1 ≤ <paramref name="instances"/> ≤ the limit MaxFamilySize instances, made <paramref name="chunk"/>
    /// (≥ 1) at a time; otherwise the reason.
    /// </summary>
    public static Result<OpenFamilyBudget> Create(int instances, int chunk = DefaultChunk, Limits? limits = null)
    {
        var max = (limits ?? Limits.Default).MaxFamilySize;
        if (instances < 1 || instances > max)
            return Result<OpenFamilyBudget>.Fail($"the open family budget must be between 1 and {max} instances (the limit MaxFamilySize), got {instances}");
        if (chunk < 1) return Result<OpenFamilyBudget>.Fail($"an open family grows by at least 1 instance at a time, got {chunk}");
        return Result<OpenFamilyBudget>.Ok(new OpenFamilyBudget(instances, chunk));
    }

    /// <summary>How many instances the next chunk has after <paramref name="made"/> instances (0 when the budget is reached).</summary>
    public int NextChunk(int made) => Math.Max(0, Math.Min(Chunk, Instances - made));
}
