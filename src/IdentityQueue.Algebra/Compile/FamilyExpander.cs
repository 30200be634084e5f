using System.Numerics;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Compile;

/// <summary>The outcome of expanding a family line: its parameter assignments in order, or a diagnostic.</summary>
public readonly record struct FamilyExpansion(IReadOnlyList<IReadOnlyDictionary<string, BigInteger>> Instances, Diagnostic? Error)
{
    public bool Success => Error is null;
}

/// <summary>
/// Expands <c>for n in A..B, k in C..D</c> into one parameter assignment per instance, in lexicographic
/// parameter order; a later range may use the earlier parameters. An open-ended family (<c>for n &gt;= A</c>) gives its
/// first <c>openInstances</c> instances, A, A + 1, …; the rest are made later, a chunk at a time. Stateless.
/// </summary>
public static class FamilyExpander
{
    public static FamilyExpansion Expand(IdentityEntry entry, Limits? limits = null, int openInstances = 1)
    {
        limits ??= Limits.Default;
        var result = new List<IReadOnlyDictionary<string, BigInteger>>();
        if (!entry.IsFamily)
        {
            result.Add(new Dictionary<string, BigInteger>());
            return new FamilyExpansion(result, null);
        }
        var names = new HashSet<string>(StringComparer.Ordinal);
        foreach (var p in entry.Parameters)
            if (!names.Add(p.Name))
                return new FamilyExpansion(result, new Diagnostic(p.Position, $"the parameter '{p.Name}' is given twice"));
        try
        {
            Walk(entry.Parameters, 0, new Dictionary<string, BigInteger>(StringComparer.Ordinal), result, limits, openInstances);
        }
        catch (CompileError e)
        {
            return new FamilyExpansion([], e.ToDiagnostic());
        }
        if (result.Count == 0)
            return new FamilyExpansion(result, new Diagnostic(entry.Parameters[0].Position, "the family has no instances (every range is empty)"));
        return new FamilyExpansion(result, null);
    }

    private static void Walk(IReadOnlyList<ParameterRange> ranges, int depth, Dictionary<string, BigInteger> scope,
        List<IReadOnlyDictionary<string, BigInteger>> result, Limits limits, int openInstances)
    {
        if (depth == ranges.Count)
        {
            result.Add(new Dictionary<string, BigInteger>(scope, StringComparer.Ordinal));
            return;
        }
        var range = ranges[depth];
        var from = ParameterEvaluator.EvaluateInteger(range.From, scope, limits, $"the start of the range of '{range.Name}'");
        var to = range.OpenEnded
            ? from + Math.Max(openInstances, 1) - 1
            : ParameterEvaluator.EvaluateInteger(range.To, scope, limits, $"the end of the range of '{range.Name}'");
        if (to - from + 1 > limits.MaxFamilySize - result.Count)
            throw new CompileError(range.Position, $"the family has more than {limits.MaxFamilySize} instances (the limit MaxFamilySize)");
        for (var v = from; v <= to; v++)
        {
            if (range.PrimesOnly && (v < 2 || !Fields.Primality.IsPrime(v))) continue;
            scope[range.Name] = v;
            Walk(ranges, depth + 1, scope, result, limits, openInstances);
            if (result.Count > limits.MaxFamilySize)
                throw new CompileError(range.Position, $"the family has more than {limits.MaxFamilySize} instances (the limit MaxFamilySize)");
        }
        scope.Remove(range.Name);
    }
}
