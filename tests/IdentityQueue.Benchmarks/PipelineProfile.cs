using System.Diagnostics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Counterexamples;

namespace IdentityQueue.Benchmarks;

/// <summary>
/// Where a candidate's time goes outside the store and queue: parse, family expansion and compile, the first trial, screening
/// to 64 bits, and for refuted candidates the refutation details (the counterexample search and the difference recovery,
/// each timed alone), over every line of a catalogue file, one thread. The first pass over the file warms the JIT and is
/// not counted. Run: dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- pipeline FILE
/// </summary>
internal static class PipelineProfile
{
    public static void Run(string path)
    {
        Pass(path, Math.Min(2_000, File.ReadLines(path).Count()), print: false);
        Pass(path, int.MaxValue, print: true);
    }

    private static void Pass(string path, int maxLines, bool print)
    {
        var parse = new Stopwatch();
        var compile = new Stopwatch();
        var first = new Stopwatch();
        var screen = new Stopwatch();
        var search = new Stopwatch();
        var recover = new Stopwatch();
        int count = 0, line = 0, refuted = 0, withCounterexample = 0, withDifference = 0;
        var policy = ScreeningPolicy.Default;
        foreach (var text in File.ReadLines(path))
        {
            if (++line > maxLines) break;
            parse.Start();
            var parsed = CatalogueParser.ParseLine(text, line);
            parse.Stop();
            if (!parsed.Success || parsed.Value is null) continue;
            compile.Start();
            var family = FamilyExpander.Expand(parsed.Value);
            var programs = family.Success ? family.Instances.Select(p => IdentityCompiler.Compile(parsed.Value, p)).Where(c => c.Success).Select(c => c.Value!).ToList() : [];
            compile.Stop();
            foreach (var c in programs)
            {
                var key = (ulong)count;
                first.Start();
                Screener.Screen(c, new ScreeningOptions { Seed = 1, Policy = policy with { MaxTrials = 1 } }, key);
                first.Stop();
                screen.Start();
                var result = Screener.Screen(c, new ScreeningOptions { Seed = 1 }, key);
                screen.Stop();
                count++;
                if (result.Verdict != Verdict.Refuted) continue;
                refuted++;
                search.Start();
                var counterexample = CounterexampleSearch.Find(c, policy.CounterexampleBudget, key);
                search.Stop();
                recover.Start();
                var difference = DifferenceRecovery.Recover(c, policy.DifferenceBudget, key);
                recover.Stop();
                if (counterexample is not null) withCounterexample++;
                if (difference is not null) withDifference++;
            }
        }
        if (!print) return;
        double Per(Stopwatch s) => s.Elapsed.TotalMicroseconds / Math.Max(1, count);
        double PerRefuted(Stopwatch s) => s.Elapsed.TotalMicroseconds / Math.Max(1, refuted);
        Console.WriteLine($"{count} candidates: parse {Per(parse):F1} µs, expand+compile {Per(compile):F1} µs, first trial {Per(first):F1} µs, " +
            $"screen to 64 bits {Per(screen):F1} µs per candidate; {count / (parse.Elapsed + compile.Elapsed + screen.Elapsed).TotalSeconds:F0} candidates/s on one thread");
        Console.WriteLine($"{refuted} refuted: counterexample search {PerRefuted(search):F1} µs ({withCounterexample} found), " +
            $"difference recovery {PerRefuted(recover):F1} µs ({withDifference} recovered) per refuted candidate");
    }
}
