using System.Globalization;
using System.Security.Cryptography;
using IdentityQueue.Algebra;

namespace IdentityQueue.Screening;

/// <summary>
/// The seed of a run: with a candidate's <see cref="CandidateKey"/> and a trial number it fixes the trial's prime and
/// point (<see cref="Screener.TrialSeed"/>). 0 ≤ value &lt; 2^63, so that every store keeps it in a signed 64-bit
/// column and every command accepts the same values. Validated where it enters; immutable.
/// </summary>
public readonly record struct RunSeed
{
    /// <summary>The largest seed, 2^63 − 1.</summary>
    public const ulong Max = long.MaxValue;

    private RunSeed(ulong value) => Value = value;

    public ulong Value { get; }

    /// <summary>A seed known to be in range (a stored catalogue seed).</summary>
    public static RunSeed FromStored(long value) =>
        value >= 0 ? new RunSeed((ulong)value) : throw new ArgumentOutOfRangeException(nameof(value), value, "a run seed is not negative");

    /// <summary>A seed given by a user, or why it is out of range.</summary>
    public static Result<RunSeed> FromUser(ulong value) =>
        value <= Max ? Result<RunSeed>.Ok(new RunSeed(value))
            : Result<RunSeed>.Fail($"the seed must be between 0 and 2^63 - 1 ({Max}), got {value}");

    /// <summary>Reads a seed written in decimal, or says why the text is not a seed.</summary>
    public static Result<RunSeed> Parse(string text) =>
        ulong.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out var value) ? FromUser(value)
            : Result<RunSeed>.Fail($"the seed must be a whole number between 0 and 2^63 - 1, got '{text}'");

    /// <summary>A fresh seed, uniform on [0, 2^63), from the operating system's generator.</summary>
    public static RunSeed Random() => new(BitConverter.ToUInt64(RandomNumberGenerator.GetBytes(8)) >> 1);

    /// <summary>The value as the stores keep it.</summary>
    public long Stored => (long)Value;

    public override string ToString() => Value.ToString(CultureInfo.InvariantCulture);
}
