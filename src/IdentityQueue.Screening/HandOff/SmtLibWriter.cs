using System.Numerics;
using System.Text;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Lower;
using IdentityQueue.Algebra.Syntax;

namespace IdentityQueue.Screening.HandOff;

/// <summary>
/// One candidate's proof obligation in SMT-LIB 2 over the reals: the variables to declare, the shared subterms, and the
/// assertions whose conjunction says "the identity fails somewhere". <c>unsat</c> from a solver proves the identity.
/// Immutable.
/// </summary>
public sealed record SmtLibObligation(
    IReadOnlyList<string> Declarations,
    IReadOnlyList<string> Definitions,
    IReadOnlyList<string> Assertions,
    int Denominators,
    int Entries);

/// <summary>
/// Translates an identity with its parameters fixed into an SMT-LIB 2 script asserting its negation over the reals
/// (<c>QF_NRA</c>). The identity is lowered by the algebra's one lowering step (<see cref="Lowering"/>: sums, products,
/// binom, fact, the q-functions and the matrix constructs written out, types and pf's skew-symmetry checked), and the
/// lowered program is read into + − × and rational constants (<see cref="LoweredTerms"/>: powers as products, det, perm
/// and pf by Laplace expansion along the first row with shared minors). Division is cleared: each side becomes N/D, every divisor
/// met on the way is asserted nonzero, and the last assertion is N_l·D_r ≠ N_r·D_l; for a matrix identity, some entry
/// differs. An identity of rational functions over Q holds exactly when no real point with all divisors nonzero tells the
/// sides apart (a nonzero polynomial over Q does not vanish on the dense set where the divisors do not), so the script is
/// <c>unsat</c> exactly when the identity is true. <c>over GF(p)</c> identities are skipped (they are not statements
/// about the reals). Limits: <see cref="HandOffLimits"/>. Stateless; thread-safe.
/// </summary>
public static class SmtLibWriter
{
    /// <summary>The SMT-LIB logic of every script: quantifier-free nonlinear real arithmetic.</summary>
    public const string Logic = "QF_NRA";

    /// <summary>The caution each script carries: screening is evidence, not proof.</summary>
    public const string Caution = "Screened by random evaluation over finite fields: very likely true, not proven; the error bound is only as good as the degree bound.";

    /// <summary>The obligation, or why the candidate is skipped (a failure with no position; never an exception).</summary>
    public static Result<SmtLibObligation> Translate(IdentityEntry entry, IReadOnlyDictionary<string, BigInteger>? parameters = null,
        HandOffLimits? limits = null, Limits? algebraLimits = null)
    {
        limits ??= HandOffLimits.Default;
        algebraLimits ??= Limits.Default;
        if (entry.Field.IsSeries)
            return Result<SmtLibObligation>.Fail($"it is a truncated power series identity (up to {entry.Field.SeriesVariable}^{entry.Field.SeriesOrder}): it compares coefficients, which is not a statement about real values");
        if (!entry.Field.IsRationals)
            return Result<SmtLibObligation>.Fail($"it is stated over {entry.Field}, an identity of polynomials over a finite field, which cannot be stated over the reals");
        // The tree's meaning comes from the one lowering step, within the tighter of the two sets of limits.
        var steps = Math.Min(algebraLimits.MaxProgramSize, limits.MaxExpansionSteps);
        var lowering = algebraLimits with { MaxProgramSize = steps, MaxMatrixOrder = Math.Min(algebraLimits.MaxMatrixOrder, limits.MaxMatrixOrder) };
        var lowered = Lowering.Lower(entry, parameters, lowering);
        if (!lowered.Success)
        {
            var tooLarge = steps < algebraLimits.MaxProgramSize && lowered.Error.Message.Contains("(the limit MaxProgramSize)", StringComparison.Ordinal);
            // The lowering's word for a constant divisor 0 is "division by zero"; the hand-off's reason names it in its own words too.
            var byZero = lowered.Error.Message == "division by zero" ? "it divides by zero; " : "";
            return Result<SmtLibObligation>.Fail(tooLarge ? $"it expands to more than {limits.MaxExpansionSteps} steps (the limit MaxExpansionSteps): {lowered.Error}"
                : $"{byZero}it does not compile: {lowered.Error}");
        }
        try
        {
            return Result<SmtLibObligation>.Ok(new LoweredTerms(limits).Negation(lowered.Value));
        }
        catch (HandOffSkip e)
        {
            return Result<SmtLibObligation>.Fail(e.Message);
        }
    }

    /// <summary>The comment lines that open a candidate's script: where it came from, its evidence, and the caution.</summary>
    public static string Header(HandOffCandidate candidate)
    {
        var text = new StringBuilder();
        void Line(string s) => text.Append("; ").AppendLine(OneLine(s));
        Line($"candidate {candidate.Id}: {candidate.Label}");
        if (candidate.Family is not null) Line($"family {candidate.Family}, params {candidate.Params ?? "{}"}");
        Line($"identity: {candidate.Identity}");
        var evidence = $"screening: {candidate.State ?? "no result"}, degree bound {candidate.DegreeBound ?? "unknown"}, {candidate.Trials} trial{(candidate.Trials == 1 ? "" : "s")}";
        if (candidate.ErrorBoundExponent is { } e) evidence += $", error bound 2^{e} (error_bound_log2 {candidate.ErrorBoundLog2!.Value.ToString("R", System.Globalization.CultureInfo.InvariantCulture)})";
        Line(evidence);
        Line(Caution);
        Line("This script asserts the negation over the reals: unsat proves the identity, sat refutes it.");
        return text.ToString();
    }

    /// <summary>A whole script for one candidate: header, logic, declarations, definitions, assertions, check-sat.</summary>
    public static string Script(HandOffCandidate candidate, SmtLibObligation obligation)
    {
        var text = new StringBuilder(Header(candidate));
        text.AppendLine($"(set-logic {Logic})");
        Body(text, obligation, "");
        return text.ToString();
    }

    /// <summary>One candidate as a <c>(push 1)</c> … <c>(pop 1)</c> block of a multi-candidate script (after one set-logic).</summary>
    public static string Block(HandOffCandidate candidate, SmtLibObligation obligation)
    {
        var text = new StringBuilder(Header(candidate));
        text.AppendLine("(push 1)");
        Body(text, obligation, "  ");
        text.AppendLine("(pop 1)");
        return text.ToString();
    }

    private static void Body(StringBuilder text, SmtLibObligation obligation, string indent)
    {
        foreach (var line in obligation.Declarations.Concat(obligation.Definitions).Concat(obligation.Assertions))
            text.Append(indent).AppendLine(line);
        text.Append(indent).AppendLine("(check-sat)");
    }

    private static string OneLine(string s) => s.Replace('\r', ' ').Replace('\n', ' ');
}
