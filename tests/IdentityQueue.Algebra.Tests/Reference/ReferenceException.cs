namespace IdentityQueue.Algebra.Tests.Reference;

/// <summary>
/// The reference code was given something outside the language it handles (an unknown name where an integer
/// parameter is needed, a shape mismatch, division by a non-constant in the expander, a limit exceeded).
/// A vanished denominator at a point is not an error: the interpreter reports it as an undefined result.
/// </summary>
public sealed class ReferenceException : Exception
{
    public ReferenceException()
    {
    }

    public ReferenceException(string message) : base(message)
    {
    }

    public ReferenceException(string message, Exception innerException) : base(message, innerException)
    {
    }
}

/// <summary>Sizes beyond which the reference code refuses work (it is meant for small cases only).</summary>
public static class ReferenceLimits
{
    /// <summary>Largest order for the Leibniz expansion of det and perm (n! terms).</summary>
    public const int MaxLeibnizOrder = 7;

    /// <summary>Largest order for the recursive Pfaffian expansion ((n-1)!! terms).</summary>
    public const int MaxPfaffianOrder = 10;

    /// <summary>Most terms in one sum/prod range or matrix comprehension range.</summary>
    public const int MaxRangeLength = 100_000;

    /// <summary>Largest exponent accepted by the polynomial expander and the parameter evaluator.</summary>
    public const int MaxExponent = 100_000;

    /// <summary>Largest n in fact, qint, qfact, qbinom and binom's k.</summary>
    public const int MaxFunctionArgument = 10_000;
}
