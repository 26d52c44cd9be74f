using System.Globalization;
using System.Runtime.InteropServices;
using System.Text.Json;
using SenseSplit.Core.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.IO;

/// <summary>The settings an embed run recorded in its <c>manifest.json</c>, as the merge test needs them to count and
/// weight exactly as embed did (or to re-embed with the same settings).</summary>
public sealed record EmbedRunSettings
{
    public bool KeepCase { get; init; }
    public bool FoldNumbers { get; init; }
    public int Window { get; init; } = 5;
    public bool WindowAcrossLines { get; init; }
    public bool Phrases { get; init; }
    public string PhraseList { get; init; } = "";
    public double ContextSmoothing { get; init; } = 0.75;
    public double Neg { get; init; } = 1;
    public double EigenWeight { get; init; } = 0.5;
    public int MinCount { get; init; } = 5;
    public int MaxWords { get; init; } = 100_000;
    public int DimensionsRequested { get; init; } = 300;
    public int Oversample { get; init; } = 10;
    public int PowerIterations { get; init; } = 4;
    public int Seed { get; init; } = 1;
    public long MemoryBytes { get; init; } = 4L << 30;

    public TokenizerOptions Tokenizer => new() { KeepCase = KeepCase, FoldNumbers = FoldNumbers };
}

/// <summary>The fold-in data of an embed folder: basis V (contexts×dims; the contexts are the words), singular
/// values σ and the context totals #(c) of the PPMI.</summary>
public sealed record EmbedFoldInData(float[] Basis, double[] SingularValues, double[] ContextTotals, double PairTotal, double SmoothedContextTotal);

/// <summary>An embed output folder (<c>sensesplit embed --out DIR</c>): vectors, counts, and what the manifest says.</summary>
public sealed record EmbedFolder(string Directory, WordVectors Vectors, long[] Counts, EmbedRunSettings Settings, int Rank,
    IReadOnlyList<EmbedManifestInput> Inputs, IReadOnlyDictionary<string, string> Files, double PairTotal, double SmoothedContextTotal)
{
    public string FilePath(string key, string fallback) => Path.Combine(Directory, Files.TryGetValue(key, out var f) ? f : fallback);

    /// <summary>Reads <c>manifest.json</c>, <c>vectors.txt</c> and <c>counts.tsv</c>; checks that they agree.</summary>
    public static EmbedFolder Load(string directory, Action<string>? warn = null, CancellationToken cancellation = default)
    {
        if (!System.IO.Directory.Exists(directory)) throw new UserFacingException($"{directory}: embedding folder not found (make one with 'sensesplit embed CORPUS --out {directory}')");
        string manifestPath = Path.Combine(directory, "manifest.json");
        if (!File.Exists(manifestPath)) throw new UserFacingException($"{manifestPath}: not found; {directory} is not an embed output folder");
        JsonDocument doc;
        try { doc = JsonDocument.Parse(File.ReadAllBytes(manifestPath)); }
        catch (JsonException e) { throw new UserFacingException($"{manifestPath}: line {(e.LineNumber ?? 0) + 1}: not valid JSON ({e.Message})"); }
        catch (IOException e) { throw new UserFacingException($"{manifestPath}: cannot be read ({e.Message})"); }
        using (doc)
        {
            var root = doc.RootElement;
            string tool = Str(root, "tool", manifestPath);
            if (tool != "sensesplit embed") throw new UserFacingException($"{manifestPath}: was written by '{tool}', not by 'sensesplit embed'");
            int version = Int(root, "formatVersion", manifestPath);
            if (version != 1) throw new UserFacingException($"{manifestPath}: format version {version} is not supported (this tool reads version 1)");
            int words = Int(root, "words", manifestPath);
            int dims = Int(root, "dimensions", manifestPath);
            int rank = root.TryGetProperty("rank", out var rk) && rk.ValueKind == JsonValueKind.Number ? rk.GetInt32() : dims;
            var p = Obj(root, "parameters", manifestPath);
            var settings = new EmbedRunSettings
            {
                KeepCase = Bool(p, "keepCase", manifestPath),
                FoldNumbers = Bool(p, "foldNumbers", manifestPath),
                Window = Int(p, "window", manifestPath),
                WindowAcrossLines = Bool(p, "windowAcrossLines", manifestPath),
                Phrases = Bool(p, "phrases", manifestPath),
                PhraseList = p.TryGetProperty("phraseList", out var pl) && pl.ValueKind == JsonValueKind.String ? pl.GetString()! : "",
                ContextSmoothing = Num(p, "contextSmoothing", manifestPath),
                Neg = Num(p, "neg", manifestPath),
                EigenWeight = Num(p, "eigenWeight", manifestPath),
                MinCount = Int(p, "minCount", manifestPath),
                MaxWords = Int(p, "maxWords", manifestPath),
                DimensionsRequested = Int(p, "dimensionsRequested", manifestPath),
                Oversample = Int(p, "oversample", manifestPath),
                PowerIterations = Int(p, "powerIterations", manifestPath),
                Seed = Int(p, "seed", manifestPath),
                MemoryBytes = p.TryGetProperty("memoryBytes", out var mb) && mb.ValueKind == JsonValueKind.Number && mb.TryGetInt64(out long bytes) && bytes > 0 ? bytes : 4L << 30,
            };
            if (p.TryGetProperty("weighting", out var wt) && wt.ValueKind == JsonValueKind.String && wt.GetString() != "1/distance")
                throw new UserFacingException($"{manifestPath}: window weighting '{wt.GetString()}' is not supported (only 1/distance)");
            var inputs = new List<EmbedManifestInput>();
            if (root.TryGetProperty("inputs", out var ins) && ins.ValueKind == JsonValueKind.Array)
                foreach (var e in ins.EnumerateArray())
                    inputs.Add(new EmbedManifestInput(Str(e, "name", manifestPath), e.GetProperty("bytes").GetInt64(), Str(e, "sha256", manifestPath)));
            var files = new Dictionary<string, string>(StringComparer.Ordinal);
            if (root.TryGetProperty("files", out var fs) && fs.ValueKind == JsonValueKind.Object)
                foreach (var f in fs.EnumerateObject())
                    if (f.Value.ValueKind == JsonValueKind.String) files[f.Name] = f.Value.GetString()!;
            double pairTotal = Num(root, "pairTotal", manifestPath);
            double smoothedTotal = Num(root, "smoothedContextTotal", manifestPath);

            string vectorsPath = Path.Combine(directory, files.GetValueOrDefault("vectors", "vectors.txt"));
            string countsPath = Path.Combine(directory, files.GetValueOrDefault("counts", "counts.tsv"));
            // counts.tsv lists the whole vocabulary in word-id order (the order of the basis rows); vectors.txt has the same
            // order but the vector reader skips all-zero rows (words whose PPMI row vanished), which come back as zeros.
            var (vocabulary, counts) = ReadVocabulary(countsPath, words);
            var load = VectorFile.Read(vectorsPath, null, null, cancellation);
            if (load.Vectors.Dimensions != dims)
                throw new UserFacingException($"{vectorsPath}: has {load.Vectors.Dimensions} dimensions but {manifestPath} says {dims}; the folder was changed after embed wrote it");
            var rowOf = new Dictionary<string, int>(load.Vectors.Count, StringComparer.Ordinal);
            for (int i = 0; i < load.Vectors.Count; i++) rowOf[load.Vectors.Words[i]] = i;
            var values = new float[(long)words * dims];
            int zero = 0;
            for (int i = 0; i < words; i++)
            {
                if (rowOf.TryGetValue(vocabulary[i], out int r)) load.Vectors.Row(r).CopyTo(values.AsSpan(i * dims, dims));
                else zero++;
            }
            if (load.DuplicateRowsSkipped > 0 || rowOf.Count + zero != words || zero != load.ZeroRowsSkipped)
                throw new UserFacingException($"{vectorsPath}: does not hold one vector for each of the {words} words of {countsPath} ({load.Vectors.Count} read, {load.ZeroRowsSkipped} zero, {load.DuplicateRowsSkipped} repeated rows skipped); the folder was changed after embed wrote it");
            if (zero > 0) warn?.Invoke($"{vectorsPath}: {zero} words have all-zero vectors (no positive PPMI); they are never put in a pair");
            var vectors = new WordVectors(vocabulary, values, dims);
            return new EmbedFolder(directory, vectors, counts, settings, rank, inputs, files, pairTotal, smoothedTotal);
        }
    }

    /// <summary>Reads <c>basis.npy</c>, <c>singular-values.npy</c> and <c>context-counts.npy</c> and checks their shapes.</summary>
    public EmbedFoldInData LoadFoldIn()
    {
        int words = Vectors.Count, dims = Vectors.Dimensions;
        string basisPath = FilePath("basis", "basis.npy");
        string svPath = FilePath("singularValues", "singular-values.npy");
        string ccPath = FilePath("contextCounts", "context-counts.npy");
        foreach (var path in new[] { basisPath, svPath, ccPath })
            if (!File.Exists(path)) throw new UserFacingException($"{path}: not found; fold-in needs the basis, singular values and context counts that 'sensesplit embed' writes");
        var basis = NpyFile.ReadFloat32Matrix(basisPath, words, dims, "the embedding's words × dimensions");
        var sv = ReadVector(svPath, dims, "one singular value per dimension");
        var cc = ReadVector(ccPath, words, "one context total per word");
        for (int c = 0; c < cc.Length; c++)
            if (!(cc[c] >= 0) || !double.IsFinite(cc[c])) throw new UserFacingException($"{ccPath}: element {c}: {cc[c].ToString("R", CultureInfo.InvariantCulture)} is not a finite non-negative total");
        for (int j = 0; j < sv.Length; j++)
            if (!(sv[j] >= 0) || !double.IsFinite(sv[j])) throw new UserFacingException($"{svPath}: element {j}: {sv[j].ToString("R", CultureInfo.InvariantCulture)} is not a finite non-negative singular value");
        return new EmbedFoldInData(basis, sv, cc, PairTotal, SmoothedContextTotal);
    }

    /// <summary>embed's <c>counts.tsv</c>: the header <c>word&lt;TAB&gt;count</c>, then one line per word in word-id order.</summary>
    internal static (string[] Words, long[] Counts) ReadVocabulary(string path, int expected)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: not found; an embed folder has the word counts there");
        var words = new List<string>(expected);
        var counts = new List<long>(expected);
        var seen = new HashSet<string>(StringComparer.Ordinal);
        int line = 0;
        foreach (var text in File.ReadLines(path))
        {
            line++;
            if (line == 1 && text == "word\tcount") continue;
            if (text.Length == 0) continue;
            int tab = text.LastIndexOf('\t');
            if (tab <= 0 || !long.TryParse(text.AsSpan(tab + 1), NumberStyles.None, CultureInfo.InvariantCulture, out long count))
                throw new UserFacingException($"{path}: line {line}: expected 'word<TAB>count', found '{Printable.Word(text)}'");
            string word = text[..tab];
            if (!seen.Add(word)) throw new UserFacingException($"{path}: line {line}: '{Printable.Word(word)}' appears twice");
            words.Add(word);
            counts.Add(count);
        }
        if (words.Count != expected)
            throw new UserFacingException($"{path}: lists {words.Count} words but the manifest says {expected}; the folder was changed after embed wrote it");
        return (words.ToArray(), counts.ToArray());
    }

    /// <summary>A 1-D float64 (or float32) .npy array of the given length.</summary>
    internal static double[] ReadVector(string path, int length, string what)
    {
        using var stream = NpyFile.OpenRead(path);
        var header = NpyFile.ReadHeader(stream, path);
        if (header.FortranOrder && header.Shape.Length > 1) throw new UserFacingException($"{path}: is stored in Fortran order");
        if (header.Shape.Length != 1 || header.Shape[0] != length)
            throw new UserFacingException($"{path}: has shape {header.ShapeText} but {what} requires ({length.ToString(CultureInfo.InvariantCulture)},)");
        var result = new double[length];
        if (header.Type == NpyType.Float64)
        {
            var bytes = MemoryMarshal.AsBytes(result.AsSpan());
            if (NpyFile.ReadFully(stream, bytes) < bytes.Length) throw new UserFacingException($"{path}: ends before its {length} values");
        }
        else if (header.Type == NpyType.Float32)
        {
            var floats = new float[length];
            var bytes = MemoryMarshal.AsBytes(floats.AsSpan());
            if (NpyFile.ReadFully(stream, bytes) < bytes.Length) throw new UserFacingException($"{path}: ends before its {length} values");
            for (int i = 0; i < length; i++) result[i] = floats[i];
        }
        else throw new UserFacingException($"{path}: holds integers; expected float64 ('<f8') or float32 ('<f4')");
        return result;
    }

    private static JsonElement Get(JsonElement e, string name, string path)
        => e.TryGetProperty(name, out var v) ? v : throw new UserFacingException($"{path}: has no '{name}' field");

    private static JsonElement Obj(JsonElement e, string name, string path)
    {
        var v = Get(e, name, path);
        return v.ValueKind == JsonValueKind.Object ? v : throw new UserFacingException($"{path}: '{name}' is not an object");
    }

    private static string Str(JsonElement e, string name, string path)
    {
        var v = Get(e, name, path);
        return v.ValueKind == JsonValueKind.String ? v.GetString()! : throw new UserFacingException($"{path}: '{name}' is not a string");
    }

    private static int Int(JsonElement e, string name, string path)
    {
        var v = Get(e, name, path);
        return v.ValueKind == JsonValueKind.Number && v.TryGetInt32(out int i) ? i : throw new UserFacingException($"{path}: '{name}' is not a whole number");
    }

    private static double Num(JsonElement e, string name, string path)
    {
        var v = Get(e, name, path);
        return v.ValueKind == JsonValueKind.Number && double.IsFinite(v.GetDouble()) ? v.GetDouble() : throw new UserFacingException($"{path}: '{name}' is not a finite number");
    }

    private static bool Bool(JsonElement e, string name, string path)
    {
        var v = Get(e, name, path);
        return v.ValueKind is JsonValueKind.True or JsonValueKind.False ? v.GetBoolean() : throw new UserFacingException($"{path}: '{name}' is not true or false");
    }
}
