using System.CommandLine;
using System.Numerics;
using IdentityQueue.Algebra;
using IdentityQueue.Algebra.Compile;
using IdentityQueue.Algebra.Syntax;
using IdentityQueue.Screening;
using IdentityQueue.Screening.Catalogues;
using IdentityQueue.Screening.Counterexamples;

namespace IdentityQueue.Cli;

/// <summary><c>idq check "LHS = RHS"</c>: screens one identity (or one family line) with no store.</summary>
public static class CheckCommand
{
    public static Command Create(TextWriter output, TextWriter error)
    {
        var identity = new Argument<string>("identity")
        {
            Description = "The identity, in catalogue syntax: [label:] LHS = RHS [over FIELD] [for n in A..B]. Put '--' before it if it starts with '-'.",
        };
        var over = new Option<string?>("--over") { Description = "The field: Q (default), GF(p) or GF(p^k); overrides an 'over' clause." };
        var target = new Option<int>("--target-bits")
        {
            Description = "Evidence wanted: a false identity survives with probability at most 2^-B.",
            DefaultValueFactory = _ => EvidenceTarget.DefaultBits,
        };
        var seed = new Option<ulong?>("--seed") { Description = "Seed for the random primes and points (default: a fresh random seed, printed)." };
        var json = new Option<bool>("--json") { Description = "Print one JSON object instead of text." };
        var time = TimeOption();
        var noDetails = NoDetailsOption();
        var definitions = new Option<FileInfo?>("--definitions")
        {
            Description = "A catalogue file whose 'let' lines (definitions) the identity may use; its other lines are not read as identities.",
        };
        var command = new Command("check", "Screen one identity ad hoc, without a store. Exit 0 survived, 1 refuted, 2 invalid, 4 undecided.\n\n" +
            "Examples:\n" +
            "  idq check \"(a^2+b^2)*(c^2+d^2) = (a*c-b*d)^2 + (a*d+b*c)^2\"\n" +
            "  idq check \"(x+y)^7 = x^7 + y^7 over GF(7)\" --json\n" +
            "  idq check \"sum(k in 0..n: binom(n,k)) = 2^n for n in 0..10\" --seed 42\n" +
            "  idq check \"fib(n-1)*fib(n+1) - fib(n)^2 = (-1)^n for n in 1..30\"\n" +
            "  idq check \"det(matrix(i in 1..3, j in 1..3: h(i-j+1, x))) = s(x)\" --definitions schur.idq")
        {
            identity, over, target, seed, json, time, noDetails, definitions,
        };
        command.SetAction(parse =>
        {
            var evidence = EvidenceTarget.Create(parse.GetValue(target));
            if (!evidence.Success)
            {
                error.WriteLine($"idq check: {evidence.Error.Message}");
                return ExitCodes.BadInput;
            }
            var runSeed = RunSeed.Random();
            if (parse.GetValue(seed) is { } given)
            {
                var valid = RunSeed.FromUser(given);
                if (!valid.Success)
                {
                    error.WriteLine($"idq check: --seed: {valid.Error.Message}");
                    return ExitCodes.BadInput;
                }
                runSeed = valid.Value;
            }
            var budget = TimeBudget.Create(parse.GetValue(time));
            if (!budget.Success)
            {
                error.WriteLine($"idq check: {budget.Error.Message}");
                return ExitCodes.BadInput;
            }
            var options = new ScreeningOptions { Target = evidence.Value, Seed = runSeed.Value, Budget = budget.Value };
            if (parse.GetValue(noDetails)) options = options with { Policy = options.Policy with { RefutationDetails = false } };
            DefinitionScope? scope = null;
            if (parse.GetValue(definitions) is { } file)
            {
                var read = ReadDefinitions(file, options.Limits);
                if (!read.Success)
                {
                    error.WriteLine($"idq check: {read.Error.Message}");
                    return ExitCodes.BadInput;
                }
                scope = read.Value;
            }
            using var stop = new StopSignals();
            return Execute(parse.GetValue(identity) ?? "", parse.GetValue(over), options, parse.GetValue(json), output, error, scope, stop.Token);
        });
        return command;
    }

    /// <summary>One instance's outcome: its parameters, and a screen result or why it does not compile (with its position).</summary>
    internal sealed record InstanceOutcome(IReadOnlyDictionary<string, BigInteger> Parameters, Result<ScreenResult> Screen)
    {
        public ScreenResult? Result => Screen.Success ? Screen.Value : null;

        /// <summary>The compile error's text, or null when the instance was screened.</summary>
        public string? Invalid => Screen.Success ? null : Screen.Error.ToString();

        public Verdict Verdict => Result?.Verdict ?? Verdict.Invalid;

        /// <summary>For a refuted instance: its smallest counterexample and recovered difference, when found.</summary>
        public RefutationDetails? Details { get; init; }
    }

    /// <summary>The <c>--no-refutation-details</c> option of <c>check</c>, <c>run</c> and <c>worker</c>.</summary>
    internal static Option<bool> NoDetailsOption() => new("--no-refutation-details")
    {
        Description = "After a refutation, skip the search for the smallest integer counterexample and the recovery of lhs - rhs (each refuted candidate then costs only its trials).",
    };

    /// <summary>The <c>--time-per-candidate</c> option of <c>check</c>, <c>run</c> and <c>worker</c>.</summary>
    internal static Option<double> TimeOption() => new("--time-per-candidate")
    {
        HelpName = "SECONDS",
        Description = $"The time budget of one candidate (TimePerCandidate): a trial that cannot fit is not started, one running when it runs out is cancelled, and the candidate is undecided with the trials done kept. Between {TimeBudget.Min.TotalSeconds} and {TimeBudget.Max.TotalSeconds:F0}.",
        DefaultValueFactory = _ => TimeBudget.Default.PerCandidate.TotalSeconds,
    };

    /// <summary>The definitions (<c>let</c> lines) of a catalogue file, in order, or the problem when one is bad or the file cannot be read.</summary>
    internal static Result<DefinitionScope> ReadDefinitions(FileInfo file, Limits limits)
    {
        var scope = new DefinitionScope();
        string[] lines;
        try
        {
            lines = File.ReadAllLines(file.FullName);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return Result<DefinitionScope>.Fail($"--definitions: cannot read {file.FullName}: {e.Message}");
        }
        for (var i = 0; i < lines.Length; i++)
        {
            var first = 0;
            while (first < lines[i].Length && char.IsWhiteSpace(lines[i][first])) first++;
            if (!CatalogueParser.IsDefinition(lines[i], first)) continue;
            var parsed = CatalogueParser.ParseLine(lines[i], i + 1, limits, scope);
            if (!parsed.Success) return Result<DefinitionScope>.Fail($"--definitions {file.Name}: {parsed.Error}");
        }
        return Result<DefinitionScope>.Ok(scope);
    }

    internal static int Execute(string text, string? over, ScreeningOptions options, bool json, TextWriter output, TextWriter error,
        DefinitionScope? definitions = null, CancellationToken cancellation = default)
    {
        var parsed = CatalogueParser.ParseIdentity(text, options.Limits, definitions);
        if (!parsed.Success) return Invalid(text, parsed.Error!, json, output, error);
        var entry = parsed.Value;
        if (over is not null)
        {
            var field = CatalogueParser.ParseField(over);
            if (!field.Success) return Invalid(over, field.Error!, json, output, error, "--over");
            entry = entry with { Field = field.Value };
        }
        // An open-ended family ('for n >= A') is screened in increasing n, a chunk at a time, until the chunk of its first
        // refuted instance or the default open family budget.
        var open = OpenFamilyBudget.Default;
        var family = FamilyExpander.Expand(entry, options.Limits, entry.OpenParameter is null ? 1 : open.Instances);
        if (!family.Success) return Invalid(text, family.Error!, json, output, error);

        var outcomes = new List<InstanceOutcome>();
        foreach (var parameters in family.Instances)
        {
            if (entry.OpenParameter is not null && outcomes.Count % open.Chunk == 0 && outcomes.Any(o => o.Verdict == Verdict.Refuted)) break;
            var compiled = IdentityCompiler.Compile(entry, parameters, options.Limits);
            if (!compiled.Success)
            {
                outcomes.Add(new InstanceOutcome(parameters, compiled.Cast<ScreenResult>()));
                continue;
            }
            if (cancellation.IsCancellationRequested) break;
            // Say so before a long screen starts (a trial that does not fit the budget is settled at once with the same words).
            var estimate = Screener.Estimate(compiled.Value!, options);
            if (estimate.TooCostly is null && estimate.OneTrial > LongTrial)
                error.WriteLine($"idq check: one trial needs about {TrialCost.Log2Text(estimate.Cost.FieldOperations)} field operations ({estimate.Cost.Largest}), " +
                    $"about {estimate.OneTrial.TotalSeconds:F0} s on the {estimate.Rung} rung; the budget is {options.Budget} (Ctrl+C stops)");
            var key = CandidateKey.Of(entry, parameters);
            var result = Screener.Screen(compiled.Value!, options, key, cancellation: cancellation);
            if (result.Verdict == Verdict.Pending)
                result = result with
                {
                    Verdict = Verdict.Undecided,
                    Message = $"stopped by a signal after {result.TrialCount} trials, at 2^{result.ErrorBoundLog2 ?? 0:F1} of the target {options.Target}",
                };
            // Where and how a refuted identity fails: the smallest integer counterexample and lhs - rhs itself.
            var details = result.Verdict == Verdict.Refuted && options.Policy.RefutationDetails
                ? RefutationDetails.Find(compiled.Value!, options.Policy, key, options.Clock, cancellation)
                : null;
            outcomes.Add(new InstanceOutcome(parameters, Result<ScreenResult>.Ok(result)) { Details = details });
        }
        if (json) JsonReport.Write(output, entry, options, outcomes);
        else TextReport.Write(output, entry, options, outcomes);
        // Every invalid message on standard error, like a parse error (with the text and a caret for a single line).
        foreach (var o in outcomes.Where(o => o.Verdict == Verdict.Invalid))
            error.WriteLine($"idq check: invalid: {o.Invalid ?? o.Result?.Message}");
        if (outcomes is [{ Screen.Error.Position: { Line: 1, Column: >= 1 } at }] && !json && text.Length <= 200)
        {
            error.WriteLine($"  {text}");
            error.WriteLine($"  {new string(' ', Math.Min(at.Column - 1, text.Length))}^");
        }
        return ExitCode(outcomes.Select(o => o.Verdict));
    }

    /// <summary>A trial estimated longer than this is announced on standard error before it starts.</summary>
    private static readonly TimeSpan LongTrial = TimeSpan.FromSeconds(2);

    internal static int ExitCode(IEnumerable<Verdict> verdicts)
    {
        var all = verdicts.ToList();
        if (all.Contains(Verdict.Refuted)) return ExitCodes.Found;
        if (all.Contains(Verdict.Invalid)) return ExitCodes.BadInput;
        if (all.Contains(Verdict.Undecided)) return ExitCodes.Undecided;
        return ExitCodes.Success;
    }

    private static int Invalid(string text, Diagnostic diagnostic, bool json, TextWriter output, TextWriter error, string? what = null)
    {
        var message = what is null ? diagnostic.ToString() : $"{what}: {diagnostic}";
        if (json) JsonReport.WriteInvalid(output, message);
        else
        {
            error.WriteLine($"idq check: invalid: {message}");
            if (text.Length <= 200 && diagnostic.Position.Line == 1 && diagnostic.Position.Column >= 1)
            {
                error.WriteLine($"  {text}");
                error.WriteLine($"  {new string(' ', Math.Min(diagnostic.Position.Column - 1, text.Length))}^");
            }
        }
        return ExitCodes.BadInput;
    }
}
