using SenseSplit.Cli;

namespace SenseSplit.Tests;

public class CliAppTests
{
    [Fact]
    public void Run_Help_ListsCommandsAndExitsZero()
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(["--help"], stdout, stderr);
        Assert.Equal(ExitCodes.Ok, code);
        Assert.Contains("atoms", stdout.ToString());
    }

    [Fact]
    public void Run_UnknownOption_ReturnsUsageError()
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(["atoms", "--no-such-option"], stdout, stderr);
        Assert.NotEqual(ExitCodes.Ok, code);
    }
}
