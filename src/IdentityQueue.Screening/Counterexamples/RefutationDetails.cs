using IdentityQueue.Algebra.Compile;

namespace IdentityQueue.Screening.Counterexamples;

/// <summary>
/// What a researcher acts on after a refutation: the smallest integer counterexample found and the difference lhs − rhs
/// recovered (either may be missing: not found within the budget, or not applicable, such as a power-series entry). Immutable.
/// </summary>
public sealed record RefutationDetails(Counterexample? Counterexample, RecoveredDifference? Difference)
{
    /// <summary>
    /// Runs the counterexample search, then the difference recovery, for a refuted identity, together within
    /// <see cref="ScreeningPolicy.RefutationDetailTime"/> measured on <paramref name="clock"/>: what the time allows is kept
    /// (the counterexample first). A stop requested through <paramref name="cancellation"/> throws
    /// <see cref="OperationCanceledException"/> as every screening step does. Null when neither was found.
    /// </summary>
    public static RefutationDetails? Find(CompiledIdentity compiled, ScreeningPolicy policy, ulong seed, TimeProvider clock,
        CancellationToken cancellation)
    {
        ArgumentNullException.ThrowIfNull(compiled);
        ArgumentNullException.ThrowIfNull(policy);
        using var time = new CancellationTokenSource(policy.RefutationDetailTime, clock);
        using var linked = CancellationTokenSource.CreateLinkedTokenSource(time.Token, cancellation);
        Counterexample? counterexample = null;
        RecoveredDifference? difference = null;
        try
        {
            counterexample = CounterexampleSearch.Find(compiled, policy.CounterexampleBudget, seed, linked.Token);
            difference = DifferenceRecovery.Recover(compiled, policy.DifferenceBudget, seed, linked.Token);
        }
        catch (OperationCanceledException) when (!cancellation.IsCancellationRequested)
        {
            // the time for details ran out: keep what was found
        }
        return counterexample is null && difference is null ? null : new RefutationDetails(counterexample, difference);
    }

    /// <summary>The counterexample's point as a JSON object, variable → integer as text, in the variables' order: <c>{"a":"1","b":"0"}</c>.</summary>
    public static string PointJson(Counterexample counterexample)
    {
        ArgumentNullException.ThrowIfNull(counterexample);
        var point = new System.Text.Json.Nodes.JsonObject();
        foreach (var (variable, value) in counterexample.Point)
            point[variable] = value.ToString(System.Globalization.CultureInfo.InvariantCulture);
        return point.ToJsonString();
    }
}
