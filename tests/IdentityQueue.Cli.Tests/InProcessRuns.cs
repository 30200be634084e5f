namespace IdentityQueue.Cli.Tests;

/// <summary>
/// Test classes that run <c>idq run</c> or <c>idq demo</c> inside the test process. Hangfire keeps its job storage in
/// process-wide state, so two in-process batches at once can hand one server the other's queue and leave it running;
/// these classes therefore run one at a time, after the parallel ones.
/// </summary>
[CollectionDefinition(Name, DisableParallelization = true)]
public sealed class InProcessRuns
{
    public const string Name = "in-process runs";
}
