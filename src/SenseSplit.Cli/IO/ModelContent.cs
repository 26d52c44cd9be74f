using System.Globalization;
using System.Text;
using System.Text.Json;
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
    public int RemovedComponents { get; init; }
    public double Tolerance { get; init; }
    public int MaxRounds { get; init; }
    public int[] ReplacedPerRound { get; init; } = [];
    public double LoadSeconds { get; init; }
    public double LearnSeconds { get; init; }
    public string CreatedUtc { get; init; } = "";
}

/// <summary>A loaded model folder: the (normalised) coded vectors, the atoms (AtomCount×Dimensions, unit rows),
/// every word's code, and word counts when the model was built with them (same order as the words).</summary>
public sealed record ModelContent(ModelManifest Manifest, WordVectors Vectors, float[] Atoms, int AtomCount, SparseCodes Codes, long[]? Counts);

public static class ModelFolder
{
    public const string ManifestFile = "manifest.json";
    public const string WordsFile = "words.txt";
    public const string VectorsFile = "vectors.npy";
    public const string AtomsFile = "atoms.npy";
    public const string CodeAtomsFile = "code-atoms.npy";
    public const string CodeWeightsFile = "code-weights.npy";
    public const string CountsFile = "counts.tsv";

    public static readonly JsonSerializerOptions Json = new() { WriteIndented = true, PropertyNamingPolicy = JsonNamingPolicy.CamelCase };

    /// <summary>Writes a model folder atomically: everything goes to a temporary sibling folder, which then replaces
    /// <paramref name="directory"/> (an existing folder is moved aside first and deleted only after the rename).</summary>
    public static void Write(string directory, ModelContent model)
    {
        string target = Path.GetFullPath(directory);
        string parent = Path.GetDirectoryName(target) ?? ".";
        Directory.CreateDirectory(parent);
        string suffix = Environment.ProcessId.ToString(CultureInfo.InvariantCulture);
        string temp = target + ".partial-" + suffix;
        if (Directory.Exists(temp)) Directory.Delete(temp, true);
        Directory.CreateDirectory(temp);
        try
        {
            var v = model.Vectors;
            File.WriteAllLines(Path.Combine(temp, WordsFile), v.Words, new UTF8Encoding(false));
            NpyFile.Write(Path.Combine(temp, VectorsFile), v.Values, v.Count, v.Dimensions);
            NpyFile.Write(Path.Combine(temp, AtomsFile), model.Atoms, model.AtomCount, v.Dimensions);
            NpyFile.Write(Path.Combine(temp, CodeAtomsFile), model.Codes.AtomIds, model.Codes.Rows, model.Codes.Sparsity);
            NpyFile.Write(Path.Combine(temp, CodeWeightsFile), model.Codes.Weights, model.Codes.Rows, model.Codes.Sparsity);
            if (model.Counts is { } counts)
                CountsFile_Write(Path.Combine(temp, CountsFile), v.Words, counts);
            File.WriteAllText(Path.Combine(temp, ManifestFile), JsonSerializer.Serialize(model.Manifest with { HasCounts = model.Counts is not null }, Json));
            string old = target + ".old-" + suffix;
            if (Directory.Exists(target)) Directory.Move(target, old);
            Directory.Move(temp, target);
            if (Directory.Exists(old)) Directory.Delete(old, true);
        }
        catch
        {
            if (Directory.Exists(temp)) Directory.Delete(temp, true);
            throw;
        }
    }

    private static void CountsFile_Write(string path, string[] words, long[] counts)
    {
        using var w = new StreamWriter(path, false, new UTF8Encoding(false));
        for (int i = 0; i < words.Length; i++)
            w.Write($"{words[i]}\t{counts[i].ToString(CultureInfo.InvariantCulture)}\n");
    }

    /// <summary>Loads a model folder; rejects one whose manifest and arrays disagree with a <see cref="UserFacingException"/>.</summary>
    public static ModelContent Load(string directory)
    {
        if (!Directory.Exists(directory)) throw new UserFacingException($"{directory}: no such model folder");
        string Need(string file)
        {
            string p = Path.Combine(directory, file);
            if (!File.Exists(p)) throw new UserFacingException($"{p}: missing (is {directory} a model folder written by 'sensesplit atoms'?)");
            return p;
        }
        string manifestPath = Need(ManifestFile);
        ModelManifest manifest;
        try { manifest = JsonSerializer.Deserialize<ModelManifest>(File.ReadAllText(manifestPath), Json) ?? throw new UserFacingException($"{manifestPath}: empty manifest"); }
        catch (JsonException ex) { throw new UserFacingException($"{manifestPath}: line {ex.LineNumber + 1}: not a valid manifest ({ex.Message})"); }
        if (manifest.FormatVersion != 1) throw new UserFacingException($"{manifestPath}: format version {manifest.FormatVersion} is not supported (this tool reads version 1)");

        var words = File.ReadAllLines(Need(WordsFile), Encoding.UTF8);
        var (vectors, vr, vc) = NpyFile.ReadFloat32Matrix(Need(VectorsFile));
        var (atoms, ar, ac) = NpyFile.ReadFloat32Matrix(Need(AtomsFile));
        var (ids, ir, ic) = NpyFile.ReadInt32Matrix(Need(CodeAtomsFile));
        var (weights, wr, wc) = NpyFile.ReadFloat32Matrix(Need(CodeWeightsFile));
        void Check(bool ok, string file, string problem)
        {
            if (!ok) throw new UserFacingException($"{Path.Combine(directory, file)}: {problem}; the model folder is inconsistent (write it again with 'sensesplit atoms')");
        }
        Check(words.Length == manifest.Words, WordsFile, $"{words.Length} words, the manifest says {manifest.Words}");
        Check(vr == manifest.Words && vc == manifest.Dimensions, VectorsFile, $"shape {vr}×{vc}, the manifest says {manifest.Words}×{manifest.Dimensions}");
        Check(ar == manifest.Atoms && ac == manifest.Dimensions, AtomsFile, $"shape {ar}×{ac}, the manifest says {manifest.Atoms}×{manifest.Dimensions}");
        Check(ir == manifest.Words && ic == manifest.Sparsity, CodeAtomsFile, $"shape {ir}×{ic}, the manifest says {manifest.Words}×{manifest.Sparsity}");
        Check(wr == manifest.Words && wc == manifest.Sparsity, CodeWeightsFile, $"shape {wr}×{wc}, the manifest says {manifest.Words}×{manifest.Sparsity}");
        for (int i = 0; i < ids.Length; i++)
            Check(ids[i] >= -1 && ids[i] < manifest.Atoms, CodeAtomsFile, $"row {i / ic + 1} names atom {ids[i]}, outside 0..{manifest.Atoms - 1}");
        long[]? counts = null;
        if (manifest.HasCounts)
        {
            counts = new long[words.Length];
            var index = new Dictionary<string, int>(StringComparer.Ordinal);
            for (int i = 0; i < words.Length; i++) index.TryAdd(words[i], i);
            var table = CountsReader.Read(Need(CountsFile));
            foreach (var (word, count) in table)
                if (index.TryGetValue(word, out int i)) counts[i] = count;
        }
        var codes = new SparseCodes(manifest.Words, manifest.Sparsity, ids, weights);
        return new ModelContent(manifest, new WordVectors(words, vectors, manifest.Dimensions), atoms, manifest.Atoms, codes, counts);
    }
}
