using System.CommandLine;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit senses</c>: Show the senses of one term.</summary>
public static class SensesCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("senses", "Show the senses of one term.");
        command.SetAction(_ =>
        {
            context.Err.WriteLine("error: senses is not built yet");
            return ExitCodes.Internal;
        });
        return command;
    }
}
