using System.Numerics;

namespace IdentityQueue.Algebra.Syntax;

public enum FieldKind { Rationals, Finite }

/// <summary>The field an identity is stated over: Q, GF(p) or GF(p^k). Immutable.</summary>
public sealed record FieldSpec(FieldKind Kind, BigInteger Characteristic, int Degree)
{
    public static readonly FieldSpec Rationals = new(FieldKind.Rationals, BigInteger.Zero, 1);

    public static FieldSpec Finite(BigInteger p, int k = 1) => new(FieldKind.Finite, p, k);

    public bool IsRationals => Kind == FieldKind.Rationals;

    /// <summary>The canonical text: <c>Q</c>, <c>GF(7)</c>, <c>GF(2^8)</c>.</summary>
    public override string ToString() => Kind == FieldKind.Rationals ? "Q" : Degree == 1 ? $"GF({Characteristic})" : $"GF({Characteristic}^{Degree})";
}

/// <summary>A family parameter <c>NAME in FROM..TO</c>; the ends may use earlier parameters of the same line.</summary>
public sealed record ParameterRange(string Name, Expr From, Expr To, SourcePosition Position);

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
}

/// <summary>A problem found in catalogue text: where it is and what it is. Immutable.</summary>
public sealed record Diagnostic(SourcePosition Position, string Message)
{
    public override string ToString() => $"{Position}: {Message}";
}

/// <summary>The outcome of parsing: a value, or a <see cref="Diagnostic"/> that carries the position. Never throws.</summary>
public readonly struct ParseResult<T>
{
    private readonly T? _value;

    private ParseResult(T? value, Diagnostic? error)
    {
        _value = value;
        Error = error;
    }

    public static ParseResult<T> Ok(T value) => new(value, null);

    public static ParseResult<T> Fail(Diagnostic error) => new(default, error);

    public static ParseResult<T> Fail(SourcePosition at, string message) => new(default, new Diagnostic(at, message));

    public bool Success => Error is null;

    public Diagnostic? Error { get; }

    /// <summary>The parsed value; throws if parsing failed.</summary>
    public T Value => Error is null ? _value! : throw new InvalidOperationException($"parse failed: {Error}");
}
