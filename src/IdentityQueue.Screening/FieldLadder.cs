using System.Numerics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening;

/// <summary>
/// One rung of the escalation ladder. Over Q: trials mod a random prime of <see cref="PrimeBits"/> bits. In characteristic p:
/// trials in GF(p^<see cref="ExtensionDegree"/>), a multiple of the stated field's degree. Immutable.
/// </summary>
public sealed record Rung(int PrimeBits, int ExtensionDegree, double SizeLog2)
{
    /// <summary>Tells the rungs of one ladder apart: the prime's bits over Q, the extension degree in characteristic p.</summary>
    public int Key => ExtensionDegree == 0 ? PrimeBits : ExtensionDegree;

    public override string ToString() => ExtensionDegree == 0 ? $"{PrimeBits}-bit prime" : $"degree-{ExtensionDegree} extension ({SizeLog2:F0} bits)";
}

/// <summary>
/// The ladder of field sizes: about 31, 62 and 127 bits (the fast rungs), then 256, 512, … up to
/// <see cref="Algebra.Limits.MaxFieldBits"/>. A candidate starts at the cheapest rung where one trial buys at least
/// <see cref="ScreeningPolicy.MinBitsPerTrial"/> bits and moves up one rung once a rung has given a zero trial, staying at
/// the 127-bit rung (or its start, if higher) from then on. Over Q, the 31- and 62-bit rungs run their trials as one block
/// (<see cref="BlockTrialRunner"/>): as many independent trials as reach the target if all vanish. Stateless.
/// </summary>
public static class FieldLadder
{
    private static readonly int[] RungBits = [31, 62, 127, 256, 512, 1024, 2048, 4096, 8192];
    private const int SettleIndex = 2; // the 127-bit rung

    /// <summary>The rungs for a candidate's field, cheapest first.</summary>
    public static IReadOnlyList<Rung> Rungs(FieldSpec field, int maxFieldBits)
    {
        var rungs = new List<Rung>();
        if (field.IsRationals)
        {
            foreach (var b in RungBits)
                if (b <= maxFieldBits) rungs.Add(new Rung(b, 0, b - 1));
            return rungs;
        }
        var pLog2 = Evidence.BigLog2(field.Characteristic);
        foreach (var b in RungBits)
        {
            if (b > maxFieldBits) break;
            var m = (int)Math.Ceiling(b / pLog2 - 1e-9);
            m = Math.Max(field.Degree, (m + field.Degree - 1) / field.Degree * field.Degree);
            if (rungs.Count > 0 && rungs[^1].ExtensionDegree >= m) continue;
            rungs.Add(new Rung(0, m, m * Math.Log2((double)field.Characteristic)));
        }
        if (rungs.Count == 0) rungs.Add(new Rung(0, field.Degree, field.Degree * pLog2));
        return rungs;
    }

    /// <summary>The <see cref="Rung.Key"/> of the rung a recorded trial ran on.</summary>
    public static int RungOf(CompiledIdentity identity, TrialField field) =>
        identity.Field.IsRationals ? (int)field.Modulus.GetBitLength() : field.ExtensionDegree;

    /// <summary>
    /// The rung for the next trials once zero trials have been recorded on <paramref name="climbed"/> rungs (one step up per
    /// rung, so a survivor of the cheap stage moves to a larger field), or null when no rung up to the largest buys enough
    /// evidence (the degree bound is too large).
    /// </summary>
    public static Rung? Choose(CompiledIdentity identity, IReadOnlyList<Rung> rungs, int climbed, int minBitsPerTrial)
    {
        var start = -1;
        for (var i = 0; i < rungs.Count; i++)
        {
            var bound = Evidence.TrialBoundLog2(identity.Bounds, rungs[i].SizeLog2, identity.Field.IsRationals ? rungs[i].PrimeBits : null);
            if (bound is double b && b <= -minBitsPerTrial) { start = i; break; }
        }
        if (start < 0) return null;
        var settle = Math.Max(start, Math.Min(SettleIndex, rungs.Count - 1));
        return rungs[Math.Min(start + climbed, settle)];
    }

    /// <summary>The bits one trial on the largest rung would buy: for the message when none is enough.</summary>
    public static double BestBits(CompiledIdentity identity, IReadOnlyList<Rung> rungs)
    {
        var top = rungs[^1];
        var bound = Evidence.TrialBoundLog2(identity.Bounds, top.SizeLog2, identity.Field.IsRationals ? top.PrimeBits : null);
        return bound is double b ? -b : 0;
    }

}
