using System.Diagnostics.CodeAnalysis;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra;

/// <summary>
/// The one failure convention of every layer: either a value or a <see cref="Diagnostic"/> (a message with its position
/// when it has one). Making one never throws; <see cref="Success"/> says which of the two is there.
/// </summary>
public readonly struct Result<T>
{
    private readonly T? _value;

    private Result(T? value, Diagnostic? error)
    {
        _value = value;
        Error = error;
    }

    /// <summary>The value; reading it from a failure throws with the diagnostic (check <see cref="Success"/> first).</summary>
    public T Value => Error is null ? _value! : throw new InvalidOperationException($"failed: {Error}");

    /// <summary>What went wrong, with its position; not null when not <see cref="Success"/>.</summary>
    public Diagnostic? Error { get; }

    [MemberNotNullWhen(false, nameof(Error))]
    public bool Success => Error is null;

    public static Result<T> Ok(T value) => new(value, null);

    public static Result<T> Fail(Diagnostic error) => new(default, error);

    public static Result<T> Fail(SourcePosition at, string message) => new(default, new Diagnostic(at, message));

    /// <summary>A failure that has no place in a text (a bad option value, a file that cannot be read).</summary>
    public static Result<T> Fail(string message) => new(default, new Diagnostic(SourcePosition.None, message));

    /// <summary>The same failure, for a result of another type.</summary>
    public Result<TOther> Cast<TOther>() =>
        Success ? throw new InvalidOperationException("only a failure can change its value type") : Result<TOther>.Fail(Error);

    public override string ToString() => Success ? $"Ok({_value})" : $"Fail({Error})";
}
