using System.Numerics;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Algebra.Compile;

/// <summary>
/// Builds a <see cref="StraightLineProgram"/> with hash-consing (an instruction already present is reused),
/// constant folding (exact, over Q, up to <see cref="MaxFoldedBits"/>) and the trivial identities
/// x+0, x·1, x·0, x^0, x^1. Not thread-safe; one builder per compilation.
/// </summary>
internal sealed class ProgramBuilder(Limits limits)
{
    /// <summary>Folded constants larger than this stay as instructions and are evaluated in the field.</summary>
    public const int MaxFoldedBits = 1 << 14;

    /// <summary>
    /// A variable's powers up to this exponent are a chain x^k = x^(k−1)·x, shared by every term that uses any of them, so
    /// an expanded polynomial pays one instruction per distinct power (a Power instruction costs ~2·log2 k products each).
    /// </summary>
    public const int MaxChainedExponent = 64;

    private readonly List<Instruction> _instructions = [];
    private readonly Dictionary<Instruction, int> _index = [];
    private readonly List<Rational> _constants = [];
    private readonly Dictionary<Rational, int> _constantIndex = [];
    private readonly List<BigInteger> _exponents = [];
    private readonly Dictionary<BigInteger, int> _exponentIndex = [];
    private readonly Dictionary<int, List<int>> _powerChains = []; // variable register → its powers x^1, x^2, … built so far
    private readonly List<int> _operands = [];
    private readonly Dictionary<string, int> _variableIndex = new(StringComparer.Ordinal);
    private readonly List<string> _variables = [];
    private readonly Dictionary<int, Rational> _constantOf = []; // register → value, for folding
    private readonly Dictionary<string, int> _parameterConstants = new(StringComparer.Ordinal); // family parameter → its constant

    public int Count => _instructions.Count;

    public bool TryGetConstant(int register, out Rational value) => _constantOf.TryGetValue(register, out value);

    public int Constant(Rational value)
    {
        if (!_constantIndex.TryGetValue(value, out var c))
        {
            c = _constants.Count;
            _constants.Add(value);
            _constantIndex[value] = c;
        }
        var register = Emit(new Instruction(OpCode.Constant, c, 0));
        _constantOf[register] = value;
        return register;
    }

    /// <summary>
    /// A family parameter's value as a constant of its own that is never folded into others, so that the program holds for
    /// every value of the parameter: binding another value only replaces the constant (<see cref="StraightLineProgram.WithParameters"/>).
    /// </summary>
    public int Parameter(string name, BigInteger value)
    {
        if (!_parameterConstants.TryGetValue(name, out var c))
        {
            c = _constants.Count;
            _constants.Add(value);
            _parameterConstants[name] = c;
        }
        return Emit(new Instruction(OpCode.Constant, c, 0));
    }

    public int Variable(string name)
    {
        if (!_variableIndex.TryGetValue(name, out var v))
        {
            v = _variables.Count;
            _variables.Add(name);
            _variableIndex[name] = v;
        }
        return Emit(new Instruction(OpCode.Variable, v, 0));
    }

    public int Add(int a, int b)
    {
        if (IsConstant(a, out var x) && IsConstant(b, out var y) && Small(x + y, out var sum)) return Constant(sum);
        if (IsConstant(a, out x) && x.IsZero) return b;
        if (IsConstant(b, out y) && y.IsZero) return a;
        return Emit(new Instruction(OpCode.Add, Math.Min(a, b), Math.Max(a, b)));
    }

    public int Subtract(int a, int b)
    {
        if (IsConstant(a, out var x) && IsConstant(b, out var y) && Small(x - y, out var difference)) return Constant(difference);
        if (IsConstant(b, out y) && y.IsZero) return a;
        if (IsConstant(a, out x) && x.IsZero) return Negate(b);
        return Emit(new Instruction(OpCode.Subtract, a, b));
    }

    /// <summary>a − b with no folding or simplification: the final difference of an identity, so that the bounds see both sides.</summary>
    public int RawSubtract(int a, int b) => Emit(new Instruction(OpCode.Subtract, a, b));

    public int Multiply(int a, int b)
    {
        if (IsConstant(a, out var x) && IsConstant(b, out var y) && Small(x * y, out var product)) return Constant(product);
        if (IsConstant(a, out x)) { if (x.IsZero) return a; if (x == Rational.One) return b; if (x == -Rational.One) return Negate(b); }
        if (IsConstant(b, out y)) { if (y.IsZero) return b; if (y == Rational.One) return a; if (y == -Rational.One) return Negate(a); }
        return Emit(new Instruction(OpCode.Multiply, Math.Min(a, b), Math.Max(a, b)));
    }

    /// <summary>True when b is written as −a (or both are constants with b = −a, or both are 0).</summary>
    public bool AreNegatives(int a, int b)
    {
        if (IsConstant(a, out var x) && IsConstant(b, out var y)) return x == -y;
        return (_instructions[b].Op == OpCode.Negate && _instructions[b].A == a)
            || (_instructions[a].Op == OpCode.Negate && _instructions[a].A == b);
    }

    public int Negate(int a)
    {
        if (IsConstant(a, out var x)) return Constant(-x);
        var instruction = _instructions[a];
        if (instruction.Op == OpCode.Negate) return instruction.A;
        return Emit(new Instruction(OpCode.Negate, a, 0));
    }

    /// <summary>1/a; a constant zero is a compile error raised by the caller, who knows the position.</summary>
    public int Invert(int a)
    {
        if (IsConstant(a, out var x) && !x.IsZero) return Constant(Rational.One / x);
        return Emit(new Instruction(OpCode.Invert, a, 0));
    }

    public int Power(int a, BigInteger exponent)
    {
        if (exponent.IsZero) return Constant(Rational.One);
        if (exponent.IsOne) return a;
        if (IsConstant(a, out var x))
        {
            if (x.IsZero || x == Rational.One) return a;
            if (x == -Rational.One) return exponent.IsEven ? Constant(Rational.One) : a;
            var bits = Math.Max(x.Numerator.GetBitLength(), x.Denominator.GetBitLength());
            if (exponent * bits <= MaxFoldedBits) return Constant(Rational.Pow(x, (int)exponent));
        }
        if (_instructions[a].Op == OpCode.Variable && exponent <= MaxChainedExponent) return ChainedPower(a, (int)exponent);
        if (!_exponentIndex.TryGetValue(exponent, out var e))
        {
            e = _exponents.Count;
            _exponents.Add(exponent);
            _exponentIndex[exponent] = e;
        }
        return Emit(new Instruction(OpCode.Power, a, e));
    }

    /// <summary>x^k of a variable x from its chain of powers, extended as far as needed (dead links are removed by <see cref="Build"/>).</summary>
    private int ChainedPower(int x, int k)
    {
        if (!_powerChains.TryGetValue(x, out var chain)) _powerChains[x] = chain = [x];
        while (chain.Count < k) chain.Add(Emit(new Instruction(OpCode.Multiply, Math.Min(chain[^1], x), Math.Max(chain[^1], x))));
        return chain[k - 1];
    }

    /// <summary>A determinant, permanent or Pfaffian of a square matrix of registers (row-major).</summary>
    public int MatrixFunction(OpCode op, int order, ReadOnlySpan<int> entries)
    {
        var start = _operands.Count;
        foreach (var r in entries) _operands.Add(r);
        return Emit(new Instruction(op, start, order), deduplicate: false);
    }

    /// <summary>The program of the given outputs, with instructions that no output uses removed and registers renumbered.</summary>
    public StraightLineProgram Build(int[] outputs, string[] outputNames, string[]? conditionNames = null)
    {
        var live = new bool[_instructions.Count];
        foreach (var o in outputs) live[o] = true;
        for (var i = _instructions.Count - 1; i >= 0; i--)
        {
            if (!live[i]) continue;
            var ins = _instructions[i];
            switch (ins.Op)
            {
                case OpCode.Add or OpCode.Subtract or OpCode.Multiply:
                    live[ins.A] = true; live[ins.B] = true; break;
                case OpCode.Negate or OpCode.Invert or OpCode.Power:
                    live[ins.A] = true; break;
                case OpCode.Determinant or OpCode.Permanent or OpCode.Pfaffian:
                    for (var k = 0; k < ins.B * ins.B; k++) live[_operands[ins.A + k]] = true;
                    break;
            }
        }
        var map = new int[_instructions.Count];
        var kept = new List<Instruction>();
        var operands = new List<int>();
        for (var i = 0; i < _instructions.Count; i++)
        {
            if (!live[i]) { map[i] = -1; continue; }
            var ins = _instructions[i];
            map[i] = kept.Count;
            kept.Add(ins.Op switch
            {
                OpCode.Add or OpCode.Subtract or OpCode.Multiply => ins with { A = map[ins.A], B = map[ins.B] },
                OpCode.Negate or OpCode.Invert or OpCode.Power => ins with { A = map[ins.A] },
                OpCode.Determinant or OpCode.Permanent or OpCode.Pfaffian => RenumberMatrix(ins, map, operands),
                _ => ins,
            });
        }
        var outs = new int[outputs.Length];
        for (var i = 0; i < outs.Length; i++) outs[i] = map[outputs[i]];
        return new([.. kept], [.. _constants], [.. _exponents], [.. operands], [.. _variables], outs, outputNames,
            _parameterConstants.Count == 0 ? null : new Dictionary<string, int>(_parameterConstants, StringComparer.Ordinal),
            conditionNames ?? []);
    }

    private Instruction RenumberMatrix(Instruction ins, int[] map, List<int> operands)
    {
        var start = operands.Count;
        for (var k = 0; k < ins.B * ins.B; k++) operands.Add(map[_operands[ins.A + k]]);
        return ins with { A = start };
    }

    private bool IsConstant(int register, out Rational value) => _constantOf.TryGetValue(register, out value);

    private static bool Small(Rational value, out Rational same)
    {
        same = value;
        return value.Numerator.GetBitLength() <= MaxFoldedBits && value.Denominator.GetBitLength() <= MaxFoldedBits;
    }

    private int Emit(Instruction instruction, bool deduplicate = true)
    {
        if (deduplicate && _index.TryGetValue(instruction, out var existing)) return existing;
        if (_instructions.Count >= limits.MaxProgramSize) throw new ProgramTooLargeException();
        var register = _instructions.Count;
        _instructions.Add(instruction);
        if (deduplicate) _index[instruction] = register;
        return register;
    }
}

/// <summary>Raised by the builder when the program outgrows <see cref="Limits.MaxProgramSize"/>; the compiler adds the position.</summary>
internal sealed class ProgramTooLargeException : Exception;
