using IdentityQueue.Screening.Ports;
using IdentityQueue.Store.Work;

namespace IdentityQueue.Store.Tests.Schema;

/// <summary>The queries of the project's contract check (shared/contract/check-contract.sh), on a store screened by the worker's calls.</summary>
public sealed class ContractQueriesTests
{
    [Fact]
    public void ContractCatalogue_ScreenedAndSaved_AnswersTheContractQueries()
    {
        using var store = TempStore.Create();
        Some.Catalogue(store, """
            two-squares: (a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2
            wrong: (x+y)^2 = x^2 + y^2
            binomial: sum(k in 0..n: binom(n,k)) = 2^n for n in 0..5
            broken: (x+1 = x
            """);
        var candidates = new CandidateStore(store.Connection);
        candidates.EnsureResultRows();
        var ids = candidates.PendingCandidateIds(100);
        candidates.MarkQueued(ids);
        candidates.Save(ids.Select(id => CandidateOutcome.Screened(id, Some.Screen(store, id))).ToList(), Some.Worker);

        var states = store.Rows("select label, state from verdicts where label in ('two-squares','wrong') order by label");
        Assert.Equal([["two-squares", "survived"], ["wrong", "refuted"]], states);
        Assert.Equal(1, store.Count("select count(*) from rejection"));
        Assert.Equal([6L, 6L], store.Rows("select instances, survived from families where family = 'binomial'")[0]);
    }
}
