using System.Globalization;
using System.IO.Compression;
using System.Text;
using System.Text.RegularExpressions;
using SenseSplit.Cli;
using SenseSplit.Tests.RealText;
using Xunit.Abstractions;

namespace SenseSplit.Tests.Cli;

/// <summary>
/// Embeds a fixed slice of real English (GNU Collaborative International Dictionary of English, GCIDE 0.48, derived
/// from Webster's Revised Unabridged Dictionary 1913; Debian package dict-gcide) and checks the vectors against an
/// outside judgement of meaning: Princeton WordNet 3.0 synsets (Debian package wordnet-base). Words that share a
/// synset must be closer on average (cosine) than random pairs of the same words.
/// </summary>
[Trait("Category", "RealText")]
public sealed class EmbedRealTextTests(ITestOutputHelper output) : IDisposable
{
    private const string Gcide = "/usr/share/dictd/gcide.dict.dz";
    private const string WordNet = "/usr/share/wordnet";
    private const string Install = "sudo apt-get install dict-gcide wordnet-base (or: bash scripts/install-test-deps.sh)";
    private readonly string _dir = Directory.CreateTempSubdirectory("sensesplit-realtext-").FullName;

    public void Dispose()
    {
        try { Directory.Delete(_dir, recursive: true); } catch (IOException) { }
    }

    [Fact]
    public void Embed_GcideSlice_WordNetSynonymsCloserThanRandomPairs()
    {
        // Fail loudly (not skip): CI installs these packages through scripts/install-test-deps.sh.
        Assert.True(File.Exists(Gcide), $"{Gcide} is missing: {Install}");
        Assert.True(File.Exists(Path.Combine(WordNet, "data.noun")), $"{WordNet}/data.noun is missing: {Install}");

        // Fixed slice: the lines 400,000-900,000 of the dictionary text (letters C to H or so), markup stripped.
        string corpus = Path.Combine(_dir, "gcide-slice.txt");
        File.WriteAllLines(corpus, OpenCorpora.GcideLines().Skip(400_000).Take(500_000), new UTF8Encoding(false));
        output.WriteLine($"slice: {new FileInfo(corpus).Length / 1e6:F1} MB");

        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(["embed", corpus, "--out", Path.Combine(_dir, "out"), "--dim", "100", "--max-words", "20000", "--seed", "1"], stdout, stderr);
        output.WriteLine(stderr.ToString());
        Assert.Equal(ExitCodes.Ok, code);

        var (words, vectors) = LoadNormalised(Path.Combine(_dir, "out", "vectors.txt"));
        var index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < words.Length; i++) index[words[i]] = i;
        // Skip the 100 most frequent words (function words) so the check is about content words.
        var pairs = SynonymPairs().Where(p => index.TryGetValue(p.A, out int a) && index.TryGetValue(p.B, out int b) && a >= 100 && b >= 100)
            .Select(p => (index[p.A], index[p.B])).Distinct().ToList();
        Assert.True(pairs.Count >= 300, $"only {pairs.Count} WordNet synonym pairs in the vocabulary");
        double synonymMean = pairs.Average(p => Dot(vectors[p.Item1], vectors[p.Item2]));

        // Random pairs over the same words (so word frequency is matched), seeded.
        var members = pairs.SelectMany(p => new[] { p.Item1, p.Item2 }).Distinct().ToArray();
        var rng = new Random(12345);
        double randomSum = 0;
        int randomCount = 20_000;
        for (int t = 0; t < randomCount; t++)
        {
            int a = members[rng.Next(members.Length)], b = members[rng.Next(members.Length)];
            if (a == b) { t--; continue; }
            randomSum += Dot(vectors[a], vectors[b]);
        }
        double randomMean = randomSum / randomCount;
        output.WriteLine($"WordNet synonym pairs: {pairs.Count}, mean cosine {synonymMean:F4}; random pairs of the same words: mean cosine {randomMean:F4}");
        // A clear margin: synonyms are at least 0.1 closer in mean cosine than random pairs.
        Assert.True(synonymMean > randomMean + 0.1, $"synonyms {synonymMean:F4} vs random {randomMean:F4}");
    }

    private static double Dot(float[] a, float[] b)
    {
        double s = 0;
        for (int i = 0; i < a.Length; i++) s += a[i] * b[i];
        return s;
    }

    private static (string[] Words, float[][] Vectors) LoadNormalised(string path)
    {
        var lines = File.ReadAllLines(path);
        var words = new string[lines.Length - 1];
        var vectors = new float[lines.Length - 1][];
        for (int i = 1; i < lines.Length; i++)
        {
            var parts = lines[i].Split(' ');
            words[i - 1] = parts[0];
            var v = parts.Skip(1).Select(p => float.Parse(p, CultureInfo.InvariantCulture)).ToArray();
            double norm = Math.Sqrt(v.Sum(x => (double)x * x));
            if (norm > 0) for (int j = 0; j < v.Length; j++) v[j] = (float)(v[j] / norm);
            vectors[i - 1] = v;
        }
        return (words, vectors);
    }

    /// <summary>Pairs of distinct one-word lemmas sharing a WordNet 3.0 synset (data.noun/verb/adj/adv: after the offset,
    /// lexicographer file and synset type comes w_cnt in hex, then w_cnt pairs of lemma and lex_id).</summary>
    private static IEnumerable<(string A, string B)> SynonymPairs()
    {
        foreach (var pos in new[] { "noun", "verb", "adj", "adv" })
        {
            foreach (var line in File.ReadLines(Path.Combine(WordNet, "data." + pos)))
            {
                if (line.StartsWith("  ", StringComparison.Ordinal)) continue; // licence header
                var f = line.Split(' ');
                int count = int.Parse(f[3], NumberStyles.HexNumber, CultureInfo.InvariantCulture);
                var lemmas = new List<string>();
                for (int i = 0; i < count; i++)
                {
                    string lemma = f[4 + 2 * i];
                    int paren = lemma.IndexOf('(');
                    if (paren >= 0) lemma = lemma[..paren]; // adjective markers such as "(a)"
                    lemma = lemma.ToLowerInvariant();
                    if (lemma.Contains('_') || lemma.Contains('-') || lemmas.Contains(lemma)) continue;
                    lemmas.Add(lemma);
                }
                for (int i = 0; i < lemmas.Count; i++)
                    for (int j = i + 1; j < lemmas.Count; j++)
                        yield return string.CompareOrdinal(lemmas[i], lemmas[j]) < 0 ? (lemmas[i], lemmas[j]) : (lemmas[j], lemmas[i]);
            }
        }
    }
}
