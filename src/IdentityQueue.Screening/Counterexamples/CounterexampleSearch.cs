using System.Numerics;
using IdentityQueue.Algebra.Bounds;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>
/// Searches the smallest integer point where a refuted identity's sides differ (issue #15, point 1): points in shells of
/// growing max-norm m = 0, 1, 2, …, each shell in order of the sum of absolute values and then of the coordinates in
/// variable order ranked 0, 1, −1, 2, −2, …, evaluated exactly (rationals over Q, residues over GF(p)); a point where a
/// denominator vanishes is skipped. The first differing point of that enumeration is the least counterexample. When the
/// point budget runs out first, random lines through small points are tried and the best point found is shrunk
/// coordinate by coordinate (then <see cref="Counterexample.Exhaustive"/> is false). Stateless; thread-safe.
/// </summary>
/// <remarks>
/// A nonzero polynomial of degree at most d in each variable does not vanish on all of S^n when |S| &gt; d (Alon's
/// Combinatorial Nullstellensatz), so the exhaustive stage finds a point once its box [−m, m]^n with 2m + 1 &gt; d fits the
/// budget. Over GF(p) the coordinates are the residues of least absolute value (|v| ≤ p/2), so the search ends once all of
/// GF(p)^n was evaluated: a difference that vanishes there as a function (x^p − x) has no counterexample in GF(p) and the
/// result is null. Entries over GF(p^k) are searched in the prime field GF(p) only. Side conditions are not searched
/// (only the entries of lhs − rhs); power series identities are not searched (null).
/// </remarks>
public static class CounterexampleSearch
{
    /// <summary>
    /// The least counterexample found within <paramref name="budget"/>, or null when none was found (or the identity is a
    /// power series identity, or every point is undefined in its field).
    /// </summary>
    /// <param name="compiled">The identity whose difference is searched for a nonzero integer point.</param>
    /// <param name="budget">Caps the points tried and the work spent.</param>
    /// <param name="seed">Seeds the random lines (the exhaustive stage does not depend on it).</param>
    /// <param name="cancellation">Observed inside each evaluation; a cancelled search throws <see cref="OperationCanceledException"/>.</param>
    public static Counterexample? Find(CompiledIdentity compiled, CounterexampleBudget budget, ulong seed = 0, CancellationToken cancellation = default) =>
        FindWith(compiled, budget, seed, byResidues: true, ExactFirst, cancellation);

    /// <summary>Points of a search over Q evaluated over the rationals before residues take over (most searches end sooner).</summary>
    internal const int ExactFirst = 32;

    /// <summary>As the public <see cref="Find(CompiledIdentity, CounterexampleBudget, ulong, CancellationToken)"/>; <paramref name="byResidues"/> false evaluates every point over the rationals (the tests compare the two), true after the first <paramref name="exactFirst"/> points.</summary>
    internal static Counterexample? FindWith(CompiledIdentity compiled, CounterexampleBudget budget, ulong seed, bool byResidues, int exactFirst = ExactFirst, CancellationToken cancellation = default)
    {
        ArgumentNullException.ThrowIfNull(compiled);
        ArgumentNullException.ThrowIfNull(budget);
        budget.Validate();
        if (compiled.Field.IsSeries) return null;
        var program = compiled.Program;
        if (compiled.Field.IsRationals)
        {
            var q = new PointEvaluator<RationalField, Rational>(default, program, v => new Rational(v), v => v.ToString(),
                maxAbs => BoundAnalysis.ExactEvaluationBits(program, Math.Max(1, Math.Log2(maxAbs + 1.0)), budget.MaxPointBits * 2));
            if (!q.Ready) return null;
            IPointEvaluator evaluator = byResidues && ModularPointEvaluator.Applies(program) ? new ModularPointEvaluator(program, q, exactFirst) : q;
            return new Search(evaluator, program, budget, long.MaxValue, null, seed, cancellation).Run();
        }
        var p = compiled.Field.Characteristic;
        var field = BigPrimeField.Create(p);
        var perPoint = (double)program.Length * Math.Max(1, (double)p.GetBitLength());
        var fp = new PointEvaluator<BigPrimeField, BigResidue>(field, program, v => field.FromInteger(v), v => v.Value.ToString(), _ => perPoint);
        var maxShell = p / 2 > long.MaxValue ? long.MaxValue : (long)(p / 2);
        return fp.Ready ? new Search(fp, program, budget, maxShell, p, seed, cancellation).Run() : null;
    }

    /// <summary>The position of <paramref name="v"/> in the order 0, 1, −1, 2, −2, ….</summary>
    internal static long Rank(long v) => v > 0 ? 2 * v - 1 : -2 * v;

    /// <summary>The value of rank <paramref name="r"/>.</summary>
    internal static long OfRank(long r) => r % 2 == 1 ? (r + 1) / 2 : -(r / 2);

    /// <summary>Compares two points in the search order: max-norm, then sum of absolute values, then ranks in variable order.</summary>
    internal static int Compare(ReadOnlySpan<long> a, ReadOnlySpan<long> b)
    {
        long maxA = 0, maxB = 0, sumA = 0, sumB = 0;
        foreach (var v in a) { maxA = Math.Max(maxA, Math.Abs(v)); sumA += Math.Abs(v); }
        foreach (var v in b) { maxB = Math.Max(maxB, Math.Abs(v)); sumB += Math.Abs(v); }
        if (maxA != maxB) return maxA.CompareTo(maxB);
        if (sumA != sumB) return sumA.CompareTo(sumB);
        for (var i = 0; i < a.Length; i++)
            if (a[i] != b[i]) return Rank(a[i]).CompareTo(Rank(b[i]));
        return 0;
    }

    private readonly record struct Outcome(bool Defined, int Output, string Lhs, string Rhs)
    {
        public bool Differs => Defined && Output >= 0;
    }

    private interface IPointEvaluator
    {
        Outcome Evaluate(long[] point, CancellationToken cancellation);
        double Cost(long maxAbs);
    }

    /// <summary>Exact evaluation of the program at integer points; the sides are the operands of each output's subtraction.</summary>
    private sealed class PointEvaluator<TField, T> : IPointEvaluator where TField : struct, IField<T> where T : struct
    {
        private readonly TField _field;
        private readonly StraightLineProgram _program;
        private readonly Func<long, T> _fromInteger;
        private readonly Func<T, string> _show;
        private readonly Func<long, double> _cost;
        private readonly T[] _constants;
        private readonly T[] _registers;
        private readonly T[] _values;

        public PointEvaluator(TField field, StraightLineProgram program, Func<long, T> fromInteger, Func<T, string> show, Func<long, double> cost)
        {
            _field = field;
            _program = program;
            _fromInteger = fromInteger;
            _show = show;
            _cost = cost;
            Ready = Evaluator.TryPrepareConstants<TField, T>(field, program, out _constants);
            _registers = new T[program.Length];
            _values = new T[program.Variables.Length];
        }

        /// <summary>False when a constant's denominator vanishes in the field (then no point is defined).</summary>
        public bool Ready { get; }

        private readonly Dictionary<long, double> _costs = [];

        /// <summary>The cost of a point of max-norm <paramref name="maxAbs"/>, computed once per max-norm (a pass over the program).</summary>
        public double Cost(long maxAbs)
        {
            if (!_costs.TryGetValue(maxAbs, out var cost)) _costs[maxAbs] = cost = _cost(maxAbs);
            return cost;
        }

        public Outcome Evaluate(long[] point, CancellationToken cancellation)
        {
            for (var i = 0; i < point.Length; i++) _values[i] = _fromInteger(point[i]);
            if (!Evaluator.Evaluate<TField, T>(_field, _program, _constants, _values, _registers, cancellation)) return new Outcome(false, -1, "", "");
            var outputs = _program.Outputs;
            for (var o = _program.ConditionNames.Length; o < outputs.Length; o++)
            {
                var r = outputs[o];
                if (_field.IsZero(_registers[r])) continue;
                // The output is the unfolded lhs − rhs of the entry (IdentityCompiler.CompileDifference), so its operands are the sides.
                var ins = _program.Instructions[r];
                return ins.Op == OpCode.Subtract
                    ? new Outcome(true, o, _show(_registers[ins.A]), _show(_registers[ins.B]))
                    : new Outcome(true, o, _show(_registers[r]), "0");
            }
            return new Outcome(true, -1, "", "");
        }
    }

    /// <summary>
    /// The exact evaluation over Q of a program without inversions and with integer constants (a polynomial with integer
    /// coefficients), by residues: a bound B on |register| at the points of a max-norm is computed once (sums add,
    /// products multiply, Hadamard's bound for a determinant, the product of the rows' 1-norms for a permanent, the square root
    /// of Hadamard's for a Pfaffian), and the program is evaluated modulo fixed primes below 2^62 whose product exceeds 2·B:
    /// an output is zero over Q exactly when it is zero modulo each of them. Only a differing point is evaluated over the
    /// rationals, for the sides' values, so the outcome is the same as <see cref="PointEvaluator{TField, T}"/>'s, at the
    /// cost of a few word-sized evaluations instead of big-integer ones at every point. A point whose bound needs more than
    /// <see cref="Primes"/> primes is evaluated over the rationals.
    /// </summary>
    private sealed class ModularPointEvaluator : IPointEvaluator
    {
        /// <summary>The largest primes below 2^62, the moduli (their product exceeds 2^495).</summary>
        private static readonly PrimeField62[] Primes = LargestPrimes(8);

        private readonly StraightLineProgram _program;
        private readonly PointEvaluator<RationalField, Rational> _exact;
        private readonly double[] _constantBits;
        private readonly double[] _bits;
        private readonly Residue62[][] _constants;
        private readonly Residue62[][] _registers;
        private readonly Residue62[] _values;
        private readonly Dictionary<long, double> _outputBits = [];
        private readonly int _exactFirst;
        private int _calls;

        /// <param name="program">A program for which <see cref="Applies"/> holds.</param>
        /// <param name="exact">The same program's evaluator over the rationals.</param>
        /// <param name="exactFirst">Points evaluated over the rationals before the residues take over.</param>
        public ModularPointEvaluator(StraightLineProgram program, PointEvaluator<RationalField, Rational> exact, int exactFirst)
        {
            _exactFirst = exactFirst;
            _program = program;
            _exact = exact;
            _constantBits = program.Constants.Select(c => c.IsZero ? double.NegativeInfinity : BigInteger.Log(BigInteger.Abs(c.Numerator), 2)).ToArray();
            _bits = new double[program.Length];
            _constants = new Residue62[Primes.Length][];
            _registers = new Residue62[Primes.Length][];
            _values = new Residue62[program.Variables.Length];
        }

        /// <summary>Whether the program is a polynomial with integer coefficients as written: no inversion, integer constants.</summary>
        public static bool Applies(StraightLineProgram program)
        {
            foreach (var ins in program.Instructions)
                if (ins.Op is not (OpCode.Constant or OpCode.Variable or OpCode.Add or OpCode.Subtract or OpCode.Multiply or OpCode.Negate
                    or OpCode.Power or OpCode.Determinant or OpCode.Permanent or OpCode.Pfaffian)) return false;
            foreach (var c in program.Constants)
                if (!c.IsInteger) return false;
            return true;
        }

        public double Cost(long maxAbs) => _exact.Cost(maxAbs);

        public Outcome Evaluate(long[] point, CancellationToken cancellation)
        {
            // Most searches end within a few points (a refuted entry usually differs near the origin): those go over the
            // rationals, and the residues' setup (bounds, constants per prime) is paid only by a longer search.
            if (_calls++ < _exactFirst) return _exact.Evaluate(point, cancellation);
            long maxAbs = 0;
            foreach (var v in point) maxAbs = Math.Max(maxAbs, Math.Abs(v));
            if (!_outputBits.TryGetValue(maxAbs, out var bits)) _outputBits[maxAbs] = bits = OutputBits(maxAbs);
            // |output| <= 2^bits; the primes' product must exceed twice that (a margin of two bits for the rounding of the bound)
            var primes = double.IsNegativeInfinity(bits) ? 1 : (int)Math.Ceiling((bits + 3) / 61.0);
            if (primes > Primes.Length || double.IsNaN(bits)) return _exact.Evaluate(point, cancellation);
            var outputs = _program.Outputs;
            var first = _program.ConditionNames.Length;
            var nonzero = -1;
            for (var k = 0; k < primes; k++)
            {
                var field = Primes[k];
                var constants = _constants[k] ??= Prepare(field);
                var registers = _registers[k] ??= new Residue62[_program.Length];
                for (var i = 0; i < point.Length; i++)
                    _values[i] = point[i] >= 0 ? field.FromUInt64((ulong)point[i]) : field.Negate(field.FromUInt64((ulong)-point[i]));
                // Without inversions an evaluation is always defined.
                Evaluator.Evaluate<PrimeField62, Residue62>(field, _program, constants, _values, registers, cancellation);
                var limit = nonzero < 0 ? outputs.Length : nonzero;
                for (var o = first; o < limit; o++)
                    if (!field.IsZero(registers[outputs[o]])) { nonzero = o; break; }
                if (nonzero == first) break; // no earlier output can be nonzero
            }
            // The sides of a differing point are shown as rationals: one exact evaluation, the same as without residues.
            return nonzero < 0 ? new Outcome(true, -1, "", "") : _exact.Evaluate(point, cancellation);
        }

        private Residue62[] Prepare(PrimeField62 field)
        {
            Evaluator.TryPrepareConstants<PrimeField62, Residue62>(field, _program, out var constants);
            return constants; // integer constants: always defined
        }

        /// <summary>
        /// An upper bound on log2 of |output| over the outputs that are checked (lhs − rhs), at every point of max-norm
        /// <paramref name="maxAbs"/> (computed once per max-norm).
        /// </summary>
        private double OutputBits(long maxAbs)
        {
            var variable = maxAbs == 0 ? double.NegativeInfinity : Math.Log2(maxAbs);
            var ins = _program.Instructions;
            var b = _bits;
            for (var i = 0; i < ins.Length; i++)
            {
                var x = ins[i];
                b[i] = x.Op switch
                {
                    OpCode.Constant => _constantBits[x.A],
                    OpCode.Variable => variable,
                    OpCode.Add or OpCode.Subtract => LogAdd(b[x.A], b[x.B]),
                    OpCode.Multiply => b[x.A] + b[x.B],
                    OpCode.Negate => b[x.A],
                    OpCode.Power => Power(b[x.A], _program.Exponents[x.B]),
                    OpCode.Determinant => Hadamard(_program.Operands.AsSpan(x.A, x.B * x.B), x.B),
                    OpCode.Pfaffian => Hadamard(_program.Operands.AsSpan(x.A, x.B * x.B), x.B) / 2,
                    OpCode.Permanent => RowNorms(_program.Operands.AsSpan(x.A, x.B * x.B), x.B),
                    _ => double.NaN,
                };
                // a relative margin for the rounding of each step
                if (b[i] > 0) b[i] = b[i] * (1 + 1e-12) + 1e-9;
            }
            var most = double.NegativeInfinity;
            for (var o = _program.ConditionNames.Length; o < _program.Outputs.Length; o++) most = Math.Max(most, b[_program.Outputs[o]]);
            return most;
        }

        private static double Power(double a, BigInteger e) =>
            e.IsZero ? 0 : double.IsNegativeInfinity(a) ? a : a * (double)e;

        /// <summary>log2(2^a + 2^b), rounded up by the caller's margin.</summary>
        private static double LogAdd(double a, double b)
        {
            if (double.IsNegativeInfinity(a)) return b;
            if (double.IsNegativeInfinity(b)) return a;
            var (hi, lo) = a >= b ? (a, b) : (b, a);
            return hi + Math.Log2(1 + Math.Pow(2, lo - hi));
        }

        /// <summary>Hadamard: |det| ≤ Π over rows of the row's Euclidean norm, in log2.</summary>
        private double Hadamard(ReadOnlySpan<int> operands, int n)
        {
            double total = 0;
            for (var r = 0; r < n; r++)
            {
                var row = double.NegativeInfinity;
                for (var c = 0; c < n; c++) row = LogAdd(row, 2 * _bits[operands[r * n + c]]);
                if (double.IsNegativeInfinity(row)) return row;
                total += row / 2;
            }
            return total;
        }

        /// <summary>|perm| ≤ Π over rows of the row's sum of absolute values, in log2.</summary>
        private double RowNorms(ReadOnlySpan<int> operands, int n)
        {
            double total = 0;
            for (var r = 0; r < n; r++)
            {
                var row = double.NegativeInfinity;
                for (var c = 0; c < n; c++) row = LogAdd(row, _bits[operands[r * n + c]]);
                if (double.IsNegativeInfinity(row)) return row;
                total += row;
            }
            return total;
        }

        private static PrimeField62[] LargestPrimes(int count)
        {
            var primes = new PrimeField62[count];
            var candidate = (1UL << 62) - 1;
            for (var k = 0; k < count; candidate -= 2)
                if (Primality.IsPrime(candidate)) primes[k++] = PrimeField62.Create(candidate);
            return primes;
        }
    }

    /// <summary>One search: the state shared by its stages.</summary>
    private sealed class Search(IPointEvaluator evaluator, StraightLineProgram program, CounterexampleBudget budget, long maxShell, BigInteger? modulus,
        ulong seed, CancellationToken cancellation)
    {
        private readonly int _n = program.Variables.Length;
        private int _tried;
        private double _work;
        private bool _spent;   // the work budget
        private bool _stopped; // the current stage's points
        private int _completeShells;
        private long[]? _best;
        private Outcome _bestOutcome;

        public Counterexample? Run()
        {
            var exhaustive = Exhaustive();
            if (exhaustive is not null) return exhaustive;
            if (_stopped && !_spent && _n > 0 && _completeShells <= maxShell)
            {
                _stopped = false;
                Lines();
                _stopped = false;
                Shrink();
            }
            return _best is null ? null : Result(_best, _bestOutcome, exhaustive: false);
        }

        /// <summary>
        /// True when a point of max-norm <paramref name="maxAbs"/> may not be evaluated: <paramref name="points"/> were tried, or
        /// it costs more than a point may (<see cref="_stopped"/> set), or the work budget is spent (<see cref="_spent"/> set).
        /// </summary>
        private bool OverBudget(long maxAbs, int points)
        {
            var cost = evaluator.Cost(maxAbs);
            if (_work + cost > budget.MaxEvaluationBits) _spent = true;
            if (_tried >= points || cost > budget.MaxPointBits) _stopped = true;
            return _spent || _stopped;
        }

        private Outcome Evaluate(long[] point, long maxAbs)
        {
            _tried++;
            _work += evaluator.Cost(maxAbs);
            return evaluator.Evaluate(point, cancellation);
        }

        private Counterexample? Exhaustive()
        {
            var point = new long[_n];
            for (long m = 0; m <= maxShell; m++)
            {
                Counterexample? found = null;
                var sums = m == 0 || _n == 0 ? 0 : _n * m;
                for (var s = m == 0 ? 0 : m; s <= sums && found is null && !_spent && !_stopped; s++)
                    Enumerate(point, 0, s, m, needMax: m > 0, p =>
                    {
                        if (OverBudget(m, budget.MaxBoxPoints)) return false;
                        var outcome = Evaluate(p, m);
                        if (!outcome.Differs) return true;
                        found = Result(p, outcome, exhaustive: true);
                        return false;
                    });
                if (found is not null) return found;
                if (_spent || _stopped) return null;
                _completeShells = (int)Math.Min(int.MaxValue, m + 1);
                if (_n == 0) return null;
            }
            return null; // all of GF(p)^n evaluated: the difference vanishes there as a function
        }

        /// <summary>
        /// Visits, in the search order, the points of max-norm <paramref name="m"/> whose coordinates from
        /// <paramref name="i"/> on have absolute values summing to <paramref name="sum"/>; false when a visit stopped it.
        /// </summary>
        private bool Enumerate(long[] point, int i, long sum, long m, bool needMax, Func<long[], bool> visit)
        {
            if (i == _n) return sum != 0 || needMax || visit(point);
            var rest = _n - i - 1;
            for (long r = 0; ; r++)
            {
                var v = OfRank(r);
                var a = Math.Abs(v);
                if (a > m || a > sum) break;
                if (!Allowed(v)) continue;
                var left = sum - a;
                var stillNeed = needMax && a != m;
                if (left > rest * m || stillNeed && (rest == 0 || left < m)) continue;
                point[i] = v;
                if (!Enumerate(point, i + 1, left, m, stillNeed, visit)) return false;
            }
            point[i] = 0;
            return true;
        }

        /// <summary>Over GF(p): v is the residue of least absolute value of its class (p = 2: 0 and 1).</summary>
        private bool Allowed(long v) => modulus is not { } p || 2 * (BigInteger)Math.Abs(v) < p || v > 0 && 2 * (BigInteger)v == p;

        /// <summary>The residue of least absolute value of v over GF(p) (v itself over Q).</summary>
        private long Reduce(long v)
        {
            if (modulus is not { } p || Allowed(v)) return v;
            var r = (long)BigInteger.Remainder(v, p);
            if (r < 0) r += (long)p;
            return 2 * (BigInteger)r > p ? r - (long)p : r;
        }

        /// <summary>Random lines b + t·d through small points b, directions d in {−1, 0, 1}^n, t = 1, −1, 2, −2, ….</summary>
        private void Lines()
        {
            var random = new Xoshiro256(seed);
            var radius = Math.Max(1, _completeShells);
            var basePoint = new long[_n];
            var direction = new long[_n];
            var point = new long[_n];
            // Attempts are counted whether or not a line gives a point (a break below must not skip the count).
            for (var attempt = 0; attempt < budget.MaxLines && !_spent; attempt++)
            {
                var any = false;
                for (var i = 0; i < _n; i++)
                {
                    basePoint[i] = (long)random.NextBelow((ulong)(2 * radius + 1)) - radius;
                    direction[i] = (long)random.NextBelow(3) - 1;
                    any |= direction[i] != 0;
                }
                if (!any) direction[(int)random.NextBelow((ulong)_n)] = 1;
                for (var j = 0; j < budget.PointsPerLine; j++)
                {
                    var t = OfRank(j + 1);
                    long maxAbs = 0;
                    for (var i = 0; i < _n; i++)
                    {
                        point[i] = Reduce(basePoint[i] + t * direction[i]);
                        maxAbs = Math.Max(maxAbs, Math.Abs(point[i]));
                    }
                    if (_best is not null && Compare(point, _best) >= 0) continue;
                    if (OverBudget(maxAbs, int.MaxValue))
                    {
                        _stopped = false; // a point too costly: farther points of this line cost more; the next line may do
                        break;
                    }
                    var outcome = Evaluate(point, maxAbs);
                    if (!outcome.Differs) continue;
                    _best = (long[])point.Clone();
                    _bestOutcome = outcome;
                    break;
                }
            }
        }

        /// <summary>Moves each coordinate of the best point to a value of lower rank while the sides still differ there.</summary>
        private void Shrink()
        {
            if (_best is null) return;
            var limit = _tried + budget.MaxShrinkPoints;
            var point = (long[])_best.Clone();
            for (var improved = true; improved;)
            {
                improved = false;
                for (var i = 0; i < _n; i++)
                {
                    var current = _best[i];
                    for (long r = 0; r < Rank(current); r++)
                    {
                        var v = OfRank(r);
                        if (!Allowed(v)) continue;
                        _best.CopyTo(point, 0);
                        point[i] = v;
                        long maxAbs = 0;
                        foreach (var c in point) maxAbs = Math.Max(maxAbs, Math.Abs(c));
                        if (OverBudget(maxAbs, limit)) return;
                        var outcome = Evaluate(point, maxAbs);
                        if (!outcome.Differs) continue;
                        _best = (long[])point.Clone();
                        _bestOutcome = outcome;
                        improved = true;
                        break;
                    }
                }
            }
        }

        private Counterexample Result(long[] point, Outcome outcome, bool exhaustive)
        {
            var values = new (string, BigInteger)[_n];
            long maxAbs = 0;
            for (var i = 0; i < _n; i++)
            {
                values[i] = (program.Variables[i], point[i]);
                maxAbs = Math.Max(maxAbs, Math.Abs(point[i]));
            }
            var entry = program.OutputNames.Length > 0 ? program.OutputName(outcome.Output) : null;
            return new Counterexample(values, outcome.Lhs, outcome.Rhs, entry, maxAbs, exhaustive, _tried, _completeShells);
        }
    }
}
