using System.Globalization;
using System.Text.Json;
using SenseSplit.Cli;
using SenseSplit.Core.Text;
using SenseSplit.Tests.IO;
using static SenseSplit.Tests.Cli.MergeTestFixtures;

namespace SenseSplit.Tests.Cli;

/// <summary><c>sensesplit merge-test</c> run in-process: score, prepare, the built-in fold-in and retrain, bad input.</summary>
public sealed class MergeTestCommandTests : IDisposable
{
    private readonly TempFolder _dir = new();
    public void Dispose() => _dir.Dispose();

    private string P(string name) => _dir.File(name);

    // ---------------------------------------------------------------- help

    [Fact]
    public void Help_NamesOutputsExitCodesAndEveryThreshold()
    {
        var (code, stdout, _) = CliRunner.Run("merge-test", "--help");
        Assert.Equal(ExitCodes.Ok, code);
        foreach (var part in new[] { "pairs.csv", "merge-test.json", "merge-test.svg", "exit code 0", "5 when it fails", "--retrain", "--pairs-file",
                     "--skip-frequent", "--min-rare-count", "--max-ratio", "--min-cosine", "--floor-factor", "--min-floor", "--high-ratio", "--min-excess",
                     "--min-pairs", "score", "prepare" })
            Assert.Contains(part, stdout);
        (code, stdout, _) = CliRunner.Run("merge-test", "score", "--help");
        Assert.Equal(ExitCodes.Ok, code);
        Assert.Contains("--floor-factor", stdout);
        Assert.Contains("noise floor", stdout);
        // score always has a noise floor, so the absolute cosine threshold would have no effect there.
        Assert.DoesNotContain("--min-cosine", stdout);
        (code, _, var stderr) = CliRunner.Run("merge-test", "score", "--original", "a", "--merged", "b", "--pairs", "c", "--counts", "d", "--out", "e", "--min-cosine", "0.5");
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--min-cosine", stderr);
    }

    // ---------------------------------------------------------------- score

    [Fact]
    public void Score_KnownMixtureUnderRotation_RecoversWeightsAndPasses()
    {
        // Merged rows are exactly α·v1 + β·v2 and the whole merged space is turned by a random orthogonal matrix, so
        // Procrustes must undo the rotation (exact for noise-free data: Schönemann 1966, Psychometrika 31) and the fit
        // must return the generating α and β. β/α = 1 − 0.3·log10 r keeps the rarer word far above its share: pass.
        var known = WriteKnownMerge(_dir.Path, seed: 3, pairs: 40, background: 300, dims: 24, r => 1 - 0.3 * Math.Log10(r));
        var (code, stdout, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.True(code == ExitCodes.Ok, stderr);
        Assert.Equal(Path.GetFullPath(P("out/merge-test.json")), stdout.Trim());

        var rows = ReadCsv(P("out/pairs.csv"));
        Assert.Equal(known.Count, rows.Count);
        foreach (var k in known)
        {
            var row = Assert.Single(rows, r => r["pseudo"] == k.Pseudo);
            // More frequent word first, whatever the order in the input file.
            Assert.Equal(k.First, row["w1"]);
            Assert.Equal(k.F1.ToString(CultureInfo.InvariantCulture), row["f1"]);
            // Float32 text vectors and a float32 rotation: agreement to about 1e-5 relative is what the data allow.
            Assert.Equal(k.Alpha, D(row["alpha"]), 1e-4 * k.Alpha);
            Assert.Equal(k.Beta, D(row["beta"]), 1e-4 * Math.Max(1, Math.Abs(k.Beta)));
            Assert.True(D(row["cosine_to_span"]) > 0.99999);
        }
        var json = Json(P("out/merge-test.json"));
        Assert.Equal("pass", json.GetProperty("verdict").GetString());
        Assert.Equal("logarithmic", json.GetProperty("better_law").GetString());
        Assert.Equal(0.3, json.GetProperty("c").GetProperty("estimate").GetDouble(), 1e-3);
        var run = json.GetProperty("parameters").GetProperty("run");
        Assert.Equal("score", run.GetProperty("method").GetString());
        Assert.True(run.GetProperty("alignment_residual_after").GetDouble() < 1e-5);
        Assert.True(run.GetProperty("alignment_median_cosine").GetDouble() > 0.99999);
        Assert.True(File.Exists(P("out/merge-test.svg")));
    }

    [Theory]
    // Background and pseudo-words equally noisy (t = 0.62, cosine ≈ 0.85 to themselves): the pseudo-words lie as close
    // to their span as untouched words come back to themselves, below the absolute 0.9 but at the noise floor: pass.
    [InlineData(0.62, 0.62, ExitCodes.Ok)]
    // Pseudo-words much noisier (t = 1.5, cosine to span ≈ 0.6) than the floor: the merge itself lost the plane: fail.
    [InlineData(0.62, 1.5, ExitCodes.MergeTestFailed)]
    public void Score_RetrainingNoise_CosineJudgedAgainstNoiseFloor(double backgroundNoise, double pseudoNoise, int expected)
    {
        // β/α = 1 − 0.3·log10 r as in the passing case above, so only the cosine criterion can decide; 60 dimensions so
        // that the noise leaves the weights well determined (the noise part inside the plane is ~ t·√(2/60)).
        WriteKnownMerge(_dir.Path, seed: 5, pairs: 60, background: 400, dims: 60, r => 1 - 0.3 * Math.Log10(r), backgroundNoise, pseudoNoise);
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.True(code == expected, stderr);
        var json = Json(P("out/merge-test.json"));
        double floor = json.GetProperty("noise_floor_cosine").GetDouble();
        double median = json.GetProperty("median_cosine_to_span").GetDouble();
        Assert.Equal("relative to noise floor", json.GetProperty("cosine_rule").GetString());
        Assert.Equal(json.GetProperty("parameters").GetProperty("run").GetProperty("alignment_median_cosine").GetDouble(), floor);
        // 1/√(1 + 0.62²) = 0.850: Procrustes on 400 words finds the rotation, so the floor is the noise itself.
        Assert.Equal(0.85, floor, 0.02);
        Assert.True(median < 0.9, $"median {median}: the absolute rule would fail both cases");
        Assert.Equal(0.95 * floor, json.GetProperty("required_cosine_to_span").GetDouble(), 12);
        Assert.Equal(0.95, json.GetProperty("parameters").GetProperty("floor_factor").GetDouble());
        Assert.Contains("noise floor:", stderr);
        Assert.Contains($"× noise floor = {(0.95 * floor).ToString("F3", CultureInfo.InvariantCulture)}", stderr);
        if (expected == ExitCodes.MergeTestFailed)
            Assert.Contains(json.GetProperty("verdict_reasons").EnumerateArray(), r => r.GetString()!.Contains("noise floor"));
        else
            Assert.Empty(json.GetProperty("verdict_reasons").EnumerateArray());
        // Overriding the factor moves the verdict: asking for 1.2 × floor cannot be met.
        Assert.Equal(ExitCodes.MergeTestFailed, CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out2"), "--floor-factor", "1.2").code);
    }

    [Fact]
    public void Score_ProportionalWeights_FailsWithExitCode5()
    {
        // β/α = 1/r: the rarer word gets exactly its frequency share, the case the verdict is meant to reject.
        WriteKnownMerge(_dir.Path, seed: 4, pairs: 40, background: 200, dims: 16, r => 1 / r);
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.MergeTestFailed, code);
        Assert.Contains("merge test: fail", stderr);
        var json = Json(P("out/merge-test.json"));
        Assert.Equal("fail", json.GetProperty("verdict").GetString());
        Assert.Contains(json.GetProperty("verdict_reasons").EnumerateArray(), r => r.GetString()!.Contains("(beta/alpha)/(1/r)"));
        Assert.Equal(1.0, json.GetProperty("median_excess_factor_high_ratio").GetDouble(), 1e-3);
        Assert.Equal("proportional", json.GetProperty("better_law").GetString());
    }

    [Fact]
    public void Score_Thresholds_ChangeTheVerdict()
    {
        WriteKnownMerge(_dir.Path, seed: 5, pairs: 30, background: 200, dims: 16, r => 1 / r);
        // With --min-excess 0.5 proportional weights (factor 1) are accepted.
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"), "--min-excess", "0.5");
        Assert.True(code == ExitCodes.Ok, stderr);
        Assert.Equal(0.5, Json(P("out/merge-test.json")).GetProperty("parameters").GetProperty("min_excess_factor").GetDouble());
    }

    [Fact]
    public void Score_PseudoWordMissingFromMergedFile_ErrorNamesMergedFile()
    {
        var known = WriteKnownMerge(_dir.Path, seed: 6, pairs: 10, background: 50, dims: 8, r => 0.5);
        File.WriteAllLines(P("merged.txt"), File.ReadAllLines(P("merged.txt")).Skip(1).Where(l => !l.StartsWith(known[3].Pseudo + " ", StringComparison.Ordinal)));
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("merged.txt")}: has no vector for the pseudo-word '{known[3].Pseudo}'", stderr);
        Assert.Contains("line 5", stderr);
        Assert.Contains("was it trained on the merged corpus?", stderr);
        Assert.False(Directory.Exists(P("out")));
    }

    [Fact]
    public void Score_PseudoWordSplitByTrainer_ErrorSaysSo()
    {
        // A trainer that keeps only letters and digits cuts "fa3⊕ra3" into "fa3" and "ra3": the merged file then has
        // both halves and no pseudo-word, which the error must name instead of a vague "not trained on it".
        var known = WriteKnownMerge(_dir.Path, seed: 6, pairs: 10, background: 50, dims: 8, r => 0.5);
        var lines = File.ReadAllLines(P("merged.txt")).Skip(1).ToList();
        int at = lines.FindIndex(l => l.StartsWith(known[3].Pseudo + " ", StringComparison.Ordinal));
        string numbers = lines[at][(known[3].Pseudo.Length + 1)..];
        lines[at] = $"{known[3].First} {numbers}";
        lines.Add($"{known[3].Second} {numbers}");
        File.WriteAllLines(P("merged.txt"), lines);
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"the trainer split the pseudo-words at '⊕'", stderr);
        Assert.Contains("merge-test --retrain", stderr);
    }

    [Fact]
    public void Score_PairWordMissingFromOriginalOrCounts_ErrorNamesThatFile()
    {
        WriteKnownMerge(_dir.Path, seed: 7, pairs: 10, background: 50, dims: 8, r => 0.5);
        File.AppendAllText(P("pairs.csv"), "nosuchword,bg1\n");
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("original.txt")}: has no vector for 'nosuchword' (pair on line 12 of {P("pairs.csv")})", stderr);

        WriteKnownMerge(_dir.Path, seed: 7, pairs: 10, background: 50, dims: 8, r => 0.5);
        File.WriteAllLines(P("counts.tsv"), File.ReadAllLines(P("counts.tsv")).Where(l => !l.StartsWith("ra2\t", StringComparison.Ordinal)));
        (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("counts.tsv")}: has no count for 'ra2'", stderr);
    }

    [Fact]
    public void Score_DimensionsDifferOrOptionMissing_ClearErrors()
    {
        WriteKnownMerge(_dir.Path, seed: 8, pairs: 5, background: 30, dims: 8, r => 0.5);
        File.WriteAllLines(P("small.txt"), ["bg0 1 2 3", "fa0⊕ra0 1 0 0"]);
        var (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("small.txt"),
            "--pairs", P("pairs.csv"), "--counts", P("counts.tsv"), "--out", P("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("small.txt")}: has 3 dimensions but {P("original.txt")} has 8", stderr);

        // A missing required option is a parse error; CliApp returns System.CommandLine's code for those (not 0).
        (code, _, stderr) = CliRunner.Run("merge-test", "score", "--original", P("original.txt"), "--merged", P("merged.txt"), "--out", P("out"));
        Assert.NotEqual(ExitCodes.Ok, code);
        Assert.Contains("--pairs", stderr);
    }

    // ---------------------------------------------------------------- prepare

    /// <summary>Writes corpus.txt and embeds it (in-process) into emb/; returns the corpus path.</summary>
    private string CorpusAndEmbedding(int seed, int sentences, params string[] embedOptions)
    {
        string corpus = _dir.Write("corpus.txt", Corpus(seed, sentences));
        var (code, _, stderr) = CliRunner.Run(["embed", corpus, "--out", P("emb"), "--threads", "1", .. embedOptions]);
        Assert.True(code == ExitCodes.Ok, stderr);
        return corpus;
    }

    private Dictionary<string, long> EmbedCounts()
        => File.ReadLines(P("emb/counts.tsv")).Skip(1).Select(l => l.Split('\t')).ToDictionary(f => f[0], f => long.Parse(f[1], CultureInfo.InvariantCulture));

    [Fact]
    public void Prepare_UserPairs_MergedCorpusHasNoPairWordsAndPseudoCountIsF1PlusF2()
    {
        string corpus = CorpusAndEmbedding(1, 3000, "--dim", "8", "--min-count", "2");
        var counts = EmbedCounts();
        // Frequent with rare, and the rare word written first: the command orders each pair by count.
        _dir.Write("user.csv", $"w1,w2\n{Words[60]},{Words[0]}\n{Words[5]},{Words[40]}\n");
        var (code, stdout, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep"), "--pairs-file", P("user.csv"), "--write-original");
        Assert.True(code == ExitCodes.Ok, stderr);
        Assert.Equal(Path.GetFullPath(P("prep/corpus-merged.txt")), stdout.Trim());

        var pairs = ReadCsv(P("prep/pairs.csv"));
        Assert.Equal(["w1", "w2", "f1", "f2", "r", "pseudo"], pairs[0].Keys);
        Assert.Equal((Words[0], Words[60]), (pairs[0]["w1"], pairs[0]["w2"]));
        Assert.Equal((Words[5], Words[40]), (pairs[1]["w1"], pairs[1]["w2"]));
        var merged = File.ReadAllText(P("prep/corpus-merged.txt")).Split([' ', '\n'], StringSplitOptions.RemoveEmptyEntries);
        var original = File.ReadAllText(P("prep/corpus-original.txt")).Split([' ', '\n'], StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(original.Length, merged.Length);
        var pseudoOf = new Dictionary<string, string>();
        foreach (var p in pairs)
        {
            long f1 = counts[p["w1"]], f2 = counts[p["w2"]];
            Assert.Equal(f1.ToString(CultureInfo.InvariantCulture), p["f1"]);
            Assert.Equal(f2.ToString(CultureInfo.InvariantCulture), p["f2"]);
            Assert.Equal($"{p["w1"]}⊕{p["w2"]}", p["pseudo"]);
            Assert.DoesNotContain(p["w1"], merged);
            Assert.DoesNotContain(p["w2"], merged);
            // Every occurrence embed counted is replaced, and nothing else.
            Assert.Equal(f1 + f2, merged.LongCount(t => t == p["pseudo"]));
            pseudoOf[p["w1"]] = pseudoOf[p["w2"]] = p["pseudo"];
        }
        // Position by position, the merged stream is the original stream with the pair words replaced.
        for (int i = 0; i < original.Length; i++)
            Assert.Equal(pseudoOf.GetValueOrDefault(original[i], original[i]), merged[i]);
        // The original stream is the tokenizer's normalised text: lower case, no punctuation.
        Assert.DoesNotContain(original, t => t.Any(char.IsUpper) || t.Contains(',') || t.EndsWith('.'));
    }

    [Fact]
    public void Prepare_ChosenPairs_FollowTheSelectionRules()
    {
        string corpus = CorpusAndEmbedding(2, 4000, "--dim", "12", "--min-count", "2");
        var counts = EmbedCounts();
        // 64 words: skip the 8 most frequent as function words (the default 100 would skip them all).
        var (code, _, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep"), "--pairs", "6", "--min-rare-count", "20", "--seed", "3", "--skip-frequent", "8");
        Assert.True(code == ExitCodes.Ok, stderr);
        var pairs = ReadCsv(P("prep/pairs.csv"));
        Assert.NotEmpty(pairs);
        var topEight = counts.OrderByDescending(kv => kv.Value).Take(8).Select(kv => kv.Key).ToHashSet();
        var merged = File.ReadAllText(P("prep/corpus-merged.txt")).Split([' ', '\n'], StringSplitOptions.RemoveEmptyEntries);
        var used = new HashSet<string>();
        foreach (var p in pairs)
        {
            long f1 = counts[p["w1"]], f2 = counts[p["w2"]];
            Assert.True(f1 >= f2 && f2 >= 20, $"{p["w1"]} {f1}, {p["w2"]} {f2}");
            Assert.True(used.Add(p["w1"]) && used.Add(p["w2"]), "a word in two pairs");
            Assert.Equal(f1 + f2, merged.LongCount(t => t == p["pseudo"]));
            Assert.DoesNotContain(p["w1"], merged);
            Assert.DoesNotContain(p["w1"], topEight);
        }
        Assert.Contains("skipped the 8 most frequent words", stderr);
        // Same seed, same pairs.
        Assert.Equal(ExitCodes.Ok, CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep2"), "--pairs", "6", "--min-rare-count", "20", "--seed", "3", "--skip-frequent", "8").code);
        Assert.Equal(File.ReadAllText(P("prep/pairs.csv")), File.ReadAllText(P("prep2/pairs.csv")));
    }

    [Fact]
    public void Prepare_BadInputs_ClearErrors()
    {
        string corpus = CorpusAndEmbedding(3, 600, "--dim", "4", "--min-count", "2");
        _dir.Write("user.csv", $"w1,w2\n{Words[0]},{Words[1]}\n{Words[2]},zzzz\n");
        var (code, _, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep"), "--pairs-file", P("user.csv"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("user.csv")}: line 3: 'zzzz' is not a word of {P("emb/vectors.txt")}", stderr);

        _dir.Write("twice.csv", $"w1,w2\n{Words[0]},{Words[1]}\n{Words[2]},{Words[0]}\n");
        (code, _, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep"), "--pairs-file", P("twice.csv"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("twice.csv")}: line 3: pair 2", stderr);
        Assert.Contains($"'{Words[0]}' is already used in pair 1", stderr);

        (code, _, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", P("missing.txt"), "--vectors", P("emb/vectors.txt"),
            "--counts", P("emb/counts.tsv"), "--out", P("prep"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"input not found: {P("missing.txt")}", stderr);

        (code, _, stderr) = CliRunner.Run("merge-test", "prepare", "--corpus", corpus, "--vectors", P("emb/vectors.txt"), "--out", P("prep"));
        Assert.NotEqual(ExitCodes.Ok, code);
        Assert.Contains("--counts", stderr);
        Assert.False(File.Exists(P("prep/corpus-merged.txt")));
    }

    // ---------------------------------------------------------------- built in

    [Fact]
    public void FoldIn_FullRankEmbedding_OwnRowsReproduceStoredVectors()
    {
        // With as many SVD directions as the sketch can hold (sketch width ≥ words), the randomized SVD is exact, so
        // A·V = U·Σ and folding a word's own counted row back in must give its stored vector U·Σ^p exactly: this checks
        // that the fold-in pass counts, weights (smoothing, shift) and scales (eigenvalue weight) as embed did.
        string corpus = CorpusAndEmbedding(4, 3000, "--dim", "50", "--oversample", "20", "--min-count", "1",
            "--window", "3", "--window-across-lines", "--neg", "1.5", "--eigen-weight", "0.3", "--context-smoothing", "0.6");
        _dir.Write("user.csv", $"w1,w2\n{Words[1]},{Words[50]}\n{Words[3]},{Words[33]}\n{Words[6]},{Words[20]}\n");
        var (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", corpus, "--embedding", P("emb"), "--out", P("fold"), "--pairs-file", P("user.csv"));
        Assert.True(code is ExitCodes.Ok or ExitCodes.MergeTestFailed, stderr);
        Assert.DoesNotContain("counted differently", stderr);
        var json = Json(P("fold/merge-test.json"));
        var run = json.GetProperty("parameters").GetProperty("run");
        Assert.Equal("fold-in", run.GetProperty("method").GetString());
        Assert.Equal(0, run.GetProperty("words_counted_differently").GetInt32());
        Assert.True(run.GetProperty("fold_in_own_row_median_cosine").GetDouble() > 0.9999, run.GetRawText());
        Assert.Equal(0.3, run.GetProperty("eigen_weight").GetDouble());
        Assert.Equal(1.5, run.GetProperty("neg").GetDouble());
        Assert.Equal(3, ReadCsv(P("fold/pairs.csv")).Count);
        Assert.Equal(code == ExitCodes.Ok ? "pass" : "fail", json.GetProperty("verdict").GetString());
    }

    [Fact]
    public void Retrain_RareMerge_UntouchedWordsRealignWithTheOriginal()
    {
        // Re-embedding with embed's own settings after merging two rare words changes little else, so after Procrustes
        // the untouched words must come back close to their stored vectors. Measured on this corpus (seeded, so the
        // figures are fixed): 0.995 with the right settings; 0.983 when the re-embedding's window is 2 wider and 0.89
        // without context smoothing, both below the 0.99 asked for. The re-embedding's vocabulary loses one word per pair.
        string corpus = CorpusAndEmbedding(5, 3000, "--dim", "30", "--min-count", "2", "--window", "4");
        _dir.Write("user.csv", $"w1,w2\n{Words[55]},{Words[60]}\n");
        var (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", corpus, "--embedding", P("emb"), "--out", P("re"),
            "--pairs-file", P("user.csv"), "--retrain", "--min-pairs", "1", "--threads", "1");
        Assert.True(code is ExitCodes.Ok or ExitCodes.MergeTestFailed, stderr);
        var run = Json(P("re/merge-test.json")).GetProperty("parameters").GetProperty("run");
        Assert.Equal("retrain", run.GetProperty("method").GetString());
        int words = File.ReadLines(P("emb/counts.tsv")).Count() - 1;
        Assert.Equal(words - 1, run.GetProperty("retrain_words").GetInt32());
        Assert.Equal(words - 2, run.GetProperty("alignment_words").GetInt32());
        Assert.True(run.GetProperty("alignment_median_cosine").GetDouble() > 0.99, run.GetRawText());
        var pair = Assert.Single(ReadCsv(P("re/pairs.csv")));
        // The pair itself is two rare words in a small corpus: only that its fit is defined is checked here.
        Assert.InRange(D(pair["cosine_to_span"]), 0, 1);
        Assert.True(double.IsFinite(D(pair["alpha"])) && double.IsFinite(D(pair["beta"])));
    }

    [Fact]
    public void BuiltIn_CorpusDiffersFromEmbedded_ErrorNamesInput()
    {
        string corpus = CorpusAndEmbedding(6, 800, "--dim", "4", "--min-count", "2");
        string other = _dir.Write("other.txt", File.ReadAllText(corpus).Replace("Ka", "Lo"));
        var (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", other, "--embedding", P("emb"), "--out", P("x"), "--pairs", "2", "--min-rare-count", "2", "--skip-frequent", "0");
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"input {other}: differs from", stderr);
        Assert.Contains("SHA-256", stderr);

        (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", corpus, "--embedding", P("nothing"), "--out", P("x"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains($"{P("nothing")}: embedding folder not found", stderr);

        (code, _, stderr) = CliRunner.Run("merge-test", "--out", P("x"));
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--corpus", stderr);
    }

    [Fact]
    public void BuiltIn_WithoutEmbedding_EmbedsFirstIntoOutFolder()
    {
        string corpus = _dir.Write("corpus.txt", Corpus(7, 1500));
        _dir.Write("user.csv", $"w1,w2\n{Words[2]},{Words[30]}\n");
        var (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", corpus, "--out", P("auto"), "--pairs-file", P("user.csv"), "--threads", "1", "--min-pairs", "1");
        Assert.True(code is ExitCodes.Ok or ExitCodes.MergeTestFailed, stderr);
        Assert.Contains("embedding the corpus into", stderr);
        Assert.True(File.Exists(P("auto/embedding/manifest.json")));
        Assert.True(File.Exists(P("auto/merge-test.json")));
        // A second run reuses it.
        (code, _, stderr) = CliRunner.Run("merge-test", "--corpus", corpus, "--out", P("auto"), "--pairs-file", P("user.csv"), "--threads", "1", "--min-pairs", "1");
        Assert.Contains("using the embedding in", stderr);
    }
}
