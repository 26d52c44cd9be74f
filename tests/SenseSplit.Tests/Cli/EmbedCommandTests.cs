using System.IO.Compression;
using System.Text;
using System.Text.Json;
using SenseSplit.Cli;
using SenseSplit.Cli.Commands;

namespace SenseSplit.Tests.Cli;

public sealed class EmbedCommandTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("sensesplit-embed-test-").FullName;

    public void Dispose()
    {
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    private (int Code, string Out, string Err) Run(params string[] args)
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(args, stdout, stderr);
        return (code, stdout.ToString(), stderr.ToString());
    }

    /// <summary>A small two-topic corpus: animal sentences and finance sentences, seeded.</summary>
    private static string Corpus(int lines, int seed)
    {
        string[] animals = ["dog", "cat", "horse", "cow", "sheep", "goat"];
        string[] animalVerbs = ["eats", "runs", "sleeps", "grazes", "barks"];
        string[] money = ["bank", "loan", "credit", "market", "stock", "bond"];
        string[] moneyVerbs = ["rises", "falls", "pays", "trades", "lends"];
        string[] fillers = ["the", "a", "in", "on", "with", "and"];
        var rng = new Random(seed);
        var sb = new StringBuilder();
        for (int i = 0; i < lines; i++)
        {
            bool a = rng.Next(2) == 0;
            var nouns = a ? animals : money;
            var verbs = a ? animalVerbs : moneyVerbs;
            sb.Append(fillers[rng.Next(fillers.Length)]).Append(' ').Append(nouns[rng.Next(nouns.Length)]).Append(' ')
              .Append(verbs[rng.Next(verbs.Length)]).Append(' ').Append(fillers[rng.Next(fillers.Length)]).Append(' ')
              .Append(nouns[rng.Next(nouns.Length)]).Append(i % 7 == 0 ? ". New York" : ".").Append(i % 3 == 0 ? "\r\n" : "\n");
        }
        return sb.ToString();
    }

    private string Write(string name, string text)
    {
        string path = Path.Combine(_dir, name);
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        File.WriteAllText(path, text, new UTF8Encoding(false));
        return path;
    }

    private static (string[] Words, float[][] Vectors) ReadVectors(string path)
    {
        var lines = File.ReadAllLines(path);
        var head = lines[0].Split(' ');
        int n = int.Parse(head[0], System.Globalization.CultureInfo.InvariantCulture), d = int.Parse(head[1], System.Globalization.CultureInfo.InvariantCulture);
        Assert.Equal(n, lines.Length - 1);
        var words = new string[n];
        var vectors = new float[n][];
        for (int i = 0; i < n; i++)
        {
            var parts = lines[i + 1].Split(' ');
            Assert.Equal(d + 1, parts.Length);
            words[i] = parts[0];
            vectors[i] = parts.Skip(1).Select(p => float.Parse(p, System.Globalization.CultureInfo.InvariantCulture)).ToArray();
        }
        return (words, vectors);
    }

    private static double Cosine(float[] a, float[] b)
    {
        double ab = 0, aa = 0, bb = 0;
        for (int i = 0; i < a.Length; i++) { ab += a[i] * b[i]; aa += a[i] * a[i]; bb += b[i] * b[i]; }
        return ab / Math.Sqrt(aa * bb);
    }

    [Fact]
    public void Embed_SmallCorpus_WritesAllFilesAndTopicsSeparate()
    {
        string corpus = Write("corpus.txt", Corpus(3000, 1));
        string outDir = Path.Combine(_dir, "out");
        var (code, _, err) = Run("embed", corpus, "--out", outDir, "--dim", "10", "--min-count", "2");
        Assert.True(code == ExitCodes.Ok, err);
        foreach (var f in new[] { "vectors.txt", "counts.tsv", "manifest.json", "basis.npy", "singular-values.npy", "context-counts.npy" })
            Assert.True(File.Exists(Path.Combine(outDir, f)), $"{f} missing");
        Assert.Empty(Directory.GetDirectories(_dir, "out.partial-*"));
        var (words, vectors) = ReadVectors(Path.Combine(outDir, "vectors.txt"));
        Assert.Equal(10, vectors[0].Length);
        int W(string w) => Array.IndexOf(words, w);
        // Same-topic nouns are closer than cross-topic nouns (the corpus is built that way).
        double same = Cosine(vectors[W("dog")], vectors[W("cat")]);
        double cross = Cosine(vectors[W("dog")], vectors[W("bank")]);
        Assert.True(same > cross + 0.3, $"cos(dog,cat) = {same}, cos(dog,bank) = {cross}");

        var counts = File.ReadAllLines(Path.Combine(outDir, "counts.tsv"));
        Assert.Equal("word\tcount", counts[0]);
        Assert.Equal(words.Length, counts.Length - 1);
        Assert.Equal(words[0], counts[1].Split('\t')[0]);

        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, "manifest.json")));
        var root = manifest.RootElement;
        Assert.Equal(10, root.GetProperty("dimensions").GetInt32());
        Assert.Equal(words.Length, root.GetProperty("words").GetInt32());
        Assert.Equal(64, root.GetProperty("inputs")[0].GetProperty("sha256").GetString()!.Length);
        Assert.Equal(Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(corpus))), root.GetProperty("inputs")[0].GetProperty("sha256").GetString());
        Assert.Equal(10, root.GetProperty("singularValues").GetArrayLength());
        Assert.Equal(0.75, root.GetProperty("parameters").GetProperty("contextSmoothing").GetDouble());

        // .npy header: magic, version 1.0, shape of the basis = contexts × dimensions.
        var npy = File.ReadAllBytes(Path.Combine(outDir, "basis.npy"));
        Assert.Equal(0x93, npy[0]);
        Assert.Equal("NUMPY", Encoding.ASCII.GetString(npy, 1, 5));
        int headerLength = npy[8] | (npy[9] << 8);
        Assert.Equal(0, (10 + headerLength) % 64);
        string header = Encoding.ASCII.GetString(npy, 10, headerLength);
        Assert.Contains($"'shape': ({words.Length}, 10)", header);
        Assert.Equal(10 + headerLength + words.Length * 10 * 4, npy.Length);
        Assert.Contains("done:", err);
        // Progress and summary of every pass on stderr.
        Assert.Contains("pass 1 (vocabulary):", err);
        Assert.Contains("pass 2 (co-occurrences", err);
        Assert.Contains("M tokens/s", err);
        Assert.Contains("SVD: 10 dimensions", err);
    }

    [Fact]
    public void Embed_OneLineOfSeveralMegabytes_IsStreamed()
    {
        // 3 MB without a line end (longer than the reader's 1 MB chunks), plus a 300-letter junk token split over chunks.
        var rng = new Random(10);
        var sb = new StringBuilder();
        string[] words = ["alpha", "beta", "gamma", "delta", "epsilon", "zeta", "eta", "theta"];
        while (sb.Length < 3_000_000)
        {
            sb.Append(words[rng.Next(words.Length)]).Append(' ');
            if (sb.Length > 1_048_000 && sb.Length < 1_048_600) sb.Append(new string('q', 300)).Append(' ');
        }
        string corpus = Write("long.txt", sb.ToString());
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "3");
        Assert.True(code == 0, err);
        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "out", "manifest.json")));
        Assert.Equal(8, manifest.RootElement.GetProperty("words").GetInt32());
        Assert.True(manifest.RootElement.GetProperty("overlongTokensDropped").GetInt64() >= 1);
        long total = File.ReadAllLines(Path.Combine(_dir, "out", "counts.tsv")).Skip(1).Sum(l => long.Parse(l.Split('\t')[1], System.Globalization.CultureInfo.InvariantCulture));
        Assert.Equal(sb.ToString().Split(' ', StringSplitOptions.RemoveEmptyEntries).Count(w => w[0] != 'q'), total);
    }

    [Fact]
    public void Embed_FoldNumbers_CountsTheMarker()
    {
        var sb = new StringBuilder();
        for (int i = 0; i < 400; i++) sb.Append("year ").Append(1900 + i % 100).Append(" price 3.").Append(i % 10).Append(" dollars\n");
        string corpus = Write("numbers.txt", sb.ToString());
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "2", "--fold-numbers");
        Assert.True(code == 0, err);
        var counts = File.ReadAllLines(Path.Combine(_dir, "out", "counts.tsv"));
        Assert.Equal("<num>\t800", counts[1]);
        Assert.DoesNotContain(counts, l => l.StartsWith("19", StringComparison.Ordinal));
    }

    [Fact]
    public void Embed_SameSeed_DifferentThreads_IdenticalVectors()
    {
        string corpus = Write("corpus.txt", Corpus(2000, 2));
        Assert.Equal(0, Run("embed", corpus, "--out", Path.Combine(_dir, "a"), "--dim", "8", "--threads", "1").Code);
        Assert.Equal(0, Run("embed", corpus, "--out", Path.Combine(_dir, "b"), "--dim", "8", "--threads", "2").Code);
        Assert.Equal(File.ReadAllBytes(Path.Combine(_dir, "a", "vectors.txt")), File.ReadAllBytes(Path.Combine(_dir, "b", "vectors.txt")));
        Assert.Equal(File.ReadAllBytes(Path.Combine(_dir, "a", "basis.npy")), File.ReadAllBytes(Path.Combine(_dir, "b", "basis.npy")));
    }

    [Fact]
    public void Embed_FolderWithGzipAndTxt_ReadsBothWithSmallMemoryBudget()
    {
        string text = Corpus(2000, 3);
        Write(Path.Combine("in", "part1.txt"), text[..(text.Length / 2)]);
        string gz = Path.Combine(_dir, "in", "sub", "part2.txt.gz");
        Directory.CreateDirectory(Path.GetDirectoryName(gz)!);
        using (var f = File.Create(gz))
        using (var z = new GZipStream(f, CompressionLevel.Fastest))
            z.Write(Encoding.UTF8.GetBytes(text[(text.Length / 2)..]));
        Write(Path.Combine("in", "ignored.md"), "zebra zebra zebra zebra zebra zebra");
        var (code, _, err) = Run("embed", Path.Combine(_dir, "in"), "--out", Path.Combine(_dir, "out"), "--dim", "5", "--memory", "16M");
        Assert.True(code == 0, err);
        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "out", "manifest.json")));
        Assert.Equal(2, manifest.RootElement.GetProperty("inputs").GetArrayLength());
        Assert.DoesNotContain("zebra", File.ReadAllText(Path.Combine(_dir, "out", "counts.tsv")));
        // Same counts as from the plain single file.
        Write("whole.txt", text);
        Assert.Equal(0, Run("embed", Path.Combine(_dir, "whole.txt"), "--out", Path.Combine(_dir, "out2"), "--dim", "5").Code);
        Assert.Equal(File.ReadAllText(Path.Combine(_dir, "out2", "counts.tsv")), File.ReadAllText(Path.Combine(_dir, "out", "counts.tsv")));
    }

    [Fact]
    public void Embed_StandardInput_IsSpooledAndNamedDash()
    {
        var previous = EmbedCommand.StandardInput;
        try
        {
            byte[] bytes = Encoding.UTF8.GetBytes(Corpus(1000, 4));
            EmbedCommand.StandardInput = () => new MemoryStream(bytes);
            var (code, _, err) = Run("embed", "-", "--out", Path.Combine(_dir, "out"), "--dim", "4");
            Assert.True(code == 0, err);
            using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "out", "manifest.json")));
            Assert.Equal("-", manifest.RootElement.GetProperty("inputs")[0].GetProperty("name").GetString());
        }
        finally { EmbedCommand.StandardInput = previous; }
    }

    [Fact]
    public void Embed_InvalidUtf8_IsReplacedAndCounted()
    {
        var bytes = new List<byte>(Encoding.UTF8.GetBytes(Corpus(800, 5)));
        bytes.InsertRange(100, [0xFF, 0xFE]);
        bytes.InsertRange(5000, [0xC3]); // truncated two-byte sequence
        string path = Path.Combine(_dir, "bad.txt");
        File.WriteAllBytes(path, bytes.ToArray());
        var (code, _, err) = Run("embed", path, "--out", Path.Combine(_dir, "out"), "--dim", "4");
        Assert.True(code == 0, err);
        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "out", "manifest.json")));
        Assert.Equal(3, manifest.RootElement.GetProperty("invalidUtf8Bytes").GetInt64());
        Assert.Contains("3 invalid UTF-8 bytes", err);
    }

    [Fact]
    public void Embed_PhraseList_JoinsListedPhrases()
    {
        string corpus = Write("corpus.txt", Corpus(2000, 6));
        string list = Write("phrases.txt", "New York\n# comment\nsingle\n");
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "4", "--phrase-list", list);
        Assert.True(code == 0, err);
        var counts = File.ReadAllLines(Path.Combine(_dir, "out", "counts.tsv")).Skip(1).Select(l => l.Split('\t')).ToDictionary(p => p[0], p => long.Parse(p[1], System.Globalization.CultureInfo.InvariantCulture));
        // "New York" ends every 7th line: 2000 / 7 rounded up = 286 occurrences, and no loose "york" is left.
        Assert.Equal(286, counts["new_york"]);
        Assert.False(counts.ContainsKey("york"));
        Assert.Contains("fewer than two words", err);
    }

    [Fact]
    public void Embed_Phrases_FindsCollocationByNpmi()
    {
        string corpus = Write("corpus.txt", Corpus(3000, 7));
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "4", "--phrases");
        Assert.True(code == 0, err);
        var words = File.ReadAllLines(Path.Combine(_dir, "out", "counts.tsv")).Skip(1).Select(l => l.Split('\t')[0]).ToList();
        Assert.Contains("new_york", words);
        // Pairs of the random grammar are not collocations at NPMI ≥ 0.5.
        Assert.DoesNotContain(words, w => w.Contains('_') && w != "new_york");
    }

    [Fact]
    public void Embed_MissingFile_ReportsNameAndBadInput()
    {
        var (code, _, err) = Run("embed", Path.Combine(_dir, "nope.txt"), "--out", Path.Combine(_dir, "out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("nope.txt", err);
        Assert.False(Directory.Exists(Path.Combine(_dir, "out")));
    }

    [Fact]
    public void Embed_CorruptGzip_ReportsName()
    {
        string path = Path.Combine(_dir, "broken.txt.gz");
        File.WriteAllBytes(path, [0x1f, 0x8b, 8, 0, 0, 0, 0, 0, 0, 3, 0xde, 0xad, 0xbe, 0xef, 1, 2, 3]);
        var (code, _, err) = Run("embed", path, "--out", Path.Combine(_dir, "out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("broken.txt.gz", err);
        Assert.Contains("gzip", err);
    }

    [Fact]
    public void Embed_EmptyCorpus_AndEmptyVocabulary_AreClearErrors()
    {
        string empty = Write("empty.txt", " \n--- !!! \n");
        var (code, _, err) = Run("embed", empty, "--out", Path.Combine(_dir, "out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("empty corpus", err);
        Assert.Contains("empty.txt", err);

        string rare = Write("rare.txt", "one two three four\n");
        (code, _, err) = Run("embed", rare, "--out", Path.Combine(_dir, "out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("vocabulary is empty", err);
        Assert.Contains("--min-count 5", err);
        Assert.Contains("rare.txt", err);
    }

    [Fact]
    public void Embed_DimAboveVocabulary_IsClampedWithWarning()
    {
        string corpus = Write("corpus.txt", Corpus(500, 8));
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "300");
        Assert.True(code == 0, err);
        Assert.Contains("warning: --dim 300 exceeds the vocabulary", err);
    }

    [Fact]
    public void Embed_ExistingOutput_RefusedWithoutOverwrite()
    {
        string corpus = Write("corpus.txt", Corpus(300, 9));
        Directory.CreateDirectory(Path.Combine(_dir, "out"));
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "3");
        Assert.Equal(ExitCodes.WriteFailed, code);
        Assert.Contains("--overwrite", err);
        Assert.Equal(0, Run("embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "3", "--overwrite").Code);
    }

    [Theory]
    [InlineData("--window", "0")]
    [InlineData("--memory", "lots")]
    [InlineData("--neg", "0.5")]
    public void Embed_BadOption_IsUsageError(string option, string value)
    {
        string corpus = Write("corpus.txt", "a b c\n");
        var (code, _, err) = Run("embed", corpus, "--out", Path.Combine(_dir, "out"), option, value);
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains(option, err);
    }
}

public sealed class EmbedSpillTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("sensesplit-embed-spill-").FullName;

    public void Dispose()
    {
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    [Fact]
    public void Embed_MemoryBudgetForcingDiskRuns_GivesIdenticalOutput()
    {
        // Many distinct pairs (3000 random words) so a 16M budget must spill sorted runs to disk.
        var rng = new Random(31);
        var sb = new StringBuilder();
        for (int line = 0; line < 40_000; line++)
        {
            for (int t = 0; t < 8; t++) sb.Append('w').Append(rng.Next(3000).ToString(System.Globalization.CultureInfo.InvariantCulture)).Append(' ');
            sb.Append('\n');
        }
        string corpus = Path.Combine(_dir, "c.txt");
        File.WriteAllText(corpus, sb.ToString());
        var err1 = new StringWriter();
        string temp = Path.Combine(_dir, "temp");
        Directory.CreateDirectory(temp);
        Assert.Equal(0, CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "small"), "--dim", "6", "--memory", "16M", "--min-count", "1", "--temp-dir", temp], new StringWriter(), err1));
        Assert.Equal(0, CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "big"), "--dim", "6", "--min-count", "1"], new StringWriter(), new StringWriter()));
        using var manifest = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "small", "manifest.json")));
        Assert.True(manifest.RootElement.GetProperty("spilledRuns").GetInt32() > 0, err1.ToString());
        Assert.Equal(File.ReadAllBytes(Path.Combine(_dir, "big", "vectors.txt")), File.ReadAllBytes(Path.Combine(_dir, "small", "vectors.txt")));
        // The temporary run files are gone.
        Assert.Empty(Directory.GetFileSystemEntries(temp));
    }

    [Fact]
    public void Embed_VocabularyBeyondTableBudget_PrunesAndKeepsFrequentWordsExactly()
    {
        // 300 frequent words (Zipf-like) and ~200,000 one-off tokens: with --memory 16M the word table (a quarter,
        // 4 MB) must be pruned. Frequent words (all above --min-count 20, far above the pruning threshold) are all kept
        // and counted again exactly, and the counting pass reads the text again, so the output equals that of an
        // unpruned run (lossy counting: Manku & Motwani 2002, §4.2, every item above the threshold is kept).
        var rng = new Random(41);
        var sb = new StringBuilder();
        for (int line = 0; line < 60_000; line++)
        {
            for (int t = 0; t < 12; t++)
            {
                if (rng.NextDouble() < 0.3) sb.Append('u').Append(rng.NextInt64(1L << 40).ToString("x", System.Globalization.CultureInfo.InvariantCulture));
                else sb.Append('w').Append(Math.Min(299, (int)(1 / (1 - rng.NextDouble())) - 1).ToString(System.Globalization.CultureInfo.InvariantCulture));
                sb.Append(' ');
            }
            sb.Append('\n');
        }
        string corpus = Path.Combine(_dir, "c.txt");
        File.WriteAllText(corpus, sb.ToString());
        var err = new StringWriter();
        Assert.Equal(0, CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "small"), "--dim", "8", "--memory", "16M", "--min-count", "20"], new StringWriter(), err));
        Assert.Equal(0, CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "big"), "--dim", "8", "--min-count", "20"], new StringWriter(), new StringWriter()));
        using var small = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "small", "manifest.json")));
        using var big = JsonDocument.Parse(File.ReadAllText(Path.Combine(_dir, "big", "manifest.json")));
        Assert.True(small.RootElement.GetProperty("vocabularyPrunings").GetInt32() > 0, err.ToString());
        long threshold = small.RootElement.GetProperty("vocabularyPruneThreshold").GetInt64();
        Assert.InRange(threshold, 1, 19);
        Assert.Equal(0, big.RootElement.GetProperty("vocabularyPrunings").GetInt32());
        Assert.True(small.RootElement.GetProperty("distinctTokens").GetInt64() < big.RootElement.GetProperty("distinctTokens").GetInt64());
        Assert.Contains("the vocabulary is the same as without pruning", err.ToString());
        Assert.Contains("reading the text again", err.ToString());
        Assert.Equal(File.ReadAllBytes(Path.Combine(_dir, "big", "counts.tsv")), File.ReadAllBytes(Path.Combine(_dir, "small", "counts.tsv")));
        Assert.Equal(File.ReadAllBytes(Path.Combine(_dir, "big", "vectors.txt")), File.ReadAllBytes(Path.Combine(_dir, "small", "vectors.txt")));
        // With --min-count at or below the threshold, words of the tail may be missing: a warning says so.
        var err2 = new StringWriter();
        Assert.Equal(0, CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "low"), "--dim", "8", "--memory", "16M", "--min-count", "1"], new StringWriter(), err2));
        Assert.Contains("may be missing", err2.ToString());
    }
}
