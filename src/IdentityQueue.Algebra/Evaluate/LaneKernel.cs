namespace IdentityQueue.Algebra.Evaluate;

/// <summary>Which instructions the lane kernels of the 31- and 62-bit rungs use (all give the same results).</summary>
internal enum LaneKernel
{
    /// <summary>One lane at a time (any CPU).</summary>
    Scalar,
    /// <summary>256-bit vectors with AVX2 (the 31-bit rung; the 62-bit rung runs scalar).</summary>
    Avx2,
    /// <summary>512-bit vectors with AVX-512F (and AVX-512DQ on the 62-bit rung).</summary>
    Avx512,
}
