using System.Numerics;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Algebra.Tests.Fields;

public class Xoshiro256Tests
{
    [Fact]
    public void SameSeedGivesTheSameSequence()
    {
        var a = new Xoshiro256(7);
        var b = new Xoshiro256(7);
        for (var i = 0; i < 100; i++) Assert.Equal(a.NextUInt64(), b.NextUInt64());
    }

    [Fact]
    public void NextBelowALargeBigIntegerStaysInRangeAndUsesTheHighBits()
    {
        var random = new Xoshiro256(99);
        var bound = (BigInteger.One << 130) / 3;
        var max = BigInteger.Zero;
        for (var i = 0; i < 2000; i++)
        {
            var x = random.NextBelow(bound);
            Assert.True(x.Sign >= 0 && x < bound);
            if (x > max) max = x;
        }
        Assert.True(max > bound * 9 / 10);
    }

    [Fact]
    public void NextBelowASmallBoundHitsEveryValue()
    {
        var random = new Xoshiro256(3);
        var seen = new bool[7];
        for (var i = 0; i < 500; i++) seen[random.NextBelow(7UL)] = true;
        Assert.All(seen, Assert.True);
    }
}
