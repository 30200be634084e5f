using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>One term of a recovered difference: the exponents in the order of <see cref="RecoveredDifference.Variables"/>, and the coefficient.</summary>
public sealed record DifferenceTerm(IReadOnlyList<int> Exponents, Rational Coefficient)
{
    public int Degree => Exponents.Sum();
}

/// <summary>
/// The cleared difference lhs − rhs of a refuted entry, recovered exactly (or, beyond the term budget, its total degree and a
/// lower bound on its number of terms). Over GF(p) the coefficients are the residues of least absolute value. Immutable.
/// </summary>
/// <param name="Text">
/// The difference in catalogue syntax (<c>2*x*y - 3*z^2 + 1</c>), or its numerator over <see cref="DenominatorText"/>; null
/// when it was not recovered.
/// </param>
/// <param name="Terms">Its number of terms, null when it was not recovered.</param>
/// <param name="TotalDegree">
/// Its total degree: exact when recovered, otherwise the degree along a random line (the total degree with high
/// probability); −1 when that did not settle within the budget.
/// </param>
/// <param name="EstimatedTerms">
/// When the terms exceeded the budget: the number of terms of the difference with some variables fixed at random values
/// (a lower bound on its number of terms, and near it when the last variables added few terms); null otherwise.
/// </param>
/// <param name="Verified">True when the recovered difference matched the program at fresh random points over a fresh prime.</param>
/// <param name="Entry">The entry of a matrix identity whose difference this is (<c>[2,1]</c>), null for a scalar identity.</param>
/// <param name="Variables">The program's variables, in the order of the exponents.</param>
/// <param name="TermList">The terms, in printing order (total degree descending, then lexicographic); null when not recovered.</param>
public sealed record RecoveredDifference(
    string? Text,
    int? Terms,
    int TotalDegree,
    int? EstimatedTerms,
    bool Verified,
    string? Entry,
    IReadOnlyList<string> Variables,
    IReadOnlyList<DifferenceTerm>? TermList)
{
    /// <summary>
    /// For a difference with divisors: D, the product of what the program divides by (in catalogue syntax), and then
    /// <see cref="Text"/> is D·(lhs − rhs), the cleared difference over that denominator (not reduced: it may share factors
    /// with D). Null for a polynomial difference.
    /// </summary>
    public string? DenominatorText { get; init; }

    /// <summary>The terms of <see cref="DenominatorText"/>, in printing order.</summary>
    public IReadOnlyList<DifferenceTerm>? DenominatorTerms { get; init; }

    /// <summary>The difference as the store keeps it: <see cref="Text"/>, or (Text)/(DenominatorText) for a rational one; null when not recovered.</summary>
    public string? StoredText => Text is null ? null : DenominatorText is null ? Text : $"({Text})/({DenominatorText})";

    /// <summary>"lhs - rhs = 2*x*y (1 term, total degree 2)", with "(lhs - rhs)[2,1]" for a matrix entry.</summary>
    public string Describe()
    {
        var side = Entry is null ? "lhs - rhs" : $"(lhs - rhs){Entry}";
        var degree = TotalDegree >= 0 ? $"total degree {TotalDegree}" : "total degree unknown";
        if (Text is not null && DenominatorText is not null)
            return $"{side} = ({Text})/({DenominatorText}) (numerator: {Terms} term{(Terms == 1 ? "" : "s")}, {degree})";
        if (Text is not null) return $"{side} = {Text} ({Terms} term{(Terms == 1 ? "" : "s")}, {degree})";
        var terms = EstimatedTerms is { } e ? $"at least {e} terms" : "terms not recovered";
        return $"{side}: {terms}, {degree}{(TotalDegree >= 0 ? " (along a random line)" : "")}";
    }
}
