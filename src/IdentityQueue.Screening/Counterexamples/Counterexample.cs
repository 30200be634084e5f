using System.Numerics;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>
/// The smallest integer point found where lhs ≠ rhs (over GF(p): the residues of least absolute value), with both sides'
/// exact values there. Immutable.
/// </summary>
/// <param name="Point">Every variable of the program with its value, in the program's variable order.</param>
/// <param name="LhsValue">The left side at the point (a rational over Q, a residue in [0, p) over GF(p)).</param>
/// <param name="RhsValue">The right side at the point.</param>
/// <param name="Entry">The first differing entry of a matrix identity (<c>[2,1]</c>), null for a scalar identity.</param>
/// <param name="MaxAbs">The point's max-norm.</param>
/// <param name="Exhaustive">
/// True when every point before it in the search order (least max-norm, then least sum of absolute values, then the
/// coordinates in variable order ranked 0, 1, −1, 2, −2, …) was evaluated: it is then the least counterexample.
/// </param>
/// <param name="PointsTried">Points evaluated (undefined ones included).</param>
/// <param name="CompleteShells">Every point of max-norm below this was evaluated (and none of them differs).</param>
public sealed record Counterexample(
    IReadOnlyList<(string Variable, BigInteger Value)> Point,
    string LhsValue,
    string RhsValue,
    string? Entry,
    BigInteger MaxAbs,
    bool Exhaustive,
    int PointsTried,
    int CompleteShells)
{
    /// <summary>"fails at a = 1, b = 0: lhs = 4, rhs = 2" (with "at entry [2,1]" for a matrix identity).</summary>
    public string Describe() => Describe(Point.Select(v => (v.Variable, v.Value.ToString())), LhsValue, RhsValue, Entry);

    /// <summary>The same words for a counterexample as stored (values as text).</summary>
    public static string Describe(IEnumerable<(string Variable, string Value)> point, string lhs, string rhs, string? entry)
    {
        var coordinates = point.Select(v => $"{v.Variable} = {v.Value}").ToList();
        var at = coordinates.Count == 0 ? "fails" : "fails at " + string.Join(", ", coordinates);
        return $"{at}{(entry is null ? "" : $" at entry {entry}")}: lhs = {lhs}, rhs = {rhs}";
    }
}
