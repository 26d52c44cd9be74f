namespace SenseSplit.Tests;

/// <summary>A fresh folder under the system temp path, deleted on dispose.</summary>
public sealed class TempFolder : IDisposable
{
    public string Path { get; } = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "sensesplit-test-" + Guid.NewGuid().ToString("N")[..12]);

    public TempFolder() => Directory.CreateDirectory(Path);

    public string File(string name, string? content = null)
    {
        string p = System.IO.Path.Combine(Path, name);
        if (content is not null) System.IO.File.WriteAllText(p, content);
        return p;
    }

    public void Dispose()
    {
        try { Directory.Delete(Path, true); } catch (IOException) { } catch (UnauthorizedAccessException) { }
    }
}

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
