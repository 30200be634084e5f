using System.Diagnostics;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;

namespace IdentityQueue.Benchmarks;

/// <summary>
/// Where a candidate's time goes outside the store and queue: parse, family expansion and compile, screening to 64 bits,
/// over every line of a catalogue file, one thread. Run: dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- pipeline FILE
/// </summary>
internal static class PipelineProfile
{
    public static void Run(string path)
    {
        var parse = new Stopwatch();
        var compile = new Stopwatch();
        var screen = new Stopwatch();
        var count = 0;
        var line = 0;
        foreach (var text in File.ReadLines(path))
        {
            line++;
            parse.Start();
            var parsed = CatalogueParser.ParseLine(text, line);
            parse.Stop();
            if (!parsed.Success || parsed.Value is null) continue;
            compile.Start();
            var family = FamilyExpander.Expand(parsed.Value);
            var programs = family.Success ? family.Instances.Select(p => IdentityCompiler.Compile(parsed.Value, p)).Where(c => c.Success).Select(c => c.Value!).ToList() : [];
            compile.Stop();
            screen.Start();
            foreach (var c in programs) { Screener.Screen(c, new ScreeningOptions { Seed = 1 }, (ulong)count); count++; }
            screen.Stop();
        }
        double Per(Stopwatch s) => s.Elapsed.TotalMicroseconds / Math.Max(1, count);
        Console.WriteLine($"{count} candidates: parse {Per(parse):F1} µs, expand+compile {Per(compile):F1} µs, screen {Per(screen):F1} µs per candidate; " +
            $"{count / (parse.Elapsed + compile.Elapsed + screen.Elapsed).TotalSeconds:F0} candidates/s on one thread");
    }
}
