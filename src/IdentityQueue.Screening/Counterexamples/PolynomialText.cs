using System.Text;
using IdentityQueue.Algebra.Exact;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>Prints a polynomial in catalogue syntax: <c>2*x*y - 3*z^2 + 1/2*x + 1</c>. Stateless.</summary>
internal static class PolynomialText
{
    /// <summary>Total degree descending, then exponents compared in variable order, larger first (x^2 before x*y before y^2).</summary>
    public static int Compare(DifferenceTerm a, DifferenceTerm b)
    {
        var degree = b.Degree.CompareTo(a.Degree);
        if (degree != 0) return degree;
        for (var i = 0; i < a.Exponents.Count; i++)
            if (a.Exponents[i] != b.Exponents[i]) return b.Exponents[i].CompareTo(a.Exponents[i]);
        return 0;
    }

    /// <summary>The terms (already in printing order) as catalogue text; "0" for none.</summary>
    public static string Format(IReadOnlyList<DifferenceTerm> terms, IReadOnlyList<string> variables)
    {
        if (terms.Count == 0) return "0";
        var text = new StringBuilder();
        foreach (var term in terms)
        {
            var c = term.Coefficient;
            if (text.Length == 0) { if (c.Sign < 0) text.Append('-'); }
            else text.Append(c.Sign < 0 ? " - " : " + ");
            var magnitude = c.Sign < 0 ? -c : c;
            var factors = new List<string>();
            for (var i = 0; i < variables.Count; i++)
            {
                var e = term.Exponents[i];
                if (e == 1) factors.Add(variables[i]);
                else if (e > 1) factors.Add($"{variables[i]}^{e}");
            }
            if (magnitude != Rational.One || factors.Count == 0) factors.Insert(0, magnitude.ToString());
            text.Append(string.Join("*", factors));
        }
        return text.ToString();
    }
}
