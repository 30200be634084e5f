using System.Numerics;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Screening.Tests.HandOff;

/// <summary>
/// A test-side reader of the scripts <c>SmtLibWriter</c> writes: s-expressions, 0-ary define-fun, and exact evaluation
/// of the real terms (+ − × / and numerals) at a point, so that tests can check what the assertions say.
/// </summary>
internal sealed class SmtScript
{
    private readonly Dictionary<string, object> _definitions = new(StringComparer.Ordinal);

    public SmtScript(string text)
    {
        foreach (var form in Parse(text))
        {
            if (form is not List<object> list || list.Count == 0) continue;
            switch ((string)list[0])
            {
                case "declare-const": Declared.Add((string)list[1]); Assert.Equal("Real", list[2]); break;
                case "define-fun": _definitions[(string)list[1]] = list[4]; break;
                case "assert": Assertions.Add(list[1]); break;
                case "set-logic": Logic = (string)list[1]; break;
                case "check-sat": CheckSats++; break;
            }
        }
    }

    public string? Logic { get; }
    public int CheckSats { get; }
    public List<string> Declared { get; } = [];
    public List<object> Assertions { get; } = [];

    /// <summary>The divisor terms of the <c>(assert (not (= D 0)))</c> lines.</summary>
    public IEnumerable<object> Divisors => Assertions.Take(Assertions.Count - 1).Select(a => ((List<object>)((List<object>)a)[1])[1]);

    /// <summary>The pairs (A, B) of the last assertion, <c>(not (= A B))</c> or <c>(or (not (= A B)) …)</c>.</summary>
    public IEnumerable<(object Left, object Right)> Differences
    {
        get
        {
            if (Assertions[^1] is "false") return []; // nothing can differ (two 0×0 matrices)
            var last = (List<object>)Assertions[^1];
            var items = (string)last[0] == "or" ? last.Skip(1).Cast<List<object>>() : [last];
            return items.Select(n => (List<object>)n[1]).Select(eq => (eq[1], eq[2]));
        }
    }

    public Rational Evaluate(object term, IReadOnlyDictionary<string, Rational> point)
    {
        if (term is string atom)
        {
            if (BigInteger.TryParse(atom, out var n)) return n;
            var name = atom.Trim('|');
            if (point.TryGetValue(name, out var v)) return v;
            if (_definitions.TryGetValue(atom, out var body)) return Evaluate(body, point);
            throw new InvalidOperationException($"unknown symbol {atom}");
        }
        var list = (List<object>)term;
        var args = list.Skip(1).Select(a => Evaluate(a, point)).ToList();
        return (string)list[0] switch
        {
            "+" => args.Aggregate(Rational.Zero, (a, b) => a + b),
            "*" => args.Aggregate(Rational.One, (a, b) => a * b),
            "-" => args.Count == 1 ? -args[0] : args.Skip(1).Aggregate(args[0], (a, b) => a - b),
            "/" => args.Skip(1).Aggregate(args[0], (a, b) => a / b),
            var op => throw new InvalidOperationException($"unexpected operator {op}"),
        };
    }

    /// <summary>Every symbol used in a term (variables and definitions), for checking declarations.</summary>
    public static IEnumerable<string> Symbols(object term) => term switch
    {
        string s when !char.IsAsciiDigit(s[0]) => [s],
        List<object> l => l.Skip(1).SelectMany(Symbols),
        _ => [],
    };

    private static List<object> Parse(string text)
    {
        var stack = new Stack<List<object>>();
        var top = new List<object>();
        stack.Push(top);
        for (var i = 0; i < text.Length; i++)
        {
            var c = text[i];
            if (c == ';') { while (i < text.Length && text[i] != '\n') i++; continue; }
            if (char.IsWhiteSpace(c)) continue;
            if (c == '(') { var l = new List<object>(); stack.Peek().Add(l); stack.Push(l); continue; }
            if (c == ')') { stack.Pop(); continue; }
            var start = i;
            if (c == '|') { i = text.IndexOf('|', i + 1); stack.Peek().Add(text[start..(i + 1)]); continue; }
            while (i + 1 < text.Length && !char.IsWhiteSpace(text[i + 1]) && text[i + 1] is not '(' and not ')') i++;
            stack.Peek().Add(text[start..(i + 1)]);
        }
        Assert.Single(stack);
        return top;
    }
}
