using BenchmarkDotNet.Running;

// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- --filter '*'   (add --job short for a quick run)
// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- pipeline FILE  (parse / compile / screen per candidate)
if (args is ["pipeline", var file]) IdentityQueue.Benchmarks.PipelineProfile.Run(file);
else BenchmarkSwitcher.FromAssembly(typeof(IdentityQueue.Benchmarks.DeterminantBenchmarks).Assembly).Run(args);
