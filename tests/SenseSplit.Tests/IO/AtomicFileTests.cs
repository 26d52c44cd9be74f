using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.IO;

public class AtomicFileTests
{
    [Fact]
    public void Write_FailureMidway_OldFileUntouchedAndNoTemporaryLeft()
    {
        using var t = new TempFolder();
        var path = t.Write("out.txt", "old content");
        Assert.Throws<InvalidOperationException>(() => AtomicFile.Write(path, s =>
        {
            s.Write("half of the new"u8);
            throw new InvalidOperationException("disk on fire");
        }));
        Assert.Equal("old content", File.ReadAllText(path));
        Assert.Equal(["out.txt"], t.Entries());
    }

    [Fact]
    public void Write_Success_ReplacesContentAndCreatesFolders()
    {
        using var t = new TempFolder();
        var path = Path.Combine(t.Path, "sub", "dir", "out.bin");
        AtomicFile.Write(path, s => s.Write([1, 2, 3]));
        AtomicFile.Write(path, s => s.Write([4, 5]));
        Assert.Equal([4, 5], File.ReadAllBytes(path));
        Assert.Equal(["out.bin"], Directory.GetFileSystemEntries(Path.GetDirectoryName(path)!).Select(Path.GetFileName));
    }
}
