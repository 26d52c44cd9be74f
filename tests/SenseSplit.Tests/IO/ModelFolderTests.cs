using System.Text.Json;
using System.Text.Json.Nodes;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.IO;

public class ModelFolderTests
{
    /// <summary>A small consistent model built directly (no learning): 6 words, 4 dimensions, 3 atoms, sparsity 2.</summary>
    private static ModelContent SampleModel(bool withCounts = true)
    {
        var rnd = new Random(11);
        int words = 6, dims = 4, atoms = 3, s = 2;
        float[] vectors = Enumerable.Range(0, words * dims).Select(_ => (float)rnd.NextDouble()).ToArray();
        float[] atomValues = Enumerable.Range(0, atoms * dims).Select(_ => (float)rnd.NextDouble() - 0.5f).ToArray();
        int[] ids = [0, 2, 1, -1, 2, 0, 1, 2, -1, -1, 0, 1];
        float[] weights = [0.5f, 0.25f, 1f, 0f, -0.75f, 0.125f, 2f, -1f, 0f, 0f, 0.3f, 0.6f];
        var manifest = new ModelManifest
        {
            VectorsFile = "/data/v.txt", VectorsSha256 = new string('a', 64), Words = words, Dimensions = dims, Atoms = atoms,
            Sparsity = s, Seed = 7, ErrorPerRound = [0.9, 0.5, 0.4999], ReplacedPerRound = [1, 0, 0], RoundsRun = 3,
            Converged = true, StopReason = "tolerance reached", ToolVersion = "test", MaxRounds = 30, Tolerance = 1e-3,
            Threads = 2, Timings = new ModelTimings { ReadSeconds = 1.5, LearnSeconds = 2.25 },
        };
        return new ModelContent(manifest,
            new WordVectors(["alpha", "beta", "東京", "new york", "x", "y"], vectors, dims),
            atomValues, atoms, new SparseCodes(words, s, ids, weights),
            withCounts ? [10, 0, 3, 1_000_000_000_000, 5, 6] : null);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void WriteThenLoad_EverythingRoundTrips(bool withCounts)
    {
        using var t = new TempFolder();
        var model = SampleModel(withCounts);
        var dir = t.File("model");
        ModelFolder.Write(dir, model);
        var back = ModelFolder.Load(dir);

        Assert.Equal(model.Manifest with { HasCounts = withCounts, ErrorPerRound = [], ReplacedPerRound = [] },
            back.Manifest with { ErrorPerRound = [], ReplacedPerRound = [] });
        Assert.Equal(model.Manifest.ErrorPerRound, back.Manifest.ErrorPerRound);
        Assert.Equal(model.Manifest.ReplacedPerRound, back.Manifest.ReplacedPerRound);
        Assert.Equal(model.Vectors.Words, back.Vectors.Words);
        Assert.Equal(model.Vectors.Values, back.Vectors.Values);
        Assert.Equal(model.Atoms, back.Atoms);
        Assert.Equal(model.Codes.AtomIds, back.Codes.AtomIds);
        Assert.Equal(model.Codes.Weights, back.Codes.Weights);
        Assert.Equal(model.Counts, back.Counts);
        var files = Directory.GetFiles(dir).Select(Path.GetFileName).Order(StringComparer.Ordinal).ToArray();
        string[] expected = withCounts
            ? ["atoms.npy", "codes.npy", "counts.tsv", "manifest.json", "vectors.npy", "weights.npy", "words.txt"]
            : ["atoms.npy", "codes.npy", "manifest.json", "vectors.npy", "weights.npy", "words.txt"];
        Assert.Equal(expected, files);
        Assert.Equal(["model"], t.Entries()); // no temporary sibling left
    }

    [Fact]
    public void Write_ManifestIsCamelCaseJson()
    {
        using var t = new TempFolder();
        ModelFolder.Write(t.File("m"), SampleModel());
        var json = JsonNode.Parse(File.ReadAllText(Path.Combine(t.File("m"), "manifest.json")))!.AsObject();
        Assert.Equal(1, (int)json["formatVersion"]!);
        Assert.Equal(new string('a', 64), (string)json["vectorsSha256"]!);
        Assert.Equal(3, json["errorPerRound"]!.AsArray().Count);
        Assert.Equal(1.5, (double)json["timings"]!["readSeconds"]!);
        Assert.True((bool)json["hasCounts"]!);
    }

    [Fact]
    public void Write_ExistingModelFolder_ReplacedWithoutLeftovers()
    {
        using var t = new TempFolder();
        var dir = t.File("m");
        ModelFolder.Write(dir, SampleModel(withCounts: true));
        var second = SampleModel(withCounts: false);
        second = second with { Manifest = second.Manifest with { Seed = 99 } };
        ModelFolder.Write(dir, second);
        var back = ModelFolder.Load(dir);
        Assert.Equal(99, back.Manifest.Seed);
        Assert.False(File.Exists(Path.Combine(dir, "counts.tsv"))); // nothing of the old folder survives
        Assert.Equal(["m"], t.Entries());
    }

    [Fact]
    public void Write_OverFolderThatIsNotAModel_RefusedAndUntouched()
    {
        using var t = new TempFolder();
        var dir = t.File("precious");
        Directory.CreateDirectory(dir);
        File.WriteAllText(Path.Combine(dir, "thesis.tex"), "keep me");
        var e = Assert.Throws<UserFacingException>(() => ModelFolder.Write(dir, SampleModel()));
        Assert.Equal(ExitCodes.WriteFailed, e.ExitCode);
        Assert.Contains("not a model folder", e.Message);
        Assert.Equal("keep me", File.ReadAllText(Path.Combine(dir, "thesis.tex")));
        Assert.Equal(["precious"], t.Entries());
    }

    [Fact]
    public void Write_OverFile_Refused()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => ModelFolder.Write(t.Write("m", "file"), SampleModel()));
        Assert.Contains("is a file", e.Message);
    }

    [Fact]
    public void Write_Cancelled_OldModelIntactAndNoPartialFolder()
    {
        using var t = new TempFolder();
        var dir = t.File("m");
        ModelFolder.Write(dir, SampleModel());
        using var cts = new CancellationTokenSource();
        cts.Cancel();
        var changed = SampleModel() with { Manifest = SampleModel().Manifest with { Seed = 1234 } };
        Assert.ThrowsAny<OperationCanceledException>(() => ModelFolder.Write(dir, changed, cts.Token));
        Assert.Equal(7, ModelFolder.Load(dir).Manifest.Seed);
        Assert.Equal(["m"], t.Entries());
    }

    [Fact]
    public void Write_InconsistentModel_ArgumentException()
    {
        using var t = new TempFolder();
        var m = SampleModel();
        var bad = m with { Manifest = m.Manifest with { Atoms = 4 } };
        var e = Assert.Throws<ArgumentException>(() => ModelFolder.Write(t.File("m"), bad));
        Assert.Contains("atom count", e.Message);
        Assert.Empty(t.Entries());
    }

    // Each tamper edits one file of a valid folder; Load must name the file and say what disagrees.
    public static TheoryData<string, string[]> Tampers => new()
    {
        { "atoms-rows", ["atoms.npy", "has shape (2, 4)", "requires (3, 4)"] },
        { "vectors-dims", ["vectors.npy", "has shape (6, 5)", "requires (6, 4)"] },
        { "codes-type", ["codes.npy", "int32"] },
        { "codes-range", ["codes.npy", "row 1, slot 0", "atom id 3 is outside 0..2"] },
        { "weights-unused", ["weights.npy", "row 1, slot 1", "must be 0"] },
        { "weights-nan", ["weights.npy", "row 0, column 0", "not a finite"] },
        { "words-short", ["words.txt", "has 5 words but manifest.json says 6"] },
        { "manifest-version", ["manifest.json", "format version 2", "newer"] },
        { "manifest-json", ["manifest.json", "not a valid manifest"] },
        { "manifest-sparsity", ["manifest.json", "sparsity (4) exceeds atoms (3)"] },
        { "missing-weights", ["weights.npy", "missing"] },
        { "counts-word", ["counts.tsv", "line 2", "expected 'beta<TAB>count'"] },
        { "counts-short", ["counts.tsv", "has 5 lines but words.txt has 6"] },
        { "truncated-vectors", ["vectors.npy", "truncated"] },
    };

    [Theory]
    [MemberData(nameof(Tampers))]
    public void Load_TamperedModel_RejectedNamingFileAndMismatch(string tamper, string[] fragments)
    {
        using var t = new TempFolder();
        var dir = t.File("m");
        var model = SampleModel();
        ModelFolder.Write(dir, model);
        string F(string name) => Path.Combine(dir, name);
        void Npy<T>(string name, T[] values, int rows, int cols) where T : unmanaged
        {
            using var s = File.Create(F(name));
            NpyFile.WriteMatrix<T>(s, values, rows, cols);
        }
        void Manifest(Action<JsonObject> edit)
        {
            var json = JsonNode.Parse(File.ReadAllText(F("manifest.json")))!.AsObject();
            edit(json);
            File.WriteAllText(F("manifest.json"), json.ToJsonString());
        }
        switch (tamper)
        {
            case "atoms-rows": Npy(ModelFolder.AtomsFile, new float[8], 2, 4); break;
            case "vectors-dims": Npy(ModelFolder.VectorsFile, new float[30], 6, 5); break;
            case "codes-type": Npy(ModelFolder.CodesFile, new float[12], 6, 2); break;
            case "codes-range":
                var ids = model.Codes.AtomIds.ToArray(); ids[2] = 3; Npy(ModelFolder.CodesFile, ids, 6, 2); break;
            case "weights-unused":
                var w = model.Codes.Weights.ToArray(); w[3] = 0.5f; Npy(ModelFolder.WeightsFile, w, 6, 2); break;
            case "weights-nan":
                var wn = model.Codes.Weights.ToArray(); wn[0] = float.NaN; Npy(ModelFolder.WeightsFile, wn, 6, 2); break;
            case "words-short": File.WriteAllLines(F("words.txt"), model.Vectors.Words.Take(5)); break;
            case "manifest-version": Manifest(j => j["formatVersion"] = 2); break;
            case "manifest-json": File.WriteAllText(F("manifest.json"), "{ \"words\": 6, "); break;
            case "manifest-sparsity": Manifest(j => j["sparsity"] = 4); break;
            case "missing-weights": File.Delete(F("weights.npy")); break;
            case "counts-word": File.WriteAllText(F("counts.tsv"), "alpha\t10\nBETA\t0\n"); break;
            case "counts-short": File.WriteAllLines(F("counts.tsv"), File.ReadAllLines(F("counts.tsv")).Take(5)); break;
            case "truncated-vectors":
                var bytes = File.ReadAllBytes(F("vectors.npy")); File.WriteAllBytes(F("vectors.npy"), bytes[..^4]); break;
            default: throw new InvalidOperationException(tamper);
        }
        var e = Assert.Throws<UserFacingException>(() => ModelFolder.Load(dir));
        Assert.Equal(ExitCodes.BadInput, e.ExitCode);
        foreach (var f in fragments) Assert.Contains(f, e.Message);
    }

    [Fact]
    public void Load_NotAModelFolder_Error()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => ModelFolder.Load(t.Path));
        Assert.Contains("manifest.json is missing", e.Message);
        e = Assert.Throws<UserFacingException>(() => ModelFolder.Load(t.File("nope")));
        Assert.Contains("not found", e.Message);
    }
}
