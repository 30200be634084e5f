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

    /// <summary>The catalogue's run seed.</summary>
    public RunSeed Seed => RunSeed.FromStored(CatalogueSeed);

    /// <summary>
    /// The key the trials of this candidate are seeded with: its canonical identity (<see cref="CandidateKey"/>), or its id
    /// in a catalogue made before canonical keys (<c>catalogue.key_scheme</c> 0), whose stored trials stay reproducible so.
    /// </summary>
    public ulong TrialKey(BoundCandidate bound) =>
        KeyScheme == 0 || !bound.Success ? unchecked((ulong)Id) : CandidateKey.Of(bound.Entry!, bound.Parameters);

    /// <summary>The catalogue line this candidate stands for (without its family ranges; <see cref="Params"/> binds them).</summary>
    public string Text => ExprPrinter.Line(Lhs, Rhs, Field);

    /// <summary>
    /// Parses the stored sides and field and reads the parameters, giving an <see cref="IdentityEntry"/> (no family
    /// ranges: the parameters are already fixed) and the parameter values to compile it with, or why that failed.
    /// Each side is parsed on its own, so a hand-written side cannot smuggle in a label, an 'over' or a second '='.
    /// </summary>
    public BoundCandidate Bind(Limits? limits = null)
    {
        limits ??= Limits.Default;
        var left = CatalogueParser.ParseExpression(Lhs, limits);
        if (!left.Success) return BoundCandidate.Fail($"lhs: {left.Error}");
        var right = CatalogueParser.ParseExpression(Rhs, limits);
        if (!right.Success) return BoundCandidate.Fail($"rhs: {right.Error}");
        var field = CatalogueParser.ParseField(Field, limits);
        if (!field.Success) return BoundCandidate.Fail($"field: {field.Error}");
        IReadOnlyDictionary<string, BigInteger> parameters = new Dictionary<string, BigInteger>(StringComparer.Ordinal);
        if (Params is not null)
        {
            var read = ParamsText.Read(Params, out var error);
            if (read is null) return BoundCandidate.Fail(error!);
            parameters = read;
        }
        var entry = new IdentityEntry(Label, left.Value, right.Value, field.Value, [], Position ?? 1, Text)
        {
            LeftSpan = LhsColumn is { } l ? new TextSpan(l - 1, Lhs.Length) : null,
            RightSpan = RhsColumn is { } r ? new TextSpan(r - 1, Rhs.Length) : null,
        };
        return new BoundCandidate(entry, parameters, null);
    }
}

/// <summary>A stored candidate ready to compile: the entry and its parameters, or the message for an <c>invalid</c> result.</summary>
public sealed record BoundCandidate(IdentityEntry? Entry, IReadOnlyDictionary<string, BigInteger> Parameters, string? Error)
{
    public bool Success => Error is null;

    internal static BoundCandidate Fail(string error) => new(null, new Dictionary<string, BigInteger>(), error);
}
