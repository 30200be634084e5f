using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// Thrown inside the compiler to abandon one identity; caught at <see cref="IdentityCompiler.Compile"/> and
/// returned as a <see cref="Diagnostic"/>. Never escapes the Algebra project's public entry points.
/// </summary>
internal sealed class CompileError(SourcePosition position, string message) : Exception(message)
{
    public SourcePosition Position { get; } = position;

    public Diagnostic ToDiagnostic() => new(Position, Message);
}

/// <summary>The outcome of compiling: a program, or a diagnostic with the position. Never throws.</summary>
public readonly struct CompileResult
{
    private CompileResult(CompiledIdentity? value, Diagnostic? error)
    {
        Value = value;
        Error = error;
    }

    public CompiledIdentity? Value { get; }
    public Diagnostic? Error { get; }
    public bool Success => Error is null;

    public static CompileResult Ok(CompiledIdentity value) => new(value, null);
    public static CompileResult Fail(Diagnostic error) => new(null, error);
}
