using BenchmarkDotNet.Running;

// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- --filter '*'   (add --job short for a quick run)
// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- pipeline FILE  (parse / compile / screen per candidate)
// dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- bigpoly [TERMS ...]  (expanded polynomials, 10^3..10^6 terms)
if (args is ["pipeline", var file]) IdentityQueue.Benchmarks.PipelineProfile.Run(file);
else if (args is ["bigpoly", .. var sizes]) IdentityQueue.Benchmarks.BigPolynomialScaling.Run(sizes);
else if (args is ["bigpoly-one", var size]) IdentityQueue.Benchmarks.BigPolynomialScaling.RunOne(int.Parse(size, System.Globalization.CultureInfo.InvariantCulture));
else BenchmarkSwitcher.FromAssembly(typeof(IdentityQueue.Benchmarks.DeterminantBenchmarks).Assembly).Run(args);
