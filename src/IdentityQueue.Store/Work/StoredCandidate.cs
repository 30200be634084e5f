using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;

namespace IdentityQueue.Store.Work;

/// <summary>A candidate as stored, with what its catalogue says about running it. Immutable.</summary>
public sealed record StoredCandidate(
    long Id,
    long CatalogueId,
    string Catalogue,
    string Label,
    string? Family,
    string? Params,
    string Lhs,
    string Rhs,
    string Field,
    int? Position,
    long CatalogueSeed,
    int CatalogueTargetBits,
    int KeyScheme = 1)
{
    /// <summary>The column of the catalogue line where <see cref="Lhs"/> starts, when it is the text as written there.</summary>
    public int? LhsColumn { get; init; }

    /// <summary>The column of the catalogue line where <see cref="Rhs"/> starts, when it is the text as written there.</summary>
    public int? RhsColumn { get; init; }

    /// <summary>The catalogue's evidence target.</summary>
    public EvidenceTarget Target => EvidenceTarget.FromStored(CatalogueTargetBits);

    /// <summary>The catalogue's run seed.</summary>
    public RunSeed Seed => RunSeed.FromStored(CatalogueSeed);

    /// <summary>
    /// The key the trials of this candidate are seeded with: its canonical identity (<see cref="CandidateKey"/>), or its id
    /// in a catalogue made before canonical keys (<c>catalogue.key_scheme</c> 0), whose stored trials stay reproducible so.
    /// </summary>
    public ulong TrialKey(BoundCandidate bound) =>
        KeyScheme == 0 || !bound.Success ? unchecked((ulong)Id) : CandidateKey.Of(bound.Entry, bound.Parameters);

    /// <summary>The catalogue line this candidate stands for (without its family ranges; <see cref="Params"/> binds them).</summary>
    public string Text => ExprPrinter.Line(Lhs, Rhs, Field);

    /// <summary>
    /// Parses the stored sides and field and reads the parameters, giving an <see cref="IdentityEntry"/> (no family
    /// ranges: the parameters are already fixed) and the parameter values to compile it with, or why that failed.
    /// Each side is parsed on its own, so a hand-written side cannot smuggle in a label, an 'over' or a second '='.
    /// </summary>
    /// <param name="limits">The limits the stored text is parsed under; the defaults when null.</param>
    /// <param name="sides">
    /// Parsed sides shared by several calls (one claim of a chunk): the instances of a family store the same sides and
    /// differ in their parameters only, so the sides are parsed once per family and chunk.
    /// </param>
    public BoundCandidate Bind(Limits? limits = null, StoredSides? sides = null)
    {
        limits ??= Limits.Default;
        var parsed = sides is null ? StoredSides.Parse(Lhs, Rhs, Field, limits) : sides.Get(Lhs, Rhs, Field, limits);
        if (!parsed.Success) return BoundCandidate.Fail(parsed.Error.Message);
        IReadOnlyDictionary<string, BigInteger> parameters = new Dictionary<string, BigInteger>(StringComparer.Ordinal);
        if (Params is not null)
        {
            var read = ParamsText.Read(Params);
            if (!read.Success) return BoundCandidate.Fail(read.Error.Message);
            parameters = read.Value;
        }
        var (left, right, field) = parsed.Value;
        var entry = new IdentityEntry(Label, left, right, field, [], Position ?? 1, Text)
        {
            LeftSpan = LhsColumn is { } l ? new TextSpan(l - 1, Lhs.Length) : null,
            RightSpan = RhsColumn is { } r ? new TextSpan(r - 1, Rhs.Length) : null,
        };
        return new BoundCandidate(entry, parameters, null);
    }
}

/// <summary>
/// Stored sides parsed once each: a cache for one claim (the candidates of a chunk), keyed by the stored texts, so that
/// the instances of a family (same sides, other parameters) share one parse. Not thread-safe; one per claim.
/// </summary>
public sealed class StoredSides
{
    private readonly Dictionary<(string Lhs, string Rhs, string Field), Result<(Expr Left, Expr Right, FieldSpec Field)>> _parsed = [];

    /// <summary>How many distinct sides were parsed (for tests).</summary>
    public int Parses { get; private set; }

    public Result<(Expr Left, Expr Right, FieldSpec Field)> Get(string lhs, string rhs, string field, Limits limits)
    {
        if (_parsed.TryGetValue((lhs, rhs, field), out var known)) return known;
        Parses++;
        return _parsed[(lhs, rhs, field)] = Parse(lhs, rhs, field, limits);
    }

    /// <summary>
    /// Parses each side on its own, so a hand-written side cannot smuggle in a label, an 'over' or a second '='; the
    /// failure's message names the part ("lhs: …").
    /// </summary>
    public static Result<(Expr Left, Expr Right, FieldSpec Field)> Parse(string lhs, string rhs, string field, Limits limits)
    {
        var left = CatalogueParser.ParseExpression(lhs, limits);
        if (!left.Success) return Result<(Expr, Expr, FieldSpec)>.Fail($"lhs: {left.Error}");
        var right = CatalogueParser.ParseExpression(rhs, limits);
        if (!right.Success) return Result<(Expr, Expr, FieldSpec)>.Fail($"rhs: {right.Error}");
        var spec = CatalogueParser.ParseField(field, limits);
        if (!spec.Success) return Result<(Expr, Expr, FieldSpec)>.Fail($"field: {spec.Error}");
        return Result<(Expr, Expr, FieldSpec)>.Ok((left.Value, right.Value, spec.Value));
    }
}

/// <summary>A stored candidate ready to compile: the entry and its parameters, or the message for an <c>invalid</c> result.</summary>
public sealed record BoundCandidate(IdentityEntry? Entry, IReadOnlyDictionary<string, BigInteger> Parameters, string? Error)
{
    [System.Diagnostics.CodeAnalysis.MemberNotNullWhen(true, nameof(Entry))]
    [System.Diagnostics.CodeAnalysis.MemberNotNullWhen(false, nameof(Error))]
    public bool Success => Error is null && Entry is not null;

    internal static BoundCandidate Fail(string error) => new(null, new Dictionary<string, BigInteger>(), error);
}
