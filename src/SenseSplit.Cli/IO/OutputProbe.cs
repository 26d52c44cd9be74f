namespace SenseSplit.Cli.IO;

/// <summary>Checks, before a long run, that an output folder's parent can be written: creates the parent if needed and
/// writes and deletes a small probe file there. A run that would fail only when writing its results fails at once.</summary>
public static class OutputProbe
{
    public static void EnsureParentWritable(string directory)
    {
        var full = Path.GetFullPath(directory).TrimEnd(Path.DirectorySeparatorChar);
        var parent = Path.GetDirectoryName(full) ?? ".";
        string probe = Path.Combine(parent, $".sensesplit-probe-{Environment.ProcessId}-{Guid.NewGuid():N}");
        try
        {
            Directory.CreateDirectory(parent);
            using (File.Create(probe, 1, FileOptions.DeleteOnClose)) { }
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new UserFacingException($"{directory}: the output folder cannot be written ({ex.Message})", ExitCodes.WriteFailed);
        }
        finally
        {
            try { if (File.Exists(probe)) File.Delete(probe); } catch (IOException) { } catch (UnauthorizedAccessException) { }
        }
    }
}
