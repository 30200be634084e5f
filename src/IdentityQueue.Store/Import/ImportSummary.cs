namespace IdentityQueue.Store.Import;

/// <summary>Settings of one import. Immutable.</summary>
public sealed record ImportOptions
{
    /// <summary>The catalogue's name; null for the file name without its extension.</summary>
    public string? CatalogueName { get; init; }

    /// <summary>The catalogue's run seed (0 ≤ seed &lt; 2^63); null for a random one.</summary>
    public long? Seed { get; init; }

    /// <summary>Rows (candidates and rejections) written per transaction.</summary>
    public int BatchSize { get; init; } = 2_000;

    /// <summary>How many rejections the summary lists (all are stored).</summary>
    public int RejectionsListed { get; init; } = 5;

    public Algebra.Limits Limits { get; init; } = Algebra.Limits.Default;

    /// <summary>The open family budget of the file's open-ended families (<c>--open-budget</c>); null for the default (64 instances, 8 at a time).</summary>
    public Screening.Catalogues.OpenFamilyBudget? OpenBudget { get; init; }

    /// <summary>
    /// Whether the import fingerprints the new candidates and groups those that are the same identity written differently
    /// (<see cref="CatalogueGrouping"/>; members share their representative's screening). On by default; <c>--no-grouping</c>.
    /// </summary>
    public bool GroupEquivalents { get; init; } = true;

    /// <summary>Threads for the fingerprints; null for the number of cores.</summary>
    public int? GroupingThreads { get; init; }
}

/// <summary>A catalogue entry that was not imported: where, what, and why (a row of <c>rejection</c>).</summary>
public sealed record Rejection(string Source, int Line, string Raw, string Reason)
{
    public override string ToString() => $"{Source}:{Line}: {Reason}";
}

/// <summary>What an import stored. Immutable.</summary>
/// <param name="CatalogueId">The catalogue's row id.</param>
/// <param name="Catalogue">The catalogue's name.</param>
/// <param name="Source">The file read.</param>
/// <param name="Seed">The catalogue's seed, from which every trial seed derives.</param>
/// <param name="Entries">Lines that gave an identity or a family.</param>
/// <param name="Instances">Candidates stored (one per family instance).</param>
/// <param name="Lines">Physical lines read.</param>
/// <param name="Rejections">Lines rejected.</param>
/// <param name="FirstRejections">The first rejections, for the summary.</param>
/// <param name="Elapsed">How long the import took.</param>
public sealed record ImportSummary(
    long CatalogueId,
    string Catalogue,
    string Source,
    long Seed,
    int Lines,
    int Entries,
    int Instances,
    int Rejections,
    IReadOnlyList<Rejection> FirstRejections,
    TimeSpan Elapsed)
{
    /// <summary>What was accepted but deserves a word (an unknown CSV column, ignored), each once; empty for most imports.</summary>
    public IReadOnlyList<string> Warnings { get; init; } = [];

    /// <summary>The equivalence groups found (#15 point 4), or null when grouping was off.</summary>
    public GroupingSummary? Grouping { get; init; }
}
