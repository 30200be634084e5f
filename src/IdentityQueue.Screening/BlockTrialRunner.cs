using System.Diagnostics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Evaluate;
using IdentityQueue.Algebra.Fields;

namespace IdentityQueue.Screening;

/// <summary>
/// Runs several trials of one candidate over Q on the 31- or 62-bit rung as the lanes of one block: lane l is trial
/// firstSeq + l, with its own random prime and its own point drawn from its own seed exactly as <see cref="TrialRunner"/>
/// draws them, so the trials stay independent (their bounds multiply) and the records equal those of running the trials
/// one by one. The candidate's program is interpreted once per block, on vector instructions where the CPU has them; a
/// block is padded to whole vectors with copies of its first lane, whose results are dropped. Stateless.
/// </summary>
public static class BlockTrialRunner
{
    /// <summary>Whether trials of <paramref name="identity"/> on <paramref name="rung"/> run as a block (over Q, the 31- and 62-bit rungs).</summary>
    public static bool Handles(CompiledIdentity identity, Rung rung) => identity.Field.IsRationals && !identity.Field.IsSeries && rung.PrimeBits is 31 or 62;

    /// <summary>The lanes a block of <paramref name="lanes"/> trials on <paramref name="rung"/> computes: whole vectors (what it costs).</summary>
    public static int PaddedLanes(Rung rung, int lanes)
    {
        var width = rung.PrimeBits == 31 ? BlockEvaluator.LanesPerInstruction<PrimeField31>() : BlockEvaluator.LanesPerInstruction<PrimeField62>();
        return (lanes + width - 1) / width * width;
    }

    /// <summary>The most trials one block runs on <paramref name="rung"/>.</summary>
    public static int MaxLanes(Rung rung) => rung.PrimeBits == 31 ? 16 : 8;

    /// <summary>Trials firstSeq, firstSeq + 1, … with the seeds <paramref name="seeds"/>, all on <paramref name="rung"/>.</summary>
    /// <param name="identity">The candidate.</param>
    /// <param name="program">Its program compiled for blocks.</param>
    /// <param name="rung">The field size every trial of the block uses.</param>
    /// <param name="firstSeq">The sequence number of the first trial.</param>
    /// <param name="seeds">One seed per trial, which fixes its field and point.</param>
    /// <param name="cancellation">Observed inside the block's kernels; a cancelled block throws <see cref="OperationCanceledException"/> and records nothing.</param>
    public static TrialRecord[] Run(CompiledIdentity identity, BlockProgram program, Rung rung, int firstSeq, ReadOnlySpan<ulong> seeds,
        CancellationToken cancellation = default)
    {
        if (!Handles(identity, rung)) throw new ArgumentException($"trials on the {rung} rung of a candidate over {identity.Field} do not run as a block", nameof(rung));
        return rung.PrimeBits == 31
            ? Run<PrimeField31, Residue31>(identity, program, firstSeq, seeds, static (ref Xoshiro256 r) => PrimeField31.CreateRandom(ref r), cancellation)
            : Run<PrimeField62, Residue62>(identity, program, firstSeq, seeds, static (ref Xoshiro256 r) => PrimeField62.CreateRandom(ref r), cancellation);
    }

    private delegate TField FieldDraw<TField>(ref Xoshiro256 random);

    private static TrialRecord[] Run<TField, T>(CompiledIdentity identity, BlockProgram program, int firstSeq, ReadOnlySpan<ulong> seeds, FieldDraw<TField> draw,
        CancellationToken cancellation)
        where TField : struct, IField<T> where T : struct
    {
        var clock = Stopwatch.StartNew();
        var count = seeds.Length;
        var width = BlockEvaluator.LanesPerInstruction<TField>();
        var b = (count + width - 1) / width * width;
        var source = program.Program;
        var variables = source.Variables.Length;
        var fields = new TField[b];
        var points = new T[variables * b];
        for (var l = 0; l < b; l++)
        {
            if (l >= count)
            {
                fields[l] = fields[0];
                for (var v = 0; v < variables; v++) points[v * b + l] = points[v * b];
                continue;
            }
            var random = new Xoshiro256(seeds[l]);
            fields[l] = draw(ref random);
            for (var v = 0; v < variables; v++) points[v * b + l] = fields[l].Sample(ref random);
        }
        var evaluator = new BlockEvaluator<TField, T>(fields, program);
        var outputs = new T[source.Outputs.Length * b];
        var defined = new bool[b];
        evaluator.Evaluate(points, outputs, defined, cancellation);
        var elapsed = (long)(clock.Elapsed.TotalMicroseconds / count);

        var records = new TrialRecord[count];
        var point = new T[variables];
        for (var l = 0; l < count; l++)
        {
            for (var v = 0; v < variables; v++) point[v] = points[v * b + l];
            var difference = defined[l] ? TrialRunner.FromOutputs<TField, T>(fields[l], source, outputs, b, l) : new RecheckResult(false, null, null);
            records[l] = TrialRunner.Record<TField, T>(fields[l], identity, firstSeq + l, seeds[l], point, null, difference, elapsed);
        }
        return records;
    }
}
