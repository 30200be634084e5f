using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// Thrown inside the lowering to abandon one identity; caught at <see cref="Lower.Lowering.Lower"/> (and
/// <see cref="IdentityCompiler.CompileTemplate"/>) and returned as a <see cref="Diagnostic"/>. Never escapes the Algebra project's public entry points.
/// </summary>
internal sealed class CompileError(SourcePosition position, string message) : Exception(message)
{
    public SourcePosition Position { get; } = position;

    /// <summary>The bound variables' values where it happened, innermost first (added as the error leaves each bound form).</summary>
    public List<(string Name, System.Numerics.BigInteger Value)> Bindings { get; } = [];

    public Diagnostic ToDiagnostic() => new(Position, Message);

    /// <summary>With the side and the values: <c>rhs, at n=2, j=1</c> (family parameters, then bound variables outermost first).</summary>
    public Diagnostic ToDiagnostic(string? side, IReadOnlyDictionary<string, System.Numerics.BigInteger> parameters, IReadOnlyList<string> parameterOrder)
    {
        var values = parameterOrder.Where(parameters.ContainsKey).Select(n => $"{n}={parameters[n]}")
            .Concat(Enumerable.Reverse(Bindings).Select(b => $"{b.Name}={b.Value}")).ToList();
        var at = values.Count == 0 ? null : "at " + string.Join(", ", values);
        var context = string.Join(", ", new[] { side, at }.Where(x => x is not null));
        return new Diagnostic(Position, Message) { Context = context.Length == 0 ? null : context, Side = side, Values = at };
    }
}
