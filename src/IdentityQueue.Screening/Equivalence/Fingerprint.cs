using System.Buffers.Binary;
using System.Collections.Concurrent;
using System.Numerics;
using System.Security.Cryptography;
using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;
using IdentityQueue.Algebra.Lower;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.Equivalence;

/// <summary>
/// The fingerprint of one instance of an identity (its parameters fixed): each side's values at <see cref="Points"/> fixed
/// points in each of two fixed fields, digested to 128 bits per side. The fields and the points come from the catalogue's
/// seed alone (a variable's value is a hash of the seed, the field's number, the variable's name and the point's number), so
/// the same variable gets the same value in every entry of a catalogue and two entries whose sides are the same rational
/// function get the same print, however they are written.
/// <list type="bullet">
/// <item>over Q: two 62-bit primes drawn from the seed, the sides evaluated mod each;</item>
/// <item>over GF(p^k): two extensions GF(p^m) with p^m ≥ 2^60 (two defining polynomials drawn from the seed; for p ≥ 2^60,
/// GF(p) itself twice with different points) — the identity is one of polynomials over GF(p), so any extension decides it;</item>
/// <item>a matrix side: a combination of its entries with coefficients drawn from the seed (<see cref="Shape"/> names the entries).</item>
/// </list>
/// A point where a side is undefined (a vanishing denominator) is skipped for that side and the next one is tried, up to
/// <see cref="MaxSkipped"/> times; the numbers of the points used enter the digest. Truncated power series (<c>up to q^N</c>)
/// and instances that do not compile or evaluate get no fingerprint. Immutable; equality is that of the key.
/// </summary>
/// <param name="Field">The entry's own field (<c>Q</c>, <c>GF(5)</c>, <c>GF(2^8)</c>): identities over different fields never agree.</param>
/// <param name="Shape">Empty for scalar sides; the entry names <c>[1,1],[1,2],…</c> of matrix sides.</param>
/// <param name="Left">The digest of the left side's values.</param>
/// <param name="Right">The digest of the right side's values.</param>
/// <param name="FieldBits">log2 of the smaller of the two fingerprint fields' sizes.</param>
/// <param name="HeightMatters">True over Q, where a prime dividing every coefficient of a difference hides it.</param>
public readonly record struct Fingerprint(string Field, string Shape, UInt128 Left, UInt128 Right, double FieldBits, bool HeightMatters)
{
    /// <summary>Points per field (K).</summary>
    public const int Points = 2;

    /// <summary>Fields per fingerprint.</summary>
    public const int Fields = 2;

    /// <summary>Points tried beyond <see cref="Points"/> per field when a side is undefined at some; then no fingerprint.</summary>
    public const int MaxSkipped = 3;

    /// <summary>log2 of the number of 62-bit primes, from below (Rosser–Schoenfeld, <see cref="Primality.PrimeCountInRangeLog2"/>); the
    /// fingerprint primes are uniform among them (rejection sampling in <see cref="Primality.RandomPrime"/>).</summary>
    private static readonly double PrimesLog2 = Primality.PrimeCountInRangeLog2(62);

    /// <summary>
    /// A log2 bound on the chance that two entries get the same unordered pair of side prints (and are grouped) although
    /// they are not the same identity, when the seed is drawn independently of the catalogue.
    /// <para>
    /// If two entries are grouped but are not the same, some side of one, A, and some side of the other, B, share a print
    /// while A − B ≠ 0; there are two ways to pair the sides, hence the factor 2. Write A − B = N/D with N a nonzero
    /// polynomial of total degree ≤ <paramref name="degreeBound"/> (the caller's bound on the numerator of the difference
    /// of two sides: e.g. the sum of both sides' numerator and denominator degrees); for matrix sides the combination
    /// coefficients are further variables, one more degree. In one fingerprint field of size q, the K points are uniform and
    /// independent (the hash modelled as random) and drawn without looking at the entries, so by the Schwartz–Zippel lemma
    /// N vanishes at all of them with chance ≤ (d/q)^K. Over Q, N mod p may vanish identically: p divides every
    /// coefficient, at most h/61 of the 62-bit primes when the coefficients have at most h bits
    /// (<paramref name="heightBitsBound"/>), of at least 2^55 such primes (a proven count), the fingerprint primes uniform
    /// among them. The two fields are drawn independently, so the chances multiply; a 128-bit digest collision adds 2^−128.
    /// </para>
    /// </summary>
    public double FalseMatchLog2(double degreeBound, double heightBitsBound = 0)
    {
        var d = Math.Max(1, degreeBound + (Shape.Length > 0 ? 1 : 0));
        var pointsLog2 = Points * (Math.Log2(d) - FieldBits);
        var perField = HeightMatters
            ? Log2Add(pointsLog2, Math.Log2(Math.Max(1, Math.Ceiling(heightBitsBound / 61))) - PrimesLog2)
            : pointsLog2;
        var sides = Math.Min(0, Fields * perField);
        return Math.Min(0, 1 + Log2Add(sides, -128));
    }

    /// <summary>
    /// <see cref="FalseMatchLog2(double, double)"/> for entry <paramref name="b"/> grouped with entry <paramref name="a"/>
    /// (whose fingerprint is this one), with the degree and height taken from the compiler's bounds on the differences of
    /// the paired sides: a's left side against b's left (b's right when <paramref name="swapped"/>), and a's right against
    /// b's other side, each compiled as an identity of its own. Null when a pair does not compile, or when the two
    /// instances give one parameter name different values (their sides cannot be compiled together).
    /// </summary>
    public double? FalseMatchLog2(IdentityEntry a, IReadOnlyDictionary<string, BigInteger> aParameters,
        IdentityEntry b, IReadOnlyDictionary<string, BigInteger> bParameters, bool swapped, Limits? limits = null)
    {
        var parameters = new Dictionary<string, BigInteger>(aParameters, StringComparer.Ordinal);
        foreach (var (name, value) in bParameters)
        {
            if (parameters.TryGetValue(name, out var other) && other != value) return null;
            parameters[name] = value;
        }
        var degree = 0.0;
        var height = 0.0;
        foreach (var (mine, theirs) in new[] { (a.Left, swapped ? b.Right : b.Left), (a.Right, swapped ? b.Left : b.Right) })
        {
            var pair = IdentityCompiler.Compile(a with { Left = mine, Right = theirs }, parameters, limits);
            if (!pair.Success) return null;
            degree = Math.Max(degree, (double)pair.Value.Bounds.Degree);
            height = Math.Max(height, pair.Value.Bounds.HeightLog2);
        }
        return FalseMatchLog2(degree, height);
    }

    private static double Log2Add(double a, double b)
    {
        var (hi, lo) = a >= b ? (a, b) : (b, a);
        return hi + Math.Log2(1 + Math.Pow(2, lo - hi));
    }

    /// <summary>The fingerprint of the instance of <paramref name="entry"/> with <paramref name="parameters"/>, or null when it has none.</summary>
    public static Fingerprint? Of(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger> parameters, RunSeed seed, Limits? limits = null)
    {
        limits ??= Limits.Default;
        if (entry.Field.IsSeries) return null;
        var left = SideProgram(entry, entry.Left, parameters, limits);
        var right = SideProgram(entry, entry.Right, parameters, limits);
        if (left is null || right is null) return null;
        var shape = string.Join(",", left.Program.OutputNames);
        if (shape != string.Join(",", right.Program.OutputNames)) return null;
        var field = left.Entry.Field; // bound for a parameter characteristic
        if (field.IsSeries) return null;
        var name = field.ToString();
        if (field.IsRationals)
        {
            var fields = (PrimeField62[])Cached(seed, BigInteger.Zero, () =>
            {
                var drawn = new PrimeField62[Fields];
                for (var f = 0; f < Fields; f++) drawn[f] = RationalsField(seed, f);
                return drawn;
            });
            return Make<PrimeField62, Residue62>(fields, left, right, seed, name, shape, true);
        }
        var p = field.Characteristic;
        var bits = BigInteger.Log(p, 2);
        if (bits >= 60 || p > long.MaxValue)
        {
            if (p <= long.MaxValue)
                return Make<SmallPrimeField, SmallResidue>([SmallPrimeField.Create((ulong)p), SmallPrimeField.Create((ulong)p)], left, right, seed, name, shape, false);
            return Make<BigPrimeField, BigResidue>([BigPrimeField.Create(p), BigPrimeField.Create(p)], left, right, seed, name, shape, false);
        }
        var m = (int)Math.Ceiling(60 / bits);
        var extensions = (ExtensionField<SmallPrimeField, SmallResidue>[])Cached(seed, p, () =>
        {
            var drawn = new ExtensionField<SmallPrimeField, SmallResidue>[Fields];
            for (var f = 0; f < Fields; f++)
            {
                var random = new Xoshiro256(Hash(seed, "extension", f));
                drawn[f] = ExtensionField<SmallPrimeField, SmallResidue>.Create(SmallPrimeField.Create((ulong)p), m, ref random);
            }
            return drawn;
        });
        return Make<ExtensionField<SmallPrimeField, SmallResidue>, ExtElement<SmallResidue>>(extensions, left, right, seed, name, shape, false);
    }

    /// <summary>
    /// One side lowered as <c>side = 0</c> (a matrix side as <c>side = 0·side</c>), so that the program's outputs are the
    /// side's value. Lowered only: the print needs no bounds (<see cref="Algebra.Bounds.BoundAnalysis"/> is a pass of its own, skipped here).
    /// </summary>
    private static LoweredIdentity? SideProgram(IdentityEntry entry, Expr side, IReadOnlyDictionary<string, BigInteger> parameters, Limits limits)
    {
        var zero = new IntegerLiteral(BigInteger.Zero, side.Position);
        var scalar = Lowering.Lower(entry with { Left = side, Right = zero }, parameters, limits);
        if (scalar.Success) return scalar.Value;
        var zeroMatrix = new ProductExpr([new ProductFactor(zero, false, side.Position), new ProductFactor(side, false, side.Position)], side.Position);
        var matrix = Lowering.Lower(entry with { Left = side, Right = zeroMatrix }, parameters, limits);
        return matrix.Success && matrix.Value.Program.OutputNames.Length > 0 ? matrix.Value : null;
    }

    private static Fingerprint? Make<TField, T>(TField[] fields, LoweredIdentity left, LoweredIdentity right, RunSeed seed,
        string name, string shape, bool heightMatters)
        where TField : struct, IField<T> where T : struct
    {
        var l = Digest<TField, T>(fields, left.Program, seed);
        var r = Digest<TField, T>(fields, right.Program, seed);
        if (l is null || r is null) return null;
        var size = fields.Min(f => f.SizeLog2);
        return new Fingerprint(name, shape, l.Value, r.Value, size, heightMatters);
    }

    /// <summary>The 128-bit digest of one side's values at the first <see cref="Points"/> points of each field where it is defined.</summary>
    private static UInt128? Digest<TField, T>(TField[] fields, StraightLineProgram program, RunSeed seed)
        where TField : struct, IField<T> where T : struct
    {
        using var hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);
        var registers = new T[program.Length];
        var point = new T[program.Variables.Length];
        var first = program.ConditionNames.Length;
        for (var f = 0; f < fields.Length; f++)
        {
            var field = fields[f];
            if (!Evaluator.TryPrepareConstants<TField, T>(field, program, out var constants)) return null;
            var weights = new T[program.Outputs.Length - first];
            for (var e = 0; e < weights.Length; e++)
            {
                if (weights.Length == 1) { weights[e] = field.One; break; }
                var random = new Xoshiro256(Hash(seed, "entry", f, e.ToString(System.Globalization.CultureInfo.InvariantCulture)));
                weights[e] = field.Sample(ref random);
            }
            var found = 0;
            for (var k = 0; found < Points && k < Points + MaxSkipped; k++)
            {
                for (var i = 0; i < point.Length; i++)
                {
                    var random = PointRandom(seed, f, k, program.Variables[i]);
                    point[i] = field.Sample(ref random);
                }
                if (!Evaluator.Evaluate<TField, T>(field, program, constants, point, registers, CancellationToken.None)) continue;
                var value = field.Zero;
                for (var e = 0; e < weights.Length; e++)
                    value = field.MultiplyAdd(weights[e], registers[program.Outputs[first + e]], value);
                Append(hash, f, k, field.ToCoefficients(value));
                found++;
            }
            if (found < Points) return null;
        }
        var bytes = hash.GetHashAndReset();
        return new UInt128(BinaryPrimitives.ReadUInt64LittleEndian(bytes), BinaryPrimitives.ReadUInt64LittleEndian(bytes.AsSpan(8)));
    }

    /// <summary>Fingerprint fields drawn so far, by (seed, characteristic; 0 for Q): drawing a prime or an irreducible polynomial costs more than a print. Cleared past 64.</summary>
    private static readonly ConcurrentDictionary<(ulong Seed, BigInteger Characteristic), Array> FieldCache = new();

    private static Array Cached(RunSeed seed, BigInteger characteristic, Func<Array> draw)
    {
        if (FieldCache.TryGetValue((seed.Value, characteristic), out var fields)) return fields;
        if (FieldCache.Count >= 64) FieldCache.Clear();
        return FieldCache.GetOrAdd((seed.Value, characteristic), _ => draw());
    }

    /// <summary>Fingerprint field <paramref name="f"/> of an identity over Q: a 62-bit prime drawn from the seed.</summary>
    internal static PrimeField62 RationalsField(RunSeed seed, int f)
    {
        var random = new Xoshiro256(Hash(seed, "prime", f));
        return PrimeField62.CreateRandom(ref random);
    }

    /// <summary>The generator that samples variable <paramref name="name"/> at point <paramref name="k"/> of field <paramref name="f"/>.</summary>
    internal static Xoshiro256 PointRandom(RunSeed seed, int f, int k, string name)
    {
        // A name has one value per point across a catalogue: its hash is computed once (a SHA-256 per variable, point and
        // field would cost more than evaluating most sides). Cleared past MaxPointSeeds.
        if (PointSeeds.TryGetValue((seed.Value, f, k, name), out var known)) return new Xoshiro256(known);
        if (PointSeeds.Count >= MaxPointSeeds) PointSeeds.Clear();
        var hash = Hash(seed, "point", f, k, name);
        PointSeeds.TryAdd((seed.Value, f, k, name), hash);
        return new Xoshiro256(hash);
    }

    private const int MaxPointSeeds = 1 << 16;

    private static readonly ConcurrentDictionary<(ulong Seed, int Field, int Point, string Name), ulong> PointSeeds = new();

    private static void Append(IncrementalHash hash, int field, int point, BigInteger[] coefficients)
    {
        Span<byte> buffer = stackalloc byte[12];
        BinaryPrimitives.WriteInt32LittleEndian(buffer, field);
        BinaryPrimitives.WriteInt32LittleEndian(buffer[4..], point);
        BinaryPrimitives.WriteInt32LittleEndian(buffer[8..], coefficients.Length);
        hash.AppendData(buffer);
        foreach (var c in coefficients)
        {
            var bytes = c.ToByteArray(); // two's complement, little-endian; prefixed by its length so that the encoding is unambiguous
            BinaryPrimitives.WriteInt32LittleEndian(buffer, bytes.Length);
            hash.AppendData(buffer[..4]);
            hash.AppendData(bytes);
        }
    }

    /// <summary>A 64-bit seed from the catalogue seed and a purpose, field number, point number and name.</summary>
    private static ulong Hash(RunSeed seed, string purpose, int field, int point = 0, string name = "")
    {
        var bytes = SHA256.HashData(Encoding.UTF8.GetBytes($"idq-fingerprint\n{seed.Value}\n{purpose}\n{field}\n{point}\n{name}"));
        return BinaryPrimitives.ReadUInt64LittleEndian(bytes);
    }

    private static ulong Hash(RunSeed seed, string purpose, int field, string name) => Hash(seed, purpose, field, 0, name);
}

