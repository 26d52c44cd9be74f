using System.CommandLine;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit embed</c>: Train word vectors from a raw corpus: co-occurrence counts, PPMI, truncated randomized SVD.</summary>
public static class EmbedCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("embed", "Train word vectors from a raw corpus: co-occurrence counts, PPMI, truncated randomized SVD.");
        command.SetAction(_ =>
        {
            context.Err.WriteLine("error: embed is not built yet");
            return ExitCodes.Internal;
        });
        return command;
    }
}
