using System.CommandLine;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit atoms</c>: learn a dictionary of discourse atoms from word vectors.</summary>
public static class AtomsCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("atoms", "Learn a dictionary of unit discourse atoms so that every word vector is a sparse combination of a few of them.");
        command.SetAction(_ =>
        {
            context.Err.WriteLine("error: atoms is not built yet");
            return ExitCodes.Internal;
        });
        return command;
    }
}
