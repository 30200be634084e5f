namespace IdentityQueue.Algebra.Evaluate;

/// <summary>
/// The arithmetic of one rung on one vector width, as static members of a struct, so that the block interpreter written
/// once over <typeparamref name="TLane"/> is specialised by the JIT per kernel (no virtual calls, no type tests).
/// A <typeparamref name="TLane"/> holds <see cref="Width"/> consecutive lanes of a block (one raw representative per lane
/// on the Montgomery rungs, one field element on the generic kernel); a <typeparamref name="TModulus"/> holds what the
/// operations need of those lanes' fields (each lane may be in its own field), prepared once per field change.
/// Operands and results are reduced representatives; all kernels of one rung give identical results.
/// </summary>
internal interface ILaneKernel<TField, TLane, TModulus> where TField : struct where TLane : struct where TModulus : struct
{
    /// <summary>Lanes per <typeparamref name="TLane"/>.</summary>
    static abstract int Width { get; }

    /// <summary>What runs, for reports (<see cref="BlockEvaluator{TField, T}.Kernel"/>).</summary>
    static abstract string Description { get; }

    /// <summary>The modulus of <see cref="Width"/> consecutive lanes with fields <paramref name="lanes"/>.</summary>
    static abstract TModulus Modulus(ReadOnlySpan<TField> lanes);

    /// <summary>Whether two lanes' fields are the same field (by modulus on the Montgomery rungs).</summary>
    static abstract bool SameField(TField a, TField b);

    static abstract TLane Add(TLane a, TLane b, in TModulus m);
    static abstract TLane Subtract(TLane a, TLane b, in TModulus m);
    static abstract TLane Negate(TLane a, in TModulus m);
    static abstract TLane Multiply(TLane a, TLane b, in TModulus m);

    /// <summary>a·b + c.</summary>
    static abstract TLane MultiplyAdd(TLane a, TLane b, TLane c, in TModulus m);

    /// <summary>a·b − c.</summary>
    static abstract TLane MultiplySubtract(TLane a, TLane b, TLane c, in TModulus m);

    /// <summary>c − a·b.</summary>
    static abstract TLane NegativeMultiplyAdd(TLane a, TLane b, TLane c, in TModulus m);
}

/// <summary>A Montgomery modulus of some lanes: p and p^-1 mod R, lane by lane.</summary>
internal readonly struct MontgomeryModulus<TLane>(TLane p, TLane pInverse) where TLane : struct
{
    public readonly TLane P = p;
    public readonly TLane PInverse = pInverse;
}
