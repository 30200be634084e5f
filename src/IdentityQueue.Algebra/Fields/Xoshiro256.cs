using System.Numerics;

namespace IdentityQueue.Algebra.Fields;

/// <summary>
/// xoshiro256** (Blackman and Vigna, 2018) seeded through SplitMix64: a small, fast generator whose output
/// is fixed for a seed on every platform and .NET version, so that runs are reproducible. Mutable struct;
/// pass by ref, not thread-safe.
/// </summary>
public struct Xoshiro256
{
    private ulong _s0, _s1, _s2, _s3;

    public Xoshiro256(ulong seed)
    {
        var x = seed;
        _s0 = SplitMix(ref x);
        _s1 = SplitMix(ref x);
        _s2 = SplitMix(ref x);
        _s3 = SplitMix(ref x);
    }

    /// <summary>Mixes several values into one seed (SplitMix64 finaliser), for deriving per-trial seeds.</summary>
    public static ulong Mix(ulong a, ulong b)
    {
        var x = unchecked(a ^ (b + 0x9E3779B97F4A7C15UL + (a << 6) + (a >> 2)));
        return SplitMix(ref x);
    }

    private static ulong SplitMix(ref ulong x)
    {
        unchecked
        {
            x += 0x9E3779B97F4A7C15UL;
            var z = x;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
            return z ^ (z >> 31);
        }
    }

    public ulong NextUInt64()
    {
        unchecked
        {
            var result = BitOperations.RotateLeft(_s1 * 5, 7) * 9;
            var t = _s1 << 17;
            _s2 ^= _s0;
            _s3 ^= _s1;
            _s1 ^= _s2;
            _s0 ^= _s3;
            _s2 ^= t;
            _s3 = BitOperations.RotateLeft(_s3, 45);
            return result;
        }
    }

    /// <summary>Uniform in [0, bound) by rejection (no modulo bias); bound must be positive.</summary>
    public ulong NextBelow(ulong bound)
    {
        ArgumentOutOfRangeException.ThrowIfZero(bound);
        var threshold = unchecked((0 - bound) % bound);
        while (true)
        {
            var r = NextUInt64();
            if (r >= threshold) return r % bound;
        }
    }

    /// <summary>Uniform in [0, bound) for any positive bound, by rejection on the bit length.</summary>
    public BigInteger NextBelow(BigInteger bound)
    {
        if (bound.Sign <= 0) throw new ArgumentOutOfRangeException(nameof(bound));
        if (bound <= ulong.MaxValue) return NextBelow((ulong)bound);
        var bits = (int)(bound - 1).GetBitLength();
        var bytes = new byte[(bits + 7) / 8 + 1];
        while (true)
        {
            for (var i = 0; i < bytes.Length - 1; i += 8)
            {
                var r = NextUInt64();
                for (var j = 0; j < 8 && i + j < bytes.Length - 1; j++) bytes[i + j] = unchecked((byte)(r >> (8 * j))); // keep the low byte: an explicit narrowing is checked in this project
            }
            var excess = (bytes.Length - 1) * 8 - bits;
            bytes[^2] &= (byte)(0xFF >> excess);
            bytes[^1] = 0;
            var candidate = new BigInteger(bytes);
            if (candidate < bound) return candidate;
        }
    }
}
