using System.Numerics;
using System.Runtime.CompilerServices;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Algebra.Lower;

/// <summary>
/// What the parts of one lowering share: the program being built, the limits, the integer scope (family parameters and
/// bound variables with their values), the side conditions found so far, and the position last visited. One per lowering.
/// </summary>
internal sealed class LoweringContext(Limits limits, IReadOnlyDictionary<string, BigInteger> parameters, bool shareParameters,
    (string Variable, int Order)? series)
{
    private long _steps;

    public ProgramBuilder Builder { get; } = new(limits);

    public Limits Limits { get; } = limits;

    /// <summary>The series variable and order of a truncated power series identity (<c>up to q^N</c>), or null.</summary>
    public (string Variable, int Order)? Series { get; } = series;

    /// <summary>The integer names in scope: family parameters and the bound variables around the node being lowered.</summary>
    public Dictionary<string, BigInteger> Scope { get; } = new(parameters, StringComparer.Ordinal);

    /// <summary>Sharing: the names whose binding in scope is the family parameter (not shadowed by a bound variable); null otherwise.</summary>
    public HashSet<string>? Shared { get; } = shareParameters ? new HashSet<string>(parameters.Keys, StringComparer.Ordinal) : null;

    /// <summary>Sharing: a family parameter was read where an integer is needed, so its value shapes the program.</summary>
    public bool ParameterFixesStructure { get; set; }

    public SourcePosition LastPosition { get; private set; } = new(1, 1);

    /// <summary>The side being lowered, <c>lhs</c> or <c>rhs</c>, for messages; null once both are done.</summary>
    public string? Side { get; set; }

    /// <summary>
    /// Side conditions found while lowering (the skew-symmetry of a Pfaffian's argument where its entries are not written
    /// as negatives of each other): registers that must vanish, with their names. They come first among the program's
    /// outputs (<see cref="StraightLineProgram.ConditionNames"/>), so a trial checks them at its point.
    /// </summary>
    public List<(int Register, string Name)> Conditions { get; } = [];

    /// <summary>Counts one node against MaxProgramSize and guards the stack.</summary>
    public void Step(Expr node)
    {
        LastPosition = node.Position;
        if (++_steps > Limits.MaxProgramSize)
            throw new CompileError(node.Position, $"the identity expands to more than {Limits.MaxProgramSize} terms (the limit MaxProgramSize)");
        RuntimeHelpers.EnsureSufficientExecutionStack();
    }

    /// <summary>A name: a variable, or the value of an integer in scope (a family parameter's own constant while sharing).</summary>
    public int Name(NameRef node)
    {
        Step(node);
        if (!Scope.TryGetValue(node.Name, out var p)) return Builder.Variable(node.Name);
        return Shared?.Contains(node.Name) == true ? Builder.Parameter(node.Name, p) : Builder.Constant(p);
    }

    public BigInteger Integer(Expr e, string context) =>
        ParameterEvaluator.EvaluateInteger(e, Shared is null ? Scope : new WatchedScope(this), Limits, context);

    public Rational Exact(Expr e, string context) =>
        ParameterEvaluator.EvaluateRational(e, Shared is null ? Scope : new WatchedScope(this), Limits, context);

    /// <summary>A count (of factors, of q-terms): at most the limit MaxFunctionArgument.</summary>
    public int CheckedCount(BigInteger count, Expr at, string what)
    {
        if (count > Limits.MaxFunctionArgument)
            throw new CompileError(at.Position, $"{what} is {count}; the limit MaxFunctionArgument is {Limits.MaxFunctionArgument}");
        return (int)count;
    }

    /// <summary>Binds a bound variable for a body: it shadows a family parameter of the same name.</summary>
    public bool Shadow(string name) => Shared?.Remove(name) ?? false;

    public void Unshadow(string name, bool wasShared)
    {
        if (wasShared) Shared!.Add(name);
    }

    /// <summary>The scope as the integer evaluator sees it while sharing: reading a family parameter marks the structure as fixed by it.</summary>
    private sealed class WatchedScope(LoweringContext context) : IReadOnlyDictionary<string, BigInteger>
    {
        public bool TryGetValue(string key, out BigInteger value)
        {
            if (context.Shared!.Contains(key)) context.ParameterFixesStructure = true;
            return context.Scope.TryGetValue(key, out value);
        }

        public BigInteger this[string key] => TryGetValue(key, out var value) ? value : throw new KeyNotFoundException(key);
        public IEnumerable<string> Keys => context.Scope.Keys;
        public IEnumerable<BigInteger> Values => context.Scope.Values;
        public int Count => context.Scope.Count;
        public bool ContainsKey(string key) => TryGetValue(key, out _);
        public IEnumerator<KeyValuePair<string, BigInteger>> GetEnumerator() => context.Scope.GetEnumerator();
        System.Collections.IEnumerator System.Collections.IEnumerable.GetEnumerator() => GetEnumerator();
    }
}
