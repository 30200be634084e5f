using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Exact;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>
/// Recovers the difference lhs − rhs of a refuted entry exactly (issue #15, point 2), when it is a polynomial: Zippel's
/// sparse interpolation modulo random 62-bit primes (<see cref="SparseInterpolation{TField, T}"/>), the images combined by
/// the Chinese remainder theorem and lifted to Q by rational reconstruction (Wang), until two successive reconstructions
/// agree and the result matches the program at fresh random points over a fresh prime. Over GF(p) it interpolates in GF(p)
/// itself (p ≥ 2^61) or in an extension GF(p^m) of at least 62 bits, so that a small p has enough points. Beyond
/// <see cref="DifferenceBudget.MaxTerms"/> terms it gives the total degree along a random line and a lower bound on the
/// number of terms. A difference with divisors (a rational function) is recovered as D·(lhs − rhs) over D, D the product of
/// the registers the program inverts, each to the highest power in which it can divide (not reduced to lowest terms), when
/// no divisor has a divisor of its own; otherwise it is not recovered (<see cref="Unsupported"/> says why). Stateless;
/// thread-safe.
/// </summary>
public static class DifferenceRecovery
{
    /// <summary>Why the difference of <paramref name="compiled"/> cannot be recovered, or null when it can be tried.</summary>
    public static string? Unsupported(CompiledIdentity compiled)
    {
        ArgumentNullException.ThrowIfNull(compiled);
        if (compiled.Field.IsSeries) return "a power series identity";
        return Divisors(compiled.Program) is null
            ? $"not a polynomial, and a divisor has a divisor of its own or divides in a power above {MaxDivisorPower}"
            : null;
    }

    /// <summary>
    /// The recovered difference of the first entry of lhs − rhs that is nonzero, or null when <see cref="Unsupported"/>
    /// gives a reason, when no entry was nonzero at two random points (the candidate is not refuted), or when a constant's
    /// denominator vanishes in the field.
    /// </summary>
    /// <param name="compiled">The refuted identity.</param>
    /// <param name="budget">Caps the terms, degree and evaluations of the recovery.</param>
    /// <param name="seed">Seeds the field, the anchors and the check points.</param>
    /// <param name="cancellation">Observed between evaluations and inside them; a cancelled recovery throws <see cref="OperationCanceledException"/>.</param>
    public static RecoveredDifference? Recover(CompiledIdentity compiled, DifferenceBudget budget, ulong seed, CancellationToken cancellation = default)
    {
        ArgumentNullException.ThrowIfNull(budget);
        budget.Validate();
        if (Unsupported(compiled) is not null) return null;
        var random = new Xoshiro256(seed);
        var program = compiled.Program;
        var bound = compiled.Bounds.Degree;
        var degreeIsBound = bound <= budget.MaxDegree;
        var divisors = Divisors(program)!;
        var cap = degreeIsBound && divisors.Length == 0 ? (int)bound : budget.MaxDegree;
        // With divisors, the parts are D·(lhs − rhs) and D, D the product of the divisors: no proven degree bound for them.
        var run = new Run(compiled, budget, cap, degreeIsBound && divisors.Length == 0, divisors, cancellation);
        try
        {
            if (compiled.Field.IsRationals)
            {
                var numeratorQ = run.OverQ(ref random);
                if (numeratorQ is null || divisors.Length == 0) return numeratorQ;
                run.Denominator = true;
                return Combine(numeratorQ, run.OverQ(ref random));
            }
            var p = compiled.Field.Characteristic;
            var prime = BigPrimeField.Create(p);
            if (p.GetBitLength() >= 62)
            {
                var numeratorP = run.OverFiniteField<BigPrimeField, BigResidue>(prime, ref random);
                if (numeratorP is null || divisors.Length == 0) return numeratorP;
                run.Denominator = true;
                return Combine(numeratorP, run.OverFiniteField<BigPrimeField, BigResidue>(prime, ref random));
            }
            var m = (int)Math.Ceiling(62 / BigInteger.Log(p, 2));
            var extension = ExtensionField<BigPrimeField, BigResidue>.Create(prime, m, ref random);
            var numerator = run.OverFiniteField<ExtensionField<BigPrimeField, BigResidue>, ExtElement<BigResidue>>(extension, ref random);
            if (numerator is null || divisors.Length == 0) return numerator;
            run.Denominator = true;
            return Combine(numerator, run.OverFiniteField<ExtensionField<BigPrimeField, BigResidue>, ExtElement<BigResidue>>(extension, ref random));
        }
        catch (DivideByZeroException)
        {
            return null; // a random point hit a zero of a divisor (probability about its degree over 2^62)
        }
    }

    /// <summary>The numerator D·(lhs − rhs) with the denominator D beside it; neither text when either was not recovered.</summary>
    private static RecoveredDifference Combine(RecoveredDifference numerator, RecoveredDifference? denominator) =>
        numerator.Text is null || denominator?.Text is null
            ? numerator with { Text = null, Terms = null, TermList = null, Verified = false }
            : numerator with
            {
                DenominatorText = denominator.Text,
                DenominatorTerms = denominator.TermList,
                Verified = numerator.Verified && denominator.Verified,
            };

    /// <summary>Highest power of one divisor in the denominator that is cleared; beyond, the difference is not recovered.</summary>
    private const int MaxDivisorPower = 1_000;

    /// <summary>
    /// The registers the program divides by that depend on a variable (the operands of its inversions), each with the
    /// highest power in which it can divide an entry of lhs − rhs, so that their product D makes D·(lhs − rhs) a polynomial;
    /// null when a divisor itself divides by such a register, or a power exceeds <see cref="MaxDivisorPower"/>.
    /// </summary>
    internal static (int Register, int Power)[]? Divisors(StraightLineProgram program)
    {
        var instructions = program.Instructions;
        var variable = new bool[instructions.Length];            // depends on a variable
        var powers = new Dictionary<int, int>?[instructions.Length]; // divisor → highest power in the denominator
        for (var i = 0; i < instructions.Length; i++)
        {
            var ins = instructions[i];
            switch (ins.Op)
            {
                case OpCode.Constant: break;
                case OpCode.Variable: variable[i] = true; break;
                case OpCode.Add or OpCode.Subtract:
                    variable[i] = variable[ins.A] || variable[ins.B];
                    powers[i] = Combine(powers[ins.A], powers[ins.B], Math.Max);
                    break;
                case OpCode.Multiply:
                    variable[i] = variable[ins.A] || variable[ins.B];
                    powers[i] = Combine(powers[ins.A], powers[ins.B], (a, b) => a + b);
                    break;
                case OpCode.Negate:
                    variable[i] = variable[ins.A];
                    powers[i] = powers[ins.A];
                    break;
                case OpCode.Power:
                    variable[i] = variable[ins.A];
                    if (powers[ins.A] is { } divided)
                    {
                        var e = program.Exponents[ins.B];
                        if (e > MaxDivisorPower) return null;
                        powers[i] = divided.ToDictionary(kv => kv.Key, kv => kv.Value * (int)e);
                    }
                    break;
                case OpCode.Invert:
                    variable[i] = variable[ins.A];
                    if (variable[ins.A])
                    {
                        if (powers[ins.A] is not null) return null;
                        powers[i] = new Dictionary<int, int> { [ins.A] = 1 };
                    }
                    break;
                default: // Determinant, Permanent, Pfaffian of a B×B matrix: a sum of products of at most B of the entries
                    Dictionary<int, int>? entries = null;
                    for (var k = ins.A; k < ins.A + ins.B * ins.B; k++)
                    {
                        variable[i] |= variable[program.Operands[k]];
                        entries = Combine(entries, powers[program.Operands[k]], Math.Max);
                    }
                    powers[i] = entries?.ToDictionary(kv => kv.Key, kv => kv.Value * ins.B);
                    break;
            }
            if (powers[i] is { } p && p.Values.Any(v => v > MaxDivisorPower)) return null;
        }
        Dictionary<int, int>? all = null;
        for (var o = program.ConditionNames.Length; o < program.Outputs.Length; o++) all = Combine(all, powers[program.Outputs[o]], Math.Max);
        return all is null ? [] : all.OrderBy(kv => kv.Key).Select(kv => (kv.Key, kv.Value)).ToArray();
    }

    private static Dictionary<int, int>? Combine(Dictionary<int, int>? a, Dictionary<int, int>? b, Func<int, int, int> merge)
    {
        if (a is null) return b;
        if (b is null) return a;
        var result = new Dictionary<int, int>(a);
        foreach (var (k, v) in b) result[k] = result.TryGetValue(k, out var w) ? merge(w, v) : v;
        return result;
    }

    /// <summary>Wang's rational reconstruction: a/b ≡ u (mod M) with |a|, b ≤ √(M/2), or false when there is none.</summary>
    internal static bool TryReconstruct(BigInteger u, BigInteger modulus, out Rational value)
    {
        value = Rational.Zero;
        var limit = IntegerSquareRoot(modulus / 2);
        BigInteger r0 = modulus, r1 = BigInteger.Remainder(u, modulus), t0 = 0, t1 = 1;
        if (r1.Sign < 0) r1 += modulus;
        while (r1 > limit)
        {
            var q = r0 / r1;
            (r0, r1) = (r1, r0 - q * r1);
            (t0, t1) = (t1, t0 - q * t1);
        }
        if (t1.IsZero || BigInteger.Abs(t1) > limit || !BigInteger.GreatestCommonDivisor(r1, t1).IsOne) return false;
        value = t1.Sign < 0 ? Rational.Create(-r1, -t1) : Rational.Create(r1, t1);
        return true;
    }

    /// <summary>⌊√n⌋ for n ≥ 0 (Newton's iteration from above).</summary>
    internal static BigInteger IntegerSquareRoot(BigInteger n)
    {
        if (n < 2) return n;
        var x = BigInteger.One << (int)((n.GetBitLength() + 1) / 2);
        while (true)
        {
            var y = (x + n / x) / 2;
            if (y >= x) return x;
            x = y;
        }
    }

    private sealed class Run(CompiledIdentity compiled, DifferenceBudget budget, int cap, bool degreeIsBound, (int Register, int Power)[] divisors, CancellationToken cancellation)
    {
        /// <summary>False: interpolate D·(lhs − rhs) (lhs − rhs itself without divisors); true: interpolate D.</summary>
        public bool Denominator { get; set; }

        private readonly StraightLineProgram _program = compiled.Program;
        private long _evaluations;

        private string? EntryName(int output) => _program.OutputNames.Length > 0 ? _program.OutputName(output) : null;

        /// <summary>Evaluates the program at a point and returns one output register.</summary>
        private Func<T[], T> BlackBox<TField, T>(TField field, T[] constants, int output) where TField : struct, IField<T> where T : struct
        {
            var registers = new T[_program.Length];
            var register = _program.Outputs[output];
            var denominator = Denominator;
            return point =>
            {
                if (!Evaluator.Evaluate<TField, T>(field, _program, constants, point, registers, cancellation))
                    throw new DivideByZeroException(); // a divisor vanished at the point
                var value = denominator ? field.One : registers[register];
                foreach (var (d, power) in divisors)
                    for (var k = 0; k < power; k++) value = field.Multiply(value, registers[d]);
                return value;
            };
        }

        /// <summary>The first entry of lhs − rhs that is nonzero at one of two random points, or −1.</summary>
        private int NonzeroOutput<TField, T>(TField field, T[] constants, ref Xoshiro256 random) where TField : struct, IField<T> where T : struct
        {
            var registers = new T[_program.Length];
            var point = new T[_program.Variables.Length];
            for (var attempt = 0; attempt < 2; attempt++)
            {
                for (var i = 0; i < point.Length; i++) point[i] = field.Sample(ref random);
                _evaluations++;
                if (!Evaluator.Evaluate<TField, T>(field, _program, constants, point, registers, cancellation)) continue;
                for (var o = _program.ConditionNames.Length; o < _program.Outputs.Length; o++)
                    if (!field.IsZero(registers[_program.Outputs[o]])) return o;
            }
            return -1;
        }

        private SparseInterpolation<TField, T> Interpolation<TField, T>(TField field, Func<T[], T> blackBox, ref Xoshiro256 random)
            where TField : struct, IField<T> where T : struct =>
            new(field, _program.Variables.Length, blackBox, budget.MaxTerms, cap, degreeIsBound, budget.EarlyTermination,
                Math.Max(0, budget.MaxEvaluations - _evaluations), random.NextUInt64(), cancellation);

        private RecoveredDifference NotRecovered(int degree, int? estimatedTerms, int output) =>
            new(null, null, degree, estimatedTerms, false, EntryName(output), _program.Variables, null);

        private RecoveredDifference Recovered(IEnumerable<DifferenceTerm> terms, bool verified, int output)
        {
            var list = terms.ToList();
            list.Sort(PolynomialText.Compare);
            var degree = list.Count == 0 ? -1 : list[0].Degree;
            return new RecoveredDifference(PolynomialText.Format(list, _program.Variables), list.Count, degree, null, verified, EntryName(output),
                _program.Variables, list);
        }

        public RecoveredDifference? OverQ(ref Xoshiro256 random)
        {
            var field = NextPrime(ref random, out var constants);
            if (field is not { } first) return null;
            var output = NonzeroOutput<PrimeField62, Residue62>(first, constants, ref random);
            if (output < 0) return null;

            // one image per prime: exponents → residue; the accumulated residues modulo the product of the primes used
            Dictionary<string, (int[] Exponents, BigInteger Residue)>? accumulated = null;
            var modulus = BigInteger.One;
            Dictionary<string, Rational>? previous = null;
            var lineDegree = -1;
            for (var primes = 0; primes < budget.MaxPrimes; primes++)
            {
                PrimeField62 f;
                if (primes == 0) f = first;
                else if (NextPrime(ref random, out constants) is { } next) f = next;
                else continue;
                var interpolation = Interpolation(f, BlackBox<PrimeField62, Residue62>(f, constants, output), ref random);
                if (primes == 0) lineDegree = interpolation.DegreeOnLine() ?? -1;
                var image = interpolation.Run();
                _evaluations += interpolation.Evaluations;
                if (image.Terms is null)
                    return NotRecovered(lineDegree, image.Stop == InterpolationStop.TooManyTerms ? image.TermsAtLeast : null, output);
                var terms = image.Terms.ToDictionary(t => Key(t.Exponents), t => (t.Exponents, (BigInteger)f.ToUInt64(t.Coefficient)));
                // A prime that shows fewer terms than the others hit a zero by bad luck (or divides a coefficient): drop it; one that
                // shows more replaces what came before.
                if (accumulated is null || terms.Count > accumulated.Count || !SameSupport(terms, accumulated) && terms.Count == accumulated.Count)
                {
                    accumulated = terms;
                    modulus = f.Modulus;
                    previous = null;
                }
                else if (!SameSupport(terms, accumulated)) continue;
                else
                {
                    foreach (var (key, (exponents, residue)) in terms)
                        accumulated[key] = (exponents, Crt(accumulated[key].Residue, modulus, residue, f.Modulus));
                    modulus *= f.Modulus;
                }
                var reconstructed = new Dictionary<string, Rational>();
                var ok = true;
                foreach (var (key, (_, residue)) in accumulated)
                {
                    if (!TryReconstruct(residue, modulus, out var c)) { ok = false; break; }
                    reconstructed[key] = c;
                }
                if (!ok) { previous = null; continue; }
                if (previous is not null && previous.Count == reconstructed.Count && previous.All(kv => reconstructed.TryGetValue(kv.Key, out var v) && v == kv.Value))
                {
                    var result = accumulated.Select(kv => new DifferenceTerm(kv.Value.Exponents, reconstructed[kv.Key])).Where(t => !t.Coefficient.IsZero).ToList();
                    if (VerifyOverQ(result, output, ref random)) return Recovered(result, verified: true, output);
                    accumulated = null; // a wrong image slipped in: start again
                    previous = null;
                    continue;
                }
                previous = reconstructed;
            }
            return NotRecovered(lineDegree, null, output);
        }

        /// <summary>A random 62-bit prime in which the program's constants are defined (null after a few that are not).</summary>
        private PrimeField62? NextPrime(ref Xoshiro256 random, out Residue62[] constants)
        {
            for (var attempt = 0; attempt < 4; attempt++)
            {
                var field = PrimeField62.CreateRandom(ref random);
                if (Evaluator.TryPrepareConstants<PrimeField62, Residue62>(field, _program, out constants)) return field;
            }
            constants = [];
            return null;
        }

        private static string Key(int[] exponents) => string.Join(",", exponents);

        private static bool SameSupport<TA, TB>(Dictionary<string, TA> a, Dictionary<string, TB> b) =>
            a.Count == b.Count && a.Keys.All(b.ContainsKey);

        /// <summary>x ≡ a (mod m), x ≡ b (mod n), 0 ≤ x &lt; m·n, for coprime m and n.</summary>
        private static BigInteger Crt(BigInteger a, BigInteger m, BigInteger b, BigInteger n)
        {
            var inverse = BigInteger.ModPow(m % n, n - 2, n); // n is prime
            var k = BigInteger.Remainder((b - a) % n * inverse, n);
            if (k.Sign < 0) k += n;
            return a + m * k;
        }

        private bool VerifyOverQ(List<DifferenceTerm> terms, int output, ref Xoshiro256 random)
        {
            for (var attempt = 0; attempt < 4; attempt++)
            {
                if (NextPrime(ref random, out var constants) is not { } field) continue;
                return Verify<PrimeField62, Residue62>(field, constants, terms, output, ref random);
            }
            return false;
        }

        private bool Verify<TField, T>(TField field, T[] constants, List<DifferenceTerm> terms, int output, ref Xoshiro256 random)
            where TField : struct, IField<T> where T : struct
        {
            var blackBox = BlackBox(field, constants, output);
            var point = new T[_program.Variables.Length];
            for (var k = 0; k < budget.VerifyPoints; k++)
            {
                for (var i = 0; i < point.Length; i++) point[i] = field.Sample(ref random);
                var expected = field.Zero;
                foreach (var term in terms)
                {
                    if (!Evaluator.TryConstant<TField, T>(field, term.Coefficient, out var value)) return false;
                    for (var i = 0; i < point.Length; i++)
                        for (var e = 0; e < term.Exponents[i]; e++) value = field.Multiply(value, point[i]);
                    expected = field.Add(expected, value);
                }
                _evaluations++;
                if (!field.AreEqual(expected, blackBox(point))) return false;
            }
            return true;
        }

        public RecoveredDifference? OverFiniteField<TField, T>(TField field, ref Xoshiro256 random) where TField : struct, IField<T> where T : struct
        {
            if (!Evaluator.TryPrepareConstants<TField, T>(field, _program, out var constants)) return null;
            var output = NonzeroOutput<TField, T>(field, constants, ref random);
            if (output < 0) return null;
            var p = compiled.Field.Characteristic;
            var interpolation = Interpolation(field, BlackBox(field, constants, output), ref random);
            var lineDegree = interpolation.DegreeOnLine() ?? -1;
            var image = interpolation.Run();
            _evaluations += interpolation.Evaluations;
            if (image.Terms is null)
                return NotRecovered(lineDegree, image.Stop == InterpolationStop.TooManyTerms ? image.TermsAtLeast : null, output);
            var terms = new List<DifferenceTerm>();
            foreach (var term in image.Terms)
            {
                // The program's constants are rationals, so its coefficients lie in GF(p) even when interpolated in GF(p^m).
                var coordinates = field.ToCoefficients(term.Coefficient);
                if (coordinates.Skip(1).Any(c => !c.IsZero)) return NotRecovered(lineDegree, null, output);
                var residue = coordinates[0];
                terms.Add(new DifferenceTerm(term.Exponents, 2 * residue > p ? residue - p : residue));
            }
            return Recovered(terms, Verify(field, constants, terms, output, ref random), output);
        }
    }
}
