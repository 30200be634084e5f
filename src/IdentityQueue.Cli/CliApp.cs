using System.CommandLine;

namespace IdentityQueue.Cli;

/// <summary>Exit codes of SPEC §2.</summary>
public static class ExitCodes
{
    public const int Success = 0;
    /// <summary>The command ran and found a refutation or failure that it reports.</summary>
    public const int Found = 1;
    public const int BadInput = 2;
    public const int InternalError = 3;
    /// <summary><c>idq check</c>: undecided.</summary>
    public const int Undecided = 4;
}

/// <summary>The command line: builds the command tree and runs it with the exit codes of SPEC §2.</summary>
public static class CliApp
{
    public static int Run(string[] args, TextWriter output, TextWriter error)
    {
        var root = new RootCommand(
            "IdentityQueue screens conjectured identities by evaluating lhs - rhs at random points over finite fields.\n" +
            "A refuted identity comes with a witness anyone can re-check; a survivor is very likely true, with a\n" +
            "quantified error bound that is only as good as the degree bound behind it. Screening is evidence, not proof.");
        root.Subcommands.Add(CheckCommand.Create(output, error));
        root.Subcommands.Add(InitCommand.Create(output, error));
        root.Subcommands.Add(ImportCommand.Create(output, error));
        root.Subcommands.Add(RunCommands.Run(output, error));
        root.Subcommands.Add(RunCommands.Worker(output, error));
        root.Subcommands.Add(RunCommands.Enqueue(output, error));
        root.Subcommands.Add(QueryCommands.Status(output, error));
        root.Subcommands.Add(ShowCommands.Show(output, error));
        root.Subcommands.Add(ShowCommands.Recheck(output, error));
        root.Subcommands.Add(ExportCommand.Create(output, error));
        root.Subcommands.Add(QueryCommands.Sql(output, error));
        root.Subcommands.Add(CompareCommand.Create(output, error));
        root.Subcommands.Add(DemoCommand.Create(output, error));
        root.Subcommands.Add(Report.ReportCommand.Create(output, error));
        root.Subcommands.Add(BenchCommand.Create(output, error));

        var parse = root.Parse(args, new ParserConfiguration { ResponseFileTokenReplacer = null });
        if (parse.Errors.Count > 0 && parse.Action is not System.CommandLine.Help.HelpAction)
        {
            foreach (var e in parse.Errors) error.WriteLine($"idq: {e.Message}");
            error.WriteLine("Run 'idq --help' or 'idq COMMAND --help' for usage.");
            return ExitCodes.BadInput;
        }
        try
        {
            return parse.Invoke(new InvocationConfiguration { EnableDefaultExceptionHandler = false, Output = output, Error = error });
        }
        catch (Exception e) when (e is not OutOfMemoryException)
        {
            error.WriteLine($"idq: internal error: {e.GetType().Name}: {e.Message}");
            error.WriteLine(e.StackTrace);
            return ExitCodes.InternalError;
        }
    }
}
