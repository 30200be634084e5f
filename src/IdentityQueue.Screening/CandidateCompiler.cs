using System.Collections.Concurrent;
using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening;

/// <summary>
/// Compiles candidates for screening. The instances of a family whose parameters enter only as scalars share one
/// compilation (<see cref="FamilyTemplate"/>): the family's expression is compiled once, and each instance binds its
/// parameter values into the constant table. A family whose parameters shape the program (ranges, exponents, indices,
/// matrix sizes) is compiled instance by instance, as is every single identity. Holds up to <see cref="Capacity"/>
/// families (then starts afresh). Thread-safe.
/// </summary>
public sealed class CandidateCompiler(Limits limits)
{
    /// <summary>Families remembered at once.</summary>
    public const int Capacity = 1024;

    private readonly ConcurrentDictionary<string, FamilyTemplate?> _templates = new(StringComparer.Ordinal);

    /// <summary>
    /// The instance of <paramref name="entry"/> with <paramref name="parameters"/>. Instances are told apart from other
    /// families by the entry's text (the catalogue line without its ranges) and the names of their parameters.
    /// </summary>
    public Result<CompiledIdentity> Compile(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters)
    {
        if (parameters.Count == 0) return IdentityCompiler.Compile(entry, parameters, limits);
        var key = Key(entry, parameters);
        if (!_templates.TryGetValue(key, out var template))
        {
            if (_templates.Count >= Capacity) _templates.Clear();
            template = IdentityCompiler.CompileTemplate(entry, parameters, limits);
            _templates.TryAdd(key, template);
        }
        return template is null ? IdentityCompiler.Compile(entry, parameters, limits) : template.Instance(parameters);
    }

    /// <summary>Whether the family of this instance is compiled once for all its instances (after its first instance).</summary>
    public bool IsShared(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters) =>
        _templates.TryGetValue(Key(entry, parameters), out var t) && t is not null;

    /// <summary>The text and the parameters' names: the same text with another set of parameters is another family.</summary>
    private static string Key(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters) =>
        entry.Text + "\n" + string.Join(",", parameters.Keys.Order(StringComparer.Ordinal));
}
