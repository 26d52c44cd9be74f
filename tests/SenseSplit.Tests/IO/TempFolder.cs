namespace SenseSplit.Tests.IO;

/// <summary>A fresh folder under the system temp folder for one test; deleted on dispose.</summary>
public sealed class TempFolder : IDisposable
{
    public TempFolder()
    {
        Path = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "sensesplit-tests-" + Guid.NewGuid().ToString("N")[..12]);
        Directory.CreateDirectory(Path);
    }

    public string Path { get; }

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public string Write(string name, string content)
    {
        var p = File(name);
        System.IO.File.WriteAllText(p, content, new System.Text.UTF8Encoding(false));
        return p;
    }

    public string WriteBytes(string name, byte[] content)
    {
        var p = File(name);
        System.IO.File.WriteAllBytes(p, content);
        return p;
    }

    /// <summary>Names of everything in the folder (files and folders, including hidden ones).</summary>
    public string[] Entries() => Directory.EnumerateFileSystemEntries(Path).Select(System.IO.Path.GetFileName).OrderBy(n => n, StringComparer.Ordinal).ToArray()!;

    public static string Fixture(string name) => System.IO.Path.Combine(AppContext.BaseDirectory, "TestData", "io", name);

    public void Dispose()
    {
        try { Directory.Delete(Path, recursive: true); }
        catch (IOException) { }
    }
}
