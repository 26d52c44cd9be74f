namespace SenseSplit.Cli.IO;

/// <summary>Writes a file through a temporary sibling and renames it into place, so that readers never see a
/// half-written file and a failed or cancelled write leaves the old file (if any) untouched.</summary>
public static class AtomicFile
{
    public static void Write(string path, Action<Stream> write)
    {
        var full = Path.GetFullPath(path);
        var dir = Path.GetDirectoryName(full)!;
        var temp = Path.Combine(dir, $".{Path.GetFileName(full)}.partial-{Guid.NewGuid():N}");
        try
        {
            Directory.CreateDirectory(dir);
            using (var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16))
            {
                write(stream);
                stream.Flush(flushToDisk: true);
            }
            File.Move(temp, full, overwrite: true);
        }
        catch (Exception e)
        {
            TryDelete(temp);
            if (e is IOException or UnauthorizedAccessException)
                throw new UserFacingException($"{path}: cannot be written ({e.Message})", ExitCodes.WriteFailed);
            throw;
        }
    }

    private static void TryDelete(string path)
    {
        try { if (File.Exists(path)) File.Delete(path); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }
}
