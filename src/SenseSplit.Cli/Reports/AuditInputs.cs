using System.Text;
using System.Security.Cryptography;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary>A corpus document: where it came from, its text and where its lines start (for line numbers).</summary>
public sealed record CorpusDocument(string Source, string Text)
{
    private int[]? _lineStarts;

    /// <summary>1-based line of UTF-16 index <paramref name="charIndex"/>.</summary>
    public int LineOf(int charIndex)
    {
        _lineStarts ??= LineStarts(Text);
        int i = Array.BinarySearch(_lineStarts, charIndex);
        return (i >= 0 ? i : ~i - 1) + 1;
    }

    private static int[] LineStarts(string text)
    {
        var starts = new List<int> { 0 };
        for (int i = 0; i < text.Length; i++) if (text[i] == '\n') starts.Add(i + 1);
        return starts.ToArray();
    }
}

/// <summary>Loading and checking what the audit, senses and tag commands read.</summary>
public static class AuditInputs
{
    /// <summary>Loads a model folder and, when <paramref name="vectorsFile"/> is given, checks that the model was learned
    /// from that file (SHA-256 against the manifest).</summary>
    public static ModelContent LoadModel(string directory, string? vectorsFile)
    {
        if (!Directory.Exists(directory)) throw new UserFacingException($"{directory}: model folder not found");
        var model = ModelFolder.Load(directory);
        if (vectorsFile is not null) CheckVectors(model.Manifest, directory, vectorsFile);
        return model;
    }

    /// <summary>Throws when the SHA-256 of <paramref name="vectorsFile"/> differs from <see cref="ModelManifest.VectorsSha256"/>.</summary>
    public static void CheckVectors(ModelManifest manifest, string modelDirectory, string vectorsFile)
    {
        if (!File.Exists(vectorsFile)) throw new UserFacingException($"{vectorsFile}: vectors file not found");
        string actual;
        using (var stream = File.OpenRead(vectorsFile)) actual = Convert.ToHexString(SHA256.HashData(stream));
        if (string.IsNullOrEmpty(manifest.VectorsSha256))
            throw new UserFacingException($"{modelDirectory}: the manifest records no SHA-256 of its vectors file, so it cannot be checked against {vectorsFile}");
        if (!string.Equals(actual, manifest.VectorsSha256, StringComparison.OrdinalIgnoreCase))
            throw new UserFacingException($"{vectorsFile}: this vectors file (SHA-256 {actual[..12].ToLowerInvariant()}…) is not the one the model in {modelDirectory} was learned from " +
                $"({(manifest.VectorsFile.Length > 0 ? manifest.VectorsFile + ", " : "")}SHA-256 {manifest.VectorsSha256[..Math.Min(12, manifest.VectorsSha256.Length)].ToLowerInvariant()}…); " +
                "learn atoms from this file first, or pass the model learned from it");
    }

    /// <summary>Reads the audit corpus: files as given, folders searched recursively for <c>*.txt</c> and
    /// <c>*.txt.gz</c> (as <c>embed</c> does), gzip recognised by its magic bytes; each file is one document.</summary>
    public static IReadOnlyList<CorpusDocument> ReadCorpus(IReadOnlyList<string> files, CliContext context)
    {
        if (files.Contains("-")) throw new UserFacingException("--corpus: standard input ('-') is not supported here; name files or folders", ExitCodes.Usage);
        foreach (var f in files)
            if (!File.Exists(f) && !Directory.Exists(f)) throw new UserFacingException($"{f}: corpus file or folder not found");
        var docs = new List<CorpusDocument>();
        foreach (var input in CorpusSource.Resolve(files, () => Stream.Null, Path.GetTempPath()))
        {
            string text;
            try
            {
                using var file = File.OpenRead(input.Path);
                using Stream stream = input.Gzip ? new System.IO.Compression.GZipStream(file, System.IO.Compression.CompressionMode.Decompress) : file;
                using var reader = new StreamReader(stream, new UTF8Encoding(false), detectEncodingFromByteOrderMarks: true);
                text = reader.ReadToEnd();
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or InvalidDataException)
            {
                throw new UserFacingException($"{input.Name}: cannot read the corpus file ({ex.Message})");
            }
            if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
            if (string.IsNullOrWhiteSpace(text)) context.Warn($"{input.Name}: the corpus file is empty");
            docs.Add(new CorpusDocument(input.Name, text));
        }
        return docs;
    }

    public static SenseModel BuildSenseModel(ModelContent model, SenseOptions options)
        => SenseModel.Build(model.Vectors, model.Atoms, model.AtomCount, model.Codes, model.Counts, options);

    /// <summary>Throws (before any long computation) when <paramref name="directory"/> may not be replaced: it is a file,
    /// or an existing folder holding anything but <paramref name="ownFiles"/> (an earlier output of the same command).
    /// Replacing a folder deletes what it holds, so a folder of other files is never taken for an output.</summary>
    public static void CheckOutputFolder(string directory, IReadOnlyCollection<string> ownFiles)
    {
        var full = Path.GetFullPath(directory);
        if (File.Exists(full))
            throw new UserFacingException($"{directory}: is a file; the output must be a folder", ExitCodes.WriteFailed);
        if (!Directory.Exists(full)) { OutputProbe.EnsureParentWritable(directory); return; }
        var foreign = Directory.EnumerateFileSystemEntries(full).Select(Path.GetFileName)
            .Where(n => n is not null && !ownFiles.Contains(n, StringComparer.Ordinal)).Order(StringComparer.Ordinal).Take(3).ToArray();
        if (foreign.Length > 0)
            throw new UserFacingException($"{directory}: exists and holds other files ({string.Join(", ", foreign)}); refusing to replace it (choose a new or empty folder, or one written by this command)", ExitCodes.WriteFailed);
        OutputProbe.EnsureParentWritable(directory);
    }

    /// <summary>Writes a folder atomically: <paramref name="write"/> fills a temporary folder beside
    /// <paramref name="directory"/>, which then replaces it.</summary>
    public static void WriteFolderAtomically(string directory, Action<string> write)
    {
        var full = Path.GetFullPath(directory).TrimEnd(Path.DirectorySeparatorChar);
        var parent = Path.GetDirectoryName(full) ?? ".";
        var name = Path.GetFileName(full);
        string tmp = Path.Combine(parent, $".{name}.tmp-{Environment.ProcessId}-{Guid.NewGuid():N}");
        try
        {
            Directory.CreateDirectory(parent);
            Directory.CreateDirectory(tmp);
            write(tmp);
            if (Directory.Exists(full))
            {
                string old = Path.Combine(parent, $".{name}.old-{Guid.NewGuid():N}");
                Directory.Move(full, old);
                Directory.Move(tmp, full);
                Directory.Delete(old, true);
            }
            else Directory.Move(tmp, full);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            TryDelete(tmp);
            throw new UserFacingException($"{directory}: cannot write the output folder ({ex.Message})", ExitCodes.WriteFailed);
        }
        catch
        {
            TryDelete(tmp);
            throw;
        }
    }

    private static void TryDelete(string dir)
    {
        try { if (Directory.Exists(dir)) Directory.Delete(dir, true); } catch (IOException) { } catch (UnauthorizedAccessException) { }
    }
}
