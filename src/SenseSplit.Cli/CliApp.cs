using System.CommandLine;
using SenseSplit.Cli.Commands;

namespace SenseSplit.Cli;

/// <summary>Builds the command tree and runs it; used by Main and by in-process tests.</summary>
public static class CliApp
{
    public static readonly Option<bool> VerboseOption = new("--verbose") { Description = "Print stack traces of unexpected errors.", Recursive = true };

    public static RootCommand Build(CliContext context)
    {
        var root = new RootCommand("SenseSplit: find which terms of a corpus carry several senses, and check that an embedding keeps senses apart.");
        root.Options.Add(VerboseOption);
        root.Subcommands.Add(EmbedCommand.Create(context));
        root.Subcommands.Add(AtomsCommand.Create(context));
        root.Subcommands.Add(AuditCommand.Create(context));
        root.Subcommands.Add(SensesCommand.Create(context));
        root.Subcommands.Add(TagCommand.Create(context));
        root.Subcommands.Add(MergeTestCommand.Create(context));
        root.Subcommands.Add(DemoCommand.Create(context));
        return root;
    }

    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        var context = new CliContext(stdout, stderr);
        var root = Build(context);
        var parse = root.Parse(args);
        context.Verbose = parse.GetValue(VerboseOption);
        try
        {
            int code = parse.Invoke(new InvocationConfiguration { Output = stdout, Error = stderr, EnableDefaultExceptionHandler = false });
            // The parser reports its own errors (unknown option, missing value) with exit code 1; ours is Usage.
            return parse.Errors.Count > 0 && code != ExitCodes.Ok ? ExitCodes.Usage : code;
        }
        catch (Exception ex)
        {
            return Report(context, ex);
        }
    }

    /// <summary>Turns an exception escaping a command into one line on stderr and a named exit code.</summary>
    public static int Report(CliContext context, Exception ex)
    {
        switch (ex)
        {
            case UserFacingException u:
                context.Err.WriteLine($"error: {u.Message}");
                return u.ExitCode;
            case OperationCanceledException:
                context.Err.WriteLine("cancelled");
                return ExitCodes.Cancelled;
            case ArgumentException a:
                context.Err.WriteLine($"error: {a.Message}");
                if (context.Verbose) context.Err.WriteLine(a.ToString());
                return ExitCodes.Usage;
            default:
                context.Err.WriteLine($"internal error: {ex.GetType().Name}: {ex.Message}");
                if (context.Verbose) context.Err.WriteLine(ex.ToString());
                else context.Err.WriteLine("(run again with --verbose for the stack trace)");
                return ExitCodes.Internal;
        }
    }
}
