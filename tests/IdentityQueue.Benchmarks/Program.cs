using BenchmarkDotNet.Running;

// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- --filter '*'   (add --job short for a quick run)
BenchmarkSwitcher.FromAssembly(typeof(IdentityQueue.Benchmarks.DeterminantBenchmarks).Assembly).Run(args);
