using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.IO;

/// <summary>What <c>manifest.json</c> of a model folder records. Fields may be added; none removed or renamed.</summary>
public sealed record ModelManifest
{
    public int FormatVersion { get; init; } = 1;
    public string Tool { get; init; } = "sensesplit";
    public string VectorsFile { get; init; } = "";
    /// <summary>SHA-256 (hex) of the vectors file the model was learned from.</summary>
    public string VectorsSha256 { get; init; } = "";
    public int Words { get; init; }
    public int Dimensions { get; init; }
    public int Atoms { get; init; }
    public int Sparsity { get; init; }
    public int Seed { get; init; }
    public bool HasCounts { get; init; }
    public double[] ErrorPerRound { get; init; } = [];
    public int RoundsRun { get; init; }
    public bool Converged { get; init; }
    public string StopReason { get; init; } = "";

    // Added by the atoms command (format version 1).
    /// <summary>Version of the tool that wrote the folder.</summary>
    public string ToolVersion { get; init; } = "";
    /// <summary>UTC time the model was written, ISO 8601.</summary>
    public string CreatedUtc { get; init; } = "";
    /// <summary>"text", "text+gzip", "npy" or "npy+gzip".</summary>
    public string VectorsFormat { get; init; } = "";
    /// <summary>Words file given with .npy vectors ("" for text input).</summary>
    public string WordsFile { get; init; } = "";
    /// <summary>Counts file given with --counts ("" when none).</summary>
    public string CountsFile { get; init; } = "";
    /// <summary>Rows in the vectors file before zero vectors and repeated words were skipped.</summary>
    public long RowsInFile { get; init; }
    public int ZeroRowsSkipped { get; init; }
    public int DuplicateRowsSkipped { get; init; }
    /// <summary>Most learning rounds allowed (--rounds).</summary>
    public int MaxRounds { get; init; }
    /// <summary>Relative error improvement below which learning stops (--tolerance).</summary>
    public double Tolerance { get; init; }
    /// <summary>Worker threads used (results do not depend on it).</summary>
    public int Threads { get; init; }
    /// <summary>Top principal components removed after mean removal (--remove-top); 0 means neither was done.</summary>
    public int RemoveTop { get; init; }
    /// <summary>Whether the mean vector was subtracted before learning (done exactly when RemoveTop &gt; 0).</summary>
    public bool MeanRemoved { get; init; }
    /// <summary>Rows of vectors.npy have unit Euclidean length (always true for models written by atoms).</summary>
    public bool RowsNormalized { get; init; } = true;
    public int[] ReplacedPerRound { get; init; } = [];
    public ModelTimings Timings { get; init; } = new();
}

/// <summary>Wall-clock seconds of each stage of the atoms command.</summary>
public sealed record ModelTimings
{
    public double ReadSeconds { get; init; }
    public double PrepareSeconds { get; init; }
    public double LearnSeconds { get; init; }
}

/// <summary>A loaded model folder: the (normalised) coded vectors, the atoms (AtomCount×Dimensions, unit rows),
/// every word's code, and word counts when the model was built with them (same order as the words).</summary>
public sealed record ModelContent(ModelManifest Manifest, WordVectors Vectors, float[] Atoms, int AtomCount, SparseCodes Codes, long[]? Counts);

/// <summary>
/// The model folder: everything later commands need, so they take only <c>--model DIR</c>.
/// Files: <c>manifest.json</c>, <c>words.txt</c>, <c>vectors.npy</c> (Words×Dimensions float32), <c>atoms.npy</c>
/// (Atoms×Dimensions float32), <c>codes.npy</c> (Words×Sparsity int32 atom ids, -1 = unused slot),
/// <c>weights.npy</c> (Words×Sparsity float32) and, with counts, <c>counts.tsv</c>. See docs/file-formats.md.
/// </summary>
public static class ModelFolder
{
    public const string ManifestFile = "manifest.json";
    public const string WordsFile = "words.txt";
    public const string VectorsFile = "vectors.npy";
    public const string AtomsFile = "atoms.npy";
    public const string CodesFile = "codes.npy";
    public const string WeightsFile = "weights.npy";
    public const string CountsFile = "counts.tsv";

    internal static readonly JsonSerializerOptions Json = new()
    {
        PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
        WriteIndented = true,
        NumberHandling = JsonNumberHandling.AllowNamedFloatingPointLiterals,
        // Keep paths, versions ("1.0+abc") and non-ASCII file names readable; the manifest is never embedded in HTML.
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    /// <summary>Throws (before any long computation) when <paramref name="directory"/> could not be replaced:
    /// it is a file, or an existing folder that is neither empty nor a model folder.</summary>
    public static void CheckTarget(string directory)
    {
        var full = Path.GetFullPath(directory);
        if (File.Exists(full))
            throw new UserFacingException($"{directory}: is a file; the model output must be a folder", ExitCodes.WriteFailed);
        if (Directory.Exists(full) && Directory.EnumerateFileSystemEntries(full).Any() && !File.Exists(Path.Combine(full, ManifestFile)))
            throw new UserFacingException($"{directory}: exists and is not a model folder (no {ManifestFile}); refusing to replace it", ExitCodes.WriteFailed);
        OutputProbe.EnsureParentWritable(directory);
    }

    /// <summary>Writes a model folder atomically (temporary folder beside <paramref name="directory"/>, then rename).</summary>
    /// <remarks>All files go into a hidden sibling folder first. Only when that is complete is an existing model
    /// folder at <paramref name="directory"/> renamed aside, the new one renamed into place, and the old one deleted.
    /// A failure or cancellation before that point deletes the partial folder and leaves the old model untouched.</remarks>
    public static void Write(string directory, ModelContent model) => Write(directory, model, CancellationToken.None);

    public static void Write(string directory, ModelContent model, CancellationToken cancellation)
    {
        Validate(model);
        CheckTarget(directory);
        var full = Path.GetFullPath(directory).TrimEnd(Path.DirectorySeparatorChar, Path.AltDirectorySeparatorChar);
        var parent = Path.GetDirectoryName(full) ?? throw new UserFacingException($"{directory}: cannot write a model at a file-system root", ExitCodes.WriteFailed);
        var name = Path.GetFileName(full);
        var id = Guid.NewGuid().ToString("N")[..12];
        var temp = Path.Combine(parent, $".{name}.partial-{id}");
        var aside = Path.Combine(parent, $".{name}.previous-{id}");
        try
        {
            Directory.CreateDirectory(parent);
            Directory.CreateDirectory(temp);
            var m = model.Manifest;
            var v = model.Vectors;
            WriteFile(temp, WordsFile, s => WordListFile.Write(s, v.Words));
            cancellation.ThrowIfCancellationRequested();
            WriteFile(temp, VectorsFile, s => NpyFile.WriteMatrix<float>(s, v.Values, v.Count, v.Dimensions));
            cancellation.ThrowIfCancellationRequested();
            WriteFile(temp, AtomsFile, s => NpyFile.WriteMatrix<float>(s, model.Atoms, model.AtomCount, v.Dimensions));
            WriteFile(temp, CodesFile, s => NpyFile.WriteMatrix<int>(s, model.Codes.AtomIds, model.Codes.Rows, model.Codes.Sparsity));
            WriteFile(temp, WeightsFile, s => NpyFile.WriteMatrix<float>(s, model.Codes.Weights, model.Codes.Rows, model.Codes.Sparsity));
            if (model.Counts is { } counts) WriteFile(temp, CountsFile, s => IO.CountsFile.Write(s, v.Words, counts));
            cancellation.ThrowIfCancellationRequested();
            // The manifest goes last: a folder with a manifest is a complete folder.
            WriteFile(temp, ManifestFile, s => JsonSerializer.Serialize(s, m with { HasCounts = model.Counts is not null }, Json));
            cancellation.ThrowIfCancellationRequested();

            if (Directory.Exists(full))
            {
                Directory.Move(full, aside);
                try { Directory.Move(temp, full); }
                catch
                {
                    Directory.Move(aside, full); // put the old model back
                    throw;
                }
                TryDeleteFolder(aside);
            }
            else
            {
                Directory.Move(temp, full);
            }
        }
        catch (Exception e)
        {
            TryDeleteFolder(temp);
            if (e is IOException or UnauthorizedAccessException)
                throw new UserFacingException($"{directory}: the model folder cannot be written ({e.Message})", ExitCodes.WriteFailed);
            throw;
        }
    }

    /// <summary>Loads a model folder; rejects one whose manifest and arrays disagree with a <see cref="UserFacingException"/>.</summary>
    public static ModelContent Load(string directory)
    {
        if (!Directory.Exists(directory)) throw new UserFacingException($"{directory}: model folder not found");
        string manifestPath = Path.Combine(directory, ManifestFile);
        if (!File.Exists(manifestPath)) throw new UserFacingException($"{directory}: is not a model folder ({ManifestFile} is missing)");
        var m = ReadManifest(manifestPath);
        string Need(string file)
        {
            var p = Path.Combine(directory, file);
            if (!File.Exists(p)) throw new UserFacingException($"{p}: missing from the model folder");
            return p;
        }
        string shape = $"{ManifestFile} (words {I(m.Words)}, dimensions {I(m.Dimensions)}, atoms {I(m.Atoms)}, sparsity {I(m.Sparsity)})";

        var wordsPath = Need(WordsFile);
        var words = WordListFile.Read(wordsPath);
        if (words.Length != m.Words)
            throw new UserFacingException($"{wordsPath}: has {I(words.Length)} words but {ManifestFile} says {I(m.Words)}");
        var vectorsPath = Need(VectorsFile);
        var vectors = NpyFile.ReadFloat32Matrix(vectorsPath, m.Words, m.Dimensions, shape);
        var atomsPath = Need(AtomsFile);
        var atoms = NpyFile.ReadFloat32Matrix(atomsPath, m.Atoms, m.Dimensions, shape);
        var codesPath = Need(CodesFile);
        var ids = NpyFile.ReadInt32Matrix(codesPath, m.Words, m.Sparsity, shape);
        var weightsPath = Need(WeightsFile);
        var weights = NpyFile.ReadFloat32Matrix(weightsPath, m.Words, m.Sparsity, shape);
        for (int i = 0; i < ids.Length; i++)
        {
            int row = i / m.Sparsity, slot = i % m.Sparsity;
            if (ids[i] < -1 || ids[i] >= m.Atoms)
                throw new UserFacingException($"{codesPath}: row {I(row)}, slot {I(slot)}: atom id {I(ids[i])} is outside 0..{I(m.Atoms - 1)} (or -1 for an unused slot)");
            if (ids[i] == -1 && weights[i] != 0)
                throw new UserFacingException($"{weightsPath}: row {I(row)}, slot {I(slot)}: weight {weights[i].ToString("R", CultureInfo.InvariantCulture)} belongs to an unused slot (atom id -1 in {CodesFile}) and must be 0");
        }
        long[]? counts = null;
        if (m.HasCounts) counts = ReadCounts(Need(CountsFile), words);
        return new ModelContent(m, new WordVectors(words, vectors, m.Dimensions), atoms, m.Atoms, new SparseCodes(m.Words, m.Sparsity, ids, weights), counts);
    }

    private static ModelManifest ReadManifest(string path)
    {
        ModelManifest? m;
        try
        {
            using var stream = File.OpenRead(path);
            m = JsonSerializer.Deserialize<ModelManifest>(stream, Json);
        }
        catch (JsonException e)
        {
            throw new UserFacingException($"{path}: line {I((int)(e.LineNumber ?? 0) + 1)}, column {I((int)(e.BytePositionInLine ?? 0) + 1)}: not a valid manifest ({e.Message.Split(" Path:")[0]})");
        }
        catch (IOException e) { throw new UserFacingException($"{path}: cannot be read ({e.Message})"); }
        if (m is null) throw new UserFacingException($"{path}: is empty (null)");
        if (m.FormatVersion != 1)
            throw new UserFacingException($"{path}: model format version {I(m.FormatVersion)} is not supported (this tool reads version 1){(m.FormatVersion > 1 ? "; it was written by a newer SenseSplit" : "")}");
        void Positive(int value, string field)
        {
            if (value <= 0) throw new UserFacingException($"{path}: '{field}' is {I(value)}; it must be positive");
        }
        Positive(m.Words, "words");
        Positive(m.Dimensions, "dimensions");
        Positive(m.Atoms, "atoms");
        Positive(m.Sparsity, "sparsity");
        if (m.Sparsity > m.Atoms)
            throw new UserFacingException($"{path}: sparsity ({I(m.Sparsity)}) exceeds atoms ({I(m.Atoms)})");
        return m;
    }

    private static long[] ReadCounts(string path, string[] words)
    {
        var counts = new long[words.Length];
        int line = 0;
        foreach (var raw in File.ReadLines(path, Encoding.UTF8))
        {
            if (line >= words.Length)
                throw new UserFacingException($"{path}: line {I(line + 1)}: more lines than the {I(words.Length)} words of {WordsFile}");
            int tab = raw.LastIndexOf('\t');
            if (tab < 0 || raw.AsSpan(0, tab).SequenceCompareTo(words[line]) != 0)
                throw new UserFacingException($"{path}: line {I(line + 1)}: expected '{Printable.Word(words[line])}<TAB>count' (line {I(line + 1)} of {WordsFile})");
            if (!long.TryParse(raw.AsSpan(tab + 1), NumberStyles.None, CultureInfo.InvariantCulture, out counts[line]))
                throw new UserFacingException($"{path}: line {I(line + 1)}, column {I(tab + 2)}: '{Printable.Word(raw[(tab + 1)..])}' is not a count");
            line++;
        }
        if (line != words.Length)
            throw new UserFacingException($"{path}: has {I(line)} lines but {WordsFile} has {I(words.Length)} words");
        return counts;
    }

    private static void Validate(ModelContent model)
    {
        var m = model.Manifest;
        var v = model.Vectors;
        void Same(long actual, long expected, string what)
        {
            if (actual != expected) throw new ArgumentException($"model to write is inconsistent: {what} is {actual} but should be {expected}");
        }
        Same(v.Count, m.Words, "vector rows vs manifest words");
        Same(v.Dimensions, m.Dimensions, "vector dimensions vs manifest dimensions");
        Same(v.Values.Length, (long)v.Count * v.Dimensions, "vector values length");
        Same(model.AtomCount, m.Atoms, "atom count vs manifest atoms");
        Same(model.Atoms.Length, (long)model.AtomCount * v.Dimensions, "atoms length");
        Same(model.Codes.Rows, m.Words, "code rows vs manifest words");
        Same(model.Codes.Sparsity, m.Sparsity, "code sparsity vs manifest sparsity");
        Same(model.Codes.AtomIds.Length, (long)model.Codes.Rows * model.Codes.Sparsity, "atom ids length");
        Same(model.Codes.Weights.Length, (long)model.Codes.Rows * model.Codes.Sparsity, "weights length");
        if (model.Counts is { } c) Same(c.Length, m.Words, "counts length");
    }

    private static void WriteFile(string folder, string file, Action<Stream> write)
    {
        using var stream = new FileStream(Path.Combine(folder, file), FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16);
        write(stream);
        stream.Flush(flushToDisk: true);
    }

    private static void TryDeleteFolder(string path)
    {
        try { if (Directory.Exists(path)) Directory.Delete(path, recursive: true); }
        catch (IOException) { }
        catch (UnauthorizedAccessException) { }
    }

    private static string I(int value) => value.ToString(CultureInfo.InvariantCulture);
}
