using System.CommandLine;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit audit</c>: Split each glossary term into its senses and write reports for people (HTML) and for a search index (CSV, JSON).</summary>
public static class AuditCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("audit", "Split each glossary term into its senses and write reports for people (HTML) and for a search index (CSV, JSON).");
        command.SetAction(_ =>
        {
            context.Err.WriteLine("error: audit is not built yet");
            return ExitCodes.Internal;
        });
        return command;
    }
}
