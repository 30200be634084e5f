namespace IdentityQueue.Store.Schema;

// The persistence model: one class per table of SPEC §4, mapped by IdentityStoreContext. Decimal values (moduli,
// residues, degree bounds, 64-bit seeds) are decimal text, since they can exceed every provider's integer types.
// Times are UTC; SQLite keeps them as ISO-8601 text ('YYYY-MM-DD HH:MM:SS').

/// <summary>A row of <c>catalogue</c>: one imported file (or a hand-made catalogue).</summary>
public sealed class CatalogueRow
{
    public long Id { get; set; }
    public required string Name { get; set; }
    /// <summary>The imported file's path as given on the command line; null for a hand-made catalogue.</summary>
    public string? Source { get; set; }
    public DateTime ImportedAt { get; set; }
    /// <summary>The run seed of the catalogue's candidates (0 ≤ seed &lt; 2^63), chosen at import.</summary>
    public long Seed { get; set; }
    /// <summary>
    /// How trials are keyed: 1 (every catalogue made by this version) by the candidate's canonical identity
    /// (<c>CandidateKey</c>), so that the same seed gives the same trials in any store and in <c>idq check</c>; 0 for the
    /// catalogues of stores made before that, whose trials were keyed by the candidate's id and stay reproducible so.
    /// </summary>
    public int KeyScheme { get; set; }
    /// <summary>The evidence target (bits) of the catalogue's last run; 64 until a run records another.</summary>
    public int TargetBits { get; set; }
    /// <summary>Counts at import: entries accepted, candidates made, rejections; null until an import has finished.</summary>
    public int? Entries { get; set; }
    public int? Instances { get; set; }
    public int? Rejections { get; set; }
    /// <summary>1 at the first import; raised by each <c>idq import --new-version</c> (the earlier versions' verdicts are in <c>catalogue_version_entry</c>).</summary>
    public int Version { get; set; }
}

/// <summary>A row of <c>candidate</c>: one identity to screen (one instance of a family line).</summary>
public sealed class CandidateRow
{
    public long Id { get; set; }
    public long CatalogueId { get; set; }
    public required string Label { get; set; }
    /// <summary>The family label for an instance of a family line; null for a plain line.</summary>
    public string? Family { get; set; }
    /// <summary>The instance's parameters as a JSON object, <c>{"n":3}</c>; null for a plain line.</summary>
    public string? Params { get; set; }
    public required string Lhs { get; set; }
    public required string Rhs { get; set; }
    /// <summary>'Q', 'GF(7)', 'GF(2^8)'.</summary>
    public required string Field { get; set; }
    public DateTime CreatedAt { get; set; }
    /// <summary>The line of the catalogue file the candidate came from; null for a hand-inserted row.</summary>
    public int? Position { get; set; }
    /// <summary>The column of the catalogue line where <see cref="Lhs"/> starts, when it is the text as written there; else null.</summary>
    public int? LhsColumn { get; set; }
    /// <summary>The column of the catalogue line where <see cref="Rhs"/> starts, when it is the text as written there; else null.</summary>
    public int? RhsColumn { get; set; }
}

/// <summary>A row of <c>result</c>: the screening state of one candidate.</summary>
public sealed class ResultRow
{
    public long CandidateId { get; set; }
    /// <summary>One of <see cref="ResultStates"/>.</summary>
    public required string State { get; set; }
    /// <summary>The degree bound D as decimal text (it can exceed 2^63: exponents go up to 2^64 and multiply).</summary>
    public string? DegreeBound { get; set; }
    public double? HeightBoundLog2 { get; set; }
    public int TrialsZero { get; set; }
    public double? ErrorBoundLog2 { get; set; }
    public long? WitnessTrialId { get; set; }
    public bool Certified { get; set; }
    public string? Message { get; set; }
    public DateTime UpdatedAt { get; set; }
    /// <summary>The worker screening the candidate now, and since when; null when no one is.</summary>
    public string? ClaimedBy { get; set; }
    public DateTime? ClaimedAt { get; set; }
    /// <summary>
    /// The representative whose result this one shares (a member of an equivalence group, see <see cref="EquivalenceRow"/>):
    /// state, degree bound and error bound are its, not screened here; null for a result screened on its own.
    /// </summary>
    public long? SharedFrom { get; set; }
}

/// <summary>A row of <c>trial</c>: one evaluation of lhs − rhs at a random point.</summary>
public sealed class TrialRow
{
    public long Id { get; set; }
    public long CandidateId { get; set; }
    public int Seq { get; set; }
    /// <summary>The prime p, decimal text (the characteristic, for an extension field).</summary>
    public required string Modulus { get; set; }
    public int FieldBits { get; set; }
    /// <summary>log2 of the field size, exactly as the screen used it.</summary>
    public double FieldSizeLog2 { get; set; }
    /// <summary>m of GF(p^m); 1 for a prime field.</summary>
    public int ExtensionDegree { get; set; }
    /// <summary>The defining polynomial's coefficients, lowest power first, as a JSON array of decimal strings; null for a prime field.</summary>
    public string? DefiningPolynomial { get; set; }
    /// <summary>The trial's seed, decimal text (a full 64-bit value).</summary>
    public required string PointSeed { get; set; }
    /// <summary>'zero', 'nonzero' or 'undefined'.</summary>
    public required string Outcome { get; set; }
    /// <summary>The point as a JSON object: <c>{"x": "123"}</c>, or coefficient lists <c>{"x": ["1","0","3"]}</c> over an extension field.</summary>
    public required string Point { get; set; }
    /// <summary>The nonzero residue of lhs − rhs: decimal text, or a JSON array of decimal strings over an extension field.</summary>
    public string? Difference { get; set; }
    /// <summary>The matrix entry that was nonzero (<c>[1,2]</c>); null for a scalar identity.</summary>
    public string? Entry { get; set; }
    public double? BoundLog2 { get; set; }
    public long ElapsedUs { get; set; }
    public string? Worker { get; set; }
    public DateTime CreatedAt { get; set; }
}

/// <summary>A row of <c>rejection</c>: a catalogue entry that could not be imported, and why.</summary>
public sealed class RejectionRow
{
    public long Id { get; set; }
    public long CatalogueId { get; set; }
    public required string Source { get; set; }
    public int Line { get; set; }
    public required string Raw { get; set; }
    public required string Reason { get; set; }
}

/// <summary>
/// A row of <c>worker</c>: one worker process (host:pid) with its heartbeat, so that <c>idq status</c> can show who is
/// working and recovery can tell a dead worker's claims from a live one's. Not part of SPEC §4's stable face.
/// </summary>
public sealed class WorkerRow
{
    /// <summary>host:pid, as in claimed_by and trial.worker.</summary>
    public required string Name { get; set; }
    public required string Host { get; set; }
    public int Pid { get; set; }
    /// <summary>Worker threads (Hangfire workers) in the process.</summary>
    public int Threads { get; set; }
    public DateTime StartedAt { get; set; }
    public DateTime HeartbeatAt { get; set; }
    public long ChunksDone { get; set; }
    public long CandidatesDone { get; set; }
    /// <summary>When it stopped gracefully; null while it runs (or after it died).</summary>
    public DateTime? StoppedAt { get; set; }
    /// <summary>The candidate it has been screening the longest, as of its last heartbeat; null when idle.</summary>
    public long? CurrentCandidateId { get; set; }
    /// <summary>Since when it screens <see cref="CurrentCandidateId"/>.</summary>
    public DateTime? CurrentSince { get; set; }
}

/// <summary>
/// A row of <c>counterexample</c>: the smallest integer point found where a refuted candidate's sides differ (least
/// max-norm, then least sum of absolute values, then the variables' order), with both sides' exact values.
/// </summary>
public sealed class CounterexampleRow
{
    public long CandidateId { get; set; }
    /// <summary>A JSON object, variable → integer as text, in the variables' order: <c>{"a":"1","b":"0"}</c>.</summary>
    public required string Point { get; set; }
    /// <summary>The left side's exact value at the point (an integer or a fraction, as text).</summary>
    public required string LhsValue { get; set; }
    /// <summary>The right side's exact value at the point.</summary>
    public required string RhsValue { get; set; }
    /// <summary>For a matrix identity, the differing entry, <c>[2,1]</c>; else null.</summary>
    public string? Entry { get; set; }
    /// <summary>The point's max-norm (largest absolute coordinate).</summary>
    public long MaxAbs { get; set; }
    /// <summary>True when every point of smaller norm (and every smaller one of this norm) was tried, so none smaller exists.</summary>
    public bool Exhaustive { get; set; }
    /// <summary>How many points the search evaluated.</summary>
    public long PointsTried { get; set; }
    public DateTime CreatedAt { get; set; }
}

/// <summary>
/// A row of <c>recovered_difference</c>: lhs − rhs of a refuted candidate (its numerator when it is a fraction),
/// recovered exactly by sparse interpolation and verified at fresh points; or, when it has too many terms, its total
/// degree along a random line and an estimate of its number of terms.
/// </summary>
public sealed class RecoveredDifferenceRow
{
    public long CandidateId { get; set; }
    /// <summary>The difference in catalogue syntax, <c>2*x*y</c>; null when it was too large to recover.</summary>
    public string? Difference { get; set; }
    /// <summary>Its number of terms (exact when <see cref="Difference"/> is set, else an estimate).</summary>
    public long? Terms { get; set; }
    public int? TotalDegree { get; set; }
    /// <summary>True when <see cref="Terms"/> is an estimate (the difference was not written out).</summary>
    public bool TermsEstimated { get; set; }
    public DateTime CreatedAt { get; set; }
}

/// <summary>
/// A row of <c>equivalence</c>: a candidate whose fingerprint (both sides evaluated at fixed random points) equals
/// another's, so it is the same identity up to the chance the Schwartz–Zippel lemma bounds, and shares the evidence of
/// its group's representative (<see cref="GroupCandidateId"/>).
/// </summary>
public sealed class EquivalenceRow
{
    public long CandidateId { get; set; }
    public long GroupCandidateId { get; set; }
    /// <summary>True when the sides are swapped with respect to the representative's.</summary>
    public bool Swapped { get; set; }
    /// <summary>k of "the chance of a false match is at most 2^-k" (Fingerprint.FalseMatchLog2, rounded down); null when not bounded.</summary>
    public int? FalseMatchBits { get; set; }
}

/// <summary>
/// A row of <c>open_family</c>: an open-ended family (<c>for n &gt;= A</c>) of a catalogue, with the open family budget it
/// was imported with and how many instances exist. Workers add the next chunk of instances when every instance is final
/// and none is refuted, until the budget; <see cref="Made"/> is their compare-and-set, so two workers never add one chunk twice.
/// </summary>
public sealed class OpenFamilyRow
{
    public long Id { get; set; }
    public long CatalogueId { get; set; }
    /// <summary>The family label (<c>candidate.family</c> of its instances).</summary>
    public required string Family { get; set; }
    /// <summary>The open-ended parameter's name.</summary>
    public required string Parameter { get; set; }
    /// <summary>The first value A of <c>n &gt;= A</c>; the instances are A, A + 1, … A + made − 1.</summary>
    public long FirstValue { get; set; }
    /// <summary>The open family budget: at most this many instances.</summary>
    public int Budget { get; set; }
    /// <summary>Instances added at a time.</summary>
    public int Chunk { get; set; }
    /// <summary>Instances made so far.</summary>
    public int Made { get; set; }
}

/// <summary>
/// A row of <c>catalogue_version_entry</c>: one candidate of an earlier version of a catalogue as it stood when the next
/// version was imported (<c>idq import --new-version</c>): its text, its canonical identity and its verdict, kept so that
/// <c>idq compare</c> can tell what the new version added, removed or changed even after the candidate itself is gone.
/// </summary>
public sealed class VersionEntryRow
{
    public long Id { get; set; }
    public long CatalogueId { get; set; }
    /// <summary>The version this entry belonged to (the catalogue's <c>version</c> before the re-import).</summary>
    public int Version { get; set; }
    /// <summary>The candidate's id then; it still exists when the new version kept the identity (no foreign key: it may be gone).</summary>
    public long CandidateId { get; set; }
    public required string Label { get; set; }
    public string? Family { get; set; }
    public string? Params { get; set; }
    public required string Lhs { get; set; }
    public required string Rhs { get; set; }
    public required string Field { get; set; }
    /// <summary>The canonical identity (<c>CandidateKey.Canonical</c>); null when the stored sides did not parse.</summary>
    public string? Identity { get; set; }
    /// <summary>The result state then.</summary>
    public required string State { get; set; }
    public double? ErrorBoundLog2 { get; set; }
    public int TrialsZero { get; set; }
    /// <summary>When the version was replaced.</summary>
    public DateTime ReplacedAt { get; set; }
}
