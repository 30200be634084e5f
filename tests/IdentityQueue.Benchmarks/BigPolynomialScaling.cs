using System.Diagnostics;
using System.Globalization;
using System.Text;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;

namespace IdentityQueue.Benchmarks;

/// <summary>
/// Issue #18: how parse, compile, one trial, screening to 2^-64 and peak memory grow with the number of terms of an expanded
/// polynomial (10^3 … 10^6 terms in 8 variables) compared with its compact form, a product of two random polynomials (see
/// <see cref="Identity"/>); the identity is true, so it survives and every trial runs in full.
/// Each size runs in a fresh process, so that the peak working set is that size's own; the growth exponent is the slope of
/// log(time) on log(terms) between the two largest sizes and by least squares over all.
/// Run: dotnet run -c Release --project tests/IdentityQueue.Benchmarks -- bigpoly [TERMS ...]
/// </summary>
internal static class BigPolynomialScaling
{
    private static readonly string[] Columns = ["parse", "compile", "trial", "screen"];

    public static void Run(string[] sizes)
    {
        var terms = sizes.Length > 0 ? sizes.Select(s => int.Parse(s, CultureInfo.InvariantCulture)).ToArray() : [1_000, 10_000, 100_000, 1_000_000];
        var rows = new List<double[]>();
        Console.WriteLine("| terms | line (MB) | parse (CPU s) | compile (CPU s) | instructions | one trial (CPU s) | screen to 2^-64 (CPU s) | peak working set (MB) |");
        Console.WriteLine("| ---: | ---: | ---: | ---: | ---: | ---: | ---: | ---: |");
        foreach (var n in terms)
        {
            var start = new ProcessStartInfo(Environment.ProcessPath!, ["bigpoly-one", n.ToString(CultureInfo.InvariantCulture)]) { RedirectStandardOutput = true };
            if (Path.GetFileNameWithoutExtension(Environment.ProcessPath) == "dotnet") start.ArgumentList.Insert(0, typeof(BigPolynomialScaling).Assembly.Location);
            using var child = Process.Start(start)!;
            var line = child.StandardOutput.ReadToEnd().Trim();
            child.WaitForExit();
            var v = line.Split(' ').Select(s => double.Parse(s, CultureInfo.InvariantCulture)).ToArray();
            rows.Add(v);
            Console.WriteLine($"| {v[0]:N0} | {v[1]:F1} | {v[2]:F3} | {v[3]:F3} | {v[4]:N0} | {v[5]:F3} | {v[6]:F3} | {v[7]:F0} |");
        }
        if (rows.Count < 2) return;
        var x = rows.Select(r => Math.Log(r[0])).ToArray();
        string Slopes(int column)
        {
            var y = rows.Select(r => Math.Log(Math.Max(r[column], 1e-6))).ToArray();
            var last = (y[^1] - y[^2]) / (x[^1] - x[^2]);
            var mx = x.Average();
            var my = y.Average();
            var all = x.Zip(y).Sum(p => (p.First - mx) * (p.Second - my)) / x.Sum(v => (v - mx) * (v - mx));
            return $"{last:F2} (last two sizes), {all:F2} (all)";
        }
        Console.WriteLine();
        Console.WriteLine($"growth exponents: parse {Slopes(2)}; compile {Slopes(3)}; instructions {Slopes(4)}; one trial {Slopes(5)}; screen {Slopes(6)}; peak memory {Slopes(7)}");
    }

    /// <summary>
    /// One size, in this process: prints "terms lineMB parse compile instructions trial screen peakMB", the times in CPU seconds of
    /// the process (its GC threads included), which a loaded shared machine disturbs less than wall time.
    /// </summary>
    public static void RunOne(int n)
    {
        var (text, terms) = Identity(n);
        // The default MaxProgramSize (4,000,000 instructions) is lifted for the 10^6-term size (about 10^7 instructions).
        var limits = Algebra.Limits.Default with { MaxProgramSize = 32_000_000 };
        var process = Process.GetCurrentProcess();
        double Cpu()
        {
            process.Refresh();
            return process.TotalProcessorTime.TotalSeconds;
        }
        var t0 = Cpu();
        var parsed = CatalogueParser.ParseIdentity(text, limits);
        var parse = Cpu() - t0;
        if (!parsed.Success) throw new InvalidOperationException(parsed.Error!.ToString());
        t0 = Cpu();
        var compiled = IdentityCompiler.Compile(parsed.Value, null, limits);
        var compile = Cpu() - t0;
        if (!compiled.Success) throw new InvalidOperationException(compiled.Error!.ToString());
        var identity = compiled.Value!;
        var options = new ScreeningOptions { Seed = 1, Limits = limits };
        var rung = FieldLadder.Choose(identity, FieldLadder.Rungs(identity.Field, options.Limits.MaxFieldBits), 0, options.Policy.MinBitsPerTrial)!;
        t0 = Cpu();
        var trial = TrialRunner.Run(identity, rung, 1, 12345);
        var trialTime = Cpu() - t0;
        if (trial.Outcome != TrialOutcome.Zero) throw new InvalidOperationException($"the trial gave {trial.Outcome}");
        t0 = Cpu();
        var result = Screener.Screen(identity, options, 1);
        var screen = Cpu() - t0;
        if (result.Verdict != Verdict.Survived) throw new InvalidOperationException($"{result.Verdict}: {result.Message}");
        GC.KeepAlive(parsed);
        process.Refresh();
        var peak = process.PeakWorkingSet64 / 1e6;
        Console.WriteLine(string.Join(' ', new[] { terms, text.Length / 1e6, parse, compile, identity.Program.Length, trialTime, screen, peak }
            .Select(v => v.ToString("R", CultureInfo.InvariantCulture))));
    }

    /// <summary>
    /// "expanded = compact": f·g expanded (at least <paramref name="n"/> terms, in descending order of exponent vectors, as a
    /// computer algebra system lists them) against (f)*(g), with f and g random polynomials of about √n terms each in 8
    /// variables, exponents 0..3 and coefficients ±1..99 (fixed seed). Returns the line and the expansion's number of terms.
    /// </summary>
    public static (string Text, int Terms) Identity(int n)
    {
        var random = new Random(20261204);
        var side = (int)Math.Sqrt(n) + 2;
        while (true)
        {
            var f = RandomPolynomial(random, side);
            var g = RandomPolynomial(random, side);
            var product = new Dictionary<ulong, long>();
            foreach (var (a, x) in f)
                foreach (var (b, y) in g)
                    product[a + b] = product.GetValueOrDefault(a + b) + x * y; // exponents are 4-bit fields: no carries (3 + 3 < 16)
            var terms = product.Where(t => t.Value != 0).OrderByDescending(t => t.Key).ToList();
            if (terms.Count >= n) return ($"{Text(terms)} = ({Text(f.OrderByDescending(t => t.Key))})*({Text(g.OrderByDescending(t => t.Key))})", terms.Count);
            side++;
        }
    }

    private static Dictionary<ulong, long> RandomPolynomial(Random random, int terms)
    {
        var p = new Dictionary<ulong, long>();
        while (p.Count < terms)
        {
            ulong monomial = 0;
            for (var v = 0; v < 8; v++) monomial |= (ulong)random.Next(0, 4) << (4 * (7 - v));
            p[monomial] = random.Next(1, 100) * (random.Next(2) == 0 ? -1 : 1);
        }
        return p;
    }

    private static string Text(IEnumerable<KeyValuePair<ulong, long>> terms)
    {
        var text = new StringBuilder();
        foreach (var (monomial, c) in terms)
        {
            text.Append(text.Length == 0 ? (c < 0 ? "-" : "") : c < 0 ? " - " : " + ");
            var magnitude = Math.Abs(c);
            var factors = 0;
            if (magnitude != 1 || monomial == 0) { text.Append(magnitude); factors++; }
            for (var v = 0; v < 8; v++)
            {
                var e = (int)(monomial >> (4 * (7 - v))) & 15;
                if (e == 0) continue;
                if (factors++ > 0) text.Append('*');
                text.Append('x').Append(v + 1);
                if (e > 1) text.Append('^').Append(e);
            }
        }
        return text.ToString();
    }
}
