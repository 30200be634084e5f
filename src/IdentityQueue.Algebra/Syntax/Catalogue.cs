using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

public enum FieldKind { Rationals, Finite }

/// <summary>
/// The field an identity is stated over: Q, GF(p) or GF(p^k); in a family line p may be a parameter
/// (<see cref="CharacteristicParameter"/>, <c>over GF(p) for p prime in 2..50</c>), fixed per instance by
/// <see cref="Bind"/>. A finite field is made only by <see cref="Finite"/>, which checks that p is a prime, so no
/// FieldSpec names GF(n) of a composite n. Immutable.
/// </summary>
public sealed record FieldSpec
{
    private FieldSpec(FieldKind kind, BigInteger characteristic, int degree)
    {
        Kind = kind;
        Characteristic = characteristic;
        Degree = degree;
    }

    public static readonly FieldSpec Rationals = new(FieldKind.Rationals, BigInteger.Zero, 1);

    public FieldKind Kind { get; }

    /// <summary>p for GF(p^k) (0 for Q and for a field whose p is a family parameter).</summary>
    public BigInteger Characteristic { get; }

    /// <summary>k for GF(p^k); 1 for Q.</summary>
    public int Degree { get; }

    /// <summary>GF(p^k): fails unless p is a prime (<see cref="Fields.Primality.IsPrime(System.Numerics.BigInteger)"/>) and k ≥ 1.</summary>
    public static Result<FieldSpec> Finite(BigInteger p, int k = 1)
    {
        if (k < 1) return Result<FieldSpec>.Fail($"GF({p}^{k}) needs an exponent of at least 1");
        if (p < 2 || !Fields.Primality.IsPrime(p)) return Result<FieldSpec>.Fail($"GF({p}) needs a prime, but {p} is not one");
        return Result<FieldSpec>.Ok(new FieldSpec(FieldKind.Finite, p, k));
    }

    /// <summary>GF(p^k) of this field's prime p (already checked when this field was made); fails for Q, a parameter p, or k &lt; 1.</summary>
    public Result<FieldSpec> WithDegree(int k)
    {
        if (Kind != FieldKind.Finite || CharacteristicParameter is not null)
            return Result<FieldSpec>.Fail($"{this} has no fixed prime to raise to the power {k}");
        if (k < 1) return Result<FieldSpec>.Fail($"GF({Characteristic}^{k}) needs an exponent of at least 1");
        return Result<FieldSpec>.Ok(new FieldSpec(FieldKind.Finite, Characteristic, k) { SeriesVariable = SeriesVariable, SeriesOrder = SeriesOrder });
    }

    /// <summary>GF(p) or GF(p^k) whose p is the family parameter <paramref name="name"/>, written at <paramref name="at"/>.</summary>
    public static FieldSpec FiniteOfParameter(string name, int k, SourcePosition at) =>
        new(FieldKind.Finite, BigInteger.Zero, k) { CharacteristicParameter = name, ParameterPosition = at };

    public bool IsRationals => Kind == FieldKind.Rationals;

    /// <summary>The family parameter that is the characteristic, or null when the field is fixed.</summary>
    public string? CharacteristicParameter { get; private init; }

    /// <summary>Where the parameter is written in the field.</summary>
    public SourcePosition ParameterPosition { get; private init; }

    /// <summary>
    /// For a truncated power series identity (<c>up to q^N</c>): the series variable q; the two sides are compared as power
    /// series in q up to q^<see cref="SeriesOrder"/>, that is in F[q]/(q^(N+1)). Null for an ordinary identity.
    /// </summary>
    public string? SeriesVariable { get; init; }

    /// <summary>N of <c>up to q^N</c>.</summary>
    public int SeriesOrder { get; init; }

    public bool IsSeries => SeriesVariable is not null;

    /// <summary>
    /// This field for one instance: p replaced by the parameter's value, which must be a prime (and the field within
    /// <paramref name="maxFieldBits"/>); otherwise the reason, at the parameter's position. A fixed field is itself.
    /// </summary>
    public Result<FieldSpec> Bind(IReadOnlyDictionary<string, BigInteger> parameters, int maxFieldBits)
    {
        if (CharacteristicParameter is not { } name) return Result<FieldSpec>.Ok(this);
        if (!parameters.TryGetValue(name, out var p))
            return Result<FieldSpec>.Fail(ParameterPosition, $"GF({name}): '{name}' is not a parameter of the family (write: for {name} prime in A..B)");
        var field = Finite(p, Degree);
        if (!field.Success)
            return Result<FieldSpec>.Fail(ParameterPosition, $"GF({name}) needs a prime {name}, but {name} = {p} (write: for {name} prime in A..B)");
        if ((double)p.GetBitLength() * Degree > maxFieldBits + 1)
            return Result<FieldSpec>.Fail(ParameterPosition, $"GF({p}{(Degree == 1 ? "" : $"^{Degree}")}) is larger than the limit MaxFieldBits ({maxFieldBits} bits)");
        return Result<FieldSpec>.Ok(field.Value with { SeriesVariable = SeriesVariable, SeriesOrder = SeriesOrder });
    }

    /// <summary>The canonical text: <c>Q</c>, <c>GF(7)</c>, <c>GF(2^8)</c>, <c>GF(p)</c>, and <c>Q up to q^30</c> for a series identity.</summary>
    public override string ToString()
    {
        var series = IsSeries ? $" up to {SeriesVariable}^{SeriesOrder}" : "";
        if (Kind == FieldKind.Rationals) return "Q" + series;
        var p = CharacteristicParameter ?? Characteristic.ToString();
        return (Degree == 1 ? $"GF({p})" : $"GF({p}^{Degree})") + series;
    }
}

/// <summary>
/// A family parameter <c>NAME in FROM..TO</c>, or <c>NAME prime in FROM..TO</c> for the primes of the range
/// (<see cref="PrimesOnly"/>); the ends may use earlier parameters of the same line. An open-ended parameter
/// <c>NAME &gt;= FROM</c> (<see cref="OpenEnded"/>) has no end: <see cref="To"/> is then <see cref="From"/> again and
/// means nothing; its instances FROM, FROM + 1, … are made a chunk at a time by whoever screens the family.
/// </summary>
public sealed record ParameterRange(string Name, Expr From, Expr To, SourcePosition Position)
{
    /// <summary>Only the primes of the range are instances.</summary>
    public bool PrimesOnly { get; init; }

    /// <summary>True for <c>NAME &gt;= FROM</c>: the family is screened in increasing NAME with no written end.</summary>
    public bool OpenEnded { get; init; }
}

/// <summary>One parsed catalogue line: <c>[label:] LHS = RHS [over FIELD] [for ...]</c>. Immutable.</summary>
public sealed record IdentityEntry(
    string? Label,
    Expr Left,
    Expr Right,
    FieldSpec Field,
    IReadOnlyList<ParameterRange> Parameters,
    int Line,
    string Text)
{
    public bool IsFamily => Parameters.Count > 0;

    /// <summary>The open-ended parameter (<c>for n &gt;= A</c>, then the only parameter), or null.</summary>
    public ParameterRange? OpenParameter => Parameters.Count == 1 && Parameters[0].OpenEnded ? Parameters[0] : null;

    /// <summary>
    /// Where the left side is written in its catalogue line: in <see cref="Text"/> for a parsed line; for a stored
    /// candidate, in the line it was imported from (null when the stored side is not the text as written).
    /// </summary>
    public TextSpan? LeftSpan { get; init; }

    /// <summary>Where the right side is written in its catalogue line (as <see cref="LeftSpan"/>).</summary>
    public TextSpan? RightSpan { get; init; }

    /// <summary>True when a side uses a definition (a <c>let</c> name), so its tree is not the text as written.</summary>
    public bool UsesDefinitions { get; init; }
}

/// <summary>A stretch of a line: 0-based <see cref="Start"/> and <see cref="Length"/> in characters.</summary>
public readonly record struct TextSpan(int Start, int Length)
{
    /// <summary>The 1-based column where the stretch starts.</summary>
    public int Column => Start + 1;

    public string Of(string text) => text.Substring(Start, Length);
}

/// <summary>
/// A problem found in catalogue text: where it is and what it is, and for a compile error the side and the values of the
/// parameters and bound variables where it happened (<see cref="Context"/>: <c>rhs, at n=2, j=1</c>). Immutable.
/// </summary>
public sealed record Diagnostic(SourcePosition Position, string Message)
{
    public string? Context { get; init; }

    /// <summary>The side of a compile error, <c>lhs</c> or <c>rhs</c> (also in <see cref="Context"/>).</summary>
    public string? Side { get; init; }

    /// <summary>The values of a compile error, <c>at n=2, j=1</c> (also in <see cref="Context"/>).</summary>
    public string? Values { get; init; }

    public override string ToString() =>
        Position.IsNone ? (Context is null ? Message : $"{Context}: {Message}")
        : Context is null ? $"{Position}: {Message}" : $"{Position}, {Context}: {Message}";
}

