using System.CommandLine;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit tag</c>: Assign each occurrence of a glossary term in text read from standard input to one of its senses (JSON lines).</summary>
public static class TagCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("tag", "Assign each occurrence of a glossary term in text read from standard input to one of its senses (JSON lines).");
        command.SetAction(_ =>
        {
            context.Err.WriteLine("error: tag is not built yet");
            return ExitCodes.Internal;
        });
        return command;
    }
}
