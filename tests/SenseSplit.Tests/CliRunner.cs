namespace SenseSplit.Tests;

public static class CliRunner
{
    public static (int code, string stdout, string stderr) Run(params string[] args)
    {
        var o = new StringWriter();
        var e = new StringWriter();
        int code = SenseSplit.Cli.CliApp.Run(args, o, e);
        return (code, o.ToString(), e.ToString());
    }
}
