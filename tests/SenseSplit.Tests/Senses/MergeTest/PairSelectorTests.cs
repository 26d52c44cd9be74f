using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class PairSelectorTests
{
    // 3,000 words with Zipf counts f_i = round(2·10⁶ / (i+1)) (Zipf's law with exponent 1, common practice for text)
    // and random Gaussian vectors in 40 dimensions, where |cos| of two random words exceeds 0.2 about a fifth of the
    // time, so the cosine rule really rejects candidates. Every tenth word gets a near-copy (cos ≈ 0.99) so that
    // neighbour sets overlap for some candidates.
    private static (string[] words, float[] vectors, long[] counts) Vocabulary(int n = 3000, int dims = 40, int seed = 7)
    {
        var rng = new Random(seed);
        var words = Enumerable.Range(0, n).Select(i => $"w{i}").ToArray();
        var counts = Enumerable.Range(0, n).Select(i => (long)Math.Round(2e6 / (i + 1))).ToArray();
        var vectors = MergeTestData.GaussianMatrix(rng, n, dims);
        for (int i = 10; i < n; i += 10)
            for (int j = 0; j < dims; j++) vectors[i * dims + j] = vectors[(i - 1) * dims + j] + (float)(0.1 * MergeTestData.Gaussian(rng));
        return (words, vectors, counts);
    }

    private static double Cosine(float[] v, int dims, int a, int b)
    {
        double dot = 0, na = 0, nb = 0;
        for (int j = 0; j < dims; j++) { double x = v[a * dims + j], y = v[b * dims + j]; dot += x * y; na += x * x; nb += y * y; }
        return dot / Math.Sqrt(na * nb);
    }

    // Brute-force top-k by sorting all cosines: an independent check of the selector's neighbour lists.
    private static HashSet<int> TopK(float[] v, int dims, int n, int word, int k)
        => Enumerable.Range(0, n).Where(j => j != word).OrderByDescending(j => Cosine(v, dims, word, j)).Take(k).ToHashSet();

    private static readonly PairSelectionSettings Settings = new() { Pairs = 48, Bins = 8, MaxRatio = 1000, Seed = 3 };

    [Fact]
    public void Select_RespectsEveryConstraint()
    {
        var (words, vectors, counts) = Vocabulary();
        int dims = 40;
        var selection = new PairSelector(words, vectors, dims, counts).Select(Settings);
        Assert.Equal(48, selection.Pairs.Count);
        var seen = new HashSet<string>();
        foreach (var p in selection.Pairs)
        {
            Assert.True(seen.Add(p.FrequentWord), $"{p.FrequentWord} used twice");
            Assert.True(seen.Add(p.RareWord), $"{p.RareWord} used twice");
            Assert.True(p.FrequentCount >= p.RareCount);
            Assert.True(p.RareCount >= Settings.MinRareCount);
            Assert.InRange(p.Ratio, 1, Settings.MaxRatio);
            Assert.Equal(counts[p.FrequentIndex], p.FrequentCount);
            Assert.Equal(words[p.RareIndex], p.RareWord);
            double cos = Cosine(vectors, dims, p.FrequentIndex, p.RareIndex);
            Assert.True(Math.Abs(cos) < 0.2, $"({p.FrequentWord}, {p.RareWord}) cos {cos}");
            Assert.Equal(cos, p.Cosine, 5);
            var n1 = TopK(vectors, dims, words.Length, p.FrequentIndex, 10);
            var n2 = TopK(vectors, dims, words.Length, p.RareIndex, 10);
            Assert.False(n1.Overlaps(n2), $"({p.FrequentWord}, {p.RareWord}) share neighbours");
            Assert.DoesNotContain(p.RareIndex, n1);
            Assert.DoesNotContain(p.FrequentIndex, n2);
        }
    }

    [Fact]
    public void Select_CoversEveryRatioBinEvenly()
    {
        var (words, vectors, counts) = Vocabulary();
        var selection = new PairSelector(words, vectors, 40, counts).Select(Settings);
        var bins = selection.Bins;
        for (int b = 0; b < bins.Count; b++)
        {
            Assert.Equal(6, selection.TargetPerBin[b]);
            Assert.Equal(6, selection.PairsPerBin[b]);
            Assert.Equal(6, selection.Pairs.Count(p => bins.Of(p.Ratio) == b));
        }
        Assert.Empty(selection.Notes);
    }

    [Fact]
    public void Select_SameSeedSamePairs_OtherSeedOtherPairs()
    {
        var (words, vectors, counts) = Vocabulary();
        var a = new PairSelector(words, vectors, 40, counts).Select(Settings);
        var b = new PairSelector(words, vectors, 40, counts).Select(Settings);
        var c = new PairSelector(words, vectors, 40, counts).Select(Settings with { Seed = 4 });
        Assert.Equal(a.Pairs, b.Pairs);
        Assert.NotEqual(a.Pairs, c.Pairs);
    }

    [Fact]
    public void Select_ExcludedAndMarkedWords_NeverUsed()
    {
        var (words, vectors, counts) = Vocabulary();
        words[0] = "odd" + PseudoWord.Marker + "token";
        var excluded = new HashSet<string>(Enumerable.Range(1, 5).Select(i => $"w{i}"));
        var selection = new PairSelector(words, vectors, 40, counts).Select(Settings with { Excluded = excluded });
        var used = selection.Pairs.SelectMany(p => new[] { p.FrequentWord, p.RareWord }).ToHashSet();
        Assert.DoesNotContain(words[0], used);
        Assert.False(used.Overlaps(excluded));
    }

    [Fact]
    public void Select_SmallVocabulary_ReportsShortfall()
    {
        var (words, vectors, counts) = Vocabulary(n: 60);
        var selection = new PairSelector(words, vectors, 40, counts).Select(new PairSelectionSettings());
        Assert.True(selection.Pairs.Count <= 30); // 60 words make at most 30 pairs
        Assert.True(selection.Pairs.Count < 200);
        Assert.Contains(selection.Notes, n => n.Contains("of 200 pairs found"));
        Assert.Contains(selection.Notes, n => n.StartsWith("ratio bin"));
    }

    [Fact]
    public void Select_MinRareCount_Respected()
    {
        var (words, vectors, counts) = Vocabulary();
        var selection = new PairSelector(words, vectors, 40, counts).Select(Settings with { MinRareCount = 2000, Bins = 4, Pairs = 16, MaxRatio = 100 });
        Assert.All(selection.Pairs, p => Assert.True(p.RareCount >= 2000));
        Assert.Equal(16, selection.Pairs.Count);
    }

    [Fact]
    public void NearestNeighbours_MatchBruteForce()
    {
        var (words, vectors, counts) = Vocabulary(n: 400);
        var selector = new PairSelector(words, vectors, 40, counts);
        foreach (int w in new[] { 0, 9, 10, 399 })
            Assert.Equal(TopK(vectors, 40, 400, w, 10), selector.NearestNeighbours(w, 10).ToHashSet());
        Assert.Contains(9, selector.NearestNeighbours(10, 1)); // the planted near-copy is the nearest
    }

    [Fact]
    public void FromUser_ValidPairs_OrderedByFrequencyWithNotes()
    {
        var (words, vectors, counts) = Vocabulary(n: 400);
        var selector = new PairSelector(words, vectors, 40, counts);
        var selection = selector.FromUser([("w300", "w2"), ("w9", "w10")]);
        Assert.Equal("w2", selection.Pairs[0].FrequentWord); // w2 is the more frequent one
        Assert.Equal("w300", selection.Pairs[0].RareWord);
        Assert.Equal(301.0 / 3, selection.Pairs[0].Ratio, 1);
        // (w9, w10) are near-copies: kept, but the notes say they break the cosine and neighbour rules.
        Assert.Contains(selection.Notes, n => n.Contains("pair 2 (w9, w10)") && n.Contains("|cos|"));
        Assert.Contains(selection.Notes, n => n.Contains("pair 2 (w9, w10)") && n.Contains("neighbours"));
    }

    [Theory]
    [InlineData("w1", "nosuch", "'nosuch' is not in the vocabulary")]
    [InlineData("w1", "w1", "the two words must differ")]
    public void FromUser_BadPair_ThrowsNamingPair(string a, string b, string message)
    {
        var (words, vectors, counts) = Vocabulary(n: 50);
        var ex = Assert.Throws<ArgumentException>(() => new PairSelector(words, vectors, 40, counts).FromUser([("w3", "w4"), (a, b)]));
        Assert.Contains($"pair 2 ({a}, {b})", ex.Message);
        Assert.Contains(message, ex.Message);
    }

    [Fact]
    public void FromUser_WordReused_ThrowsNamingEarlierPair()
    {
        var (words, vectors, counts) = Vocabulary(n: 50);
        var ex = Assert.Throws<ArgumentException>(() => new PairSelector(words, vectors, 40, counts).FromUser([("w3", "w4"), ("w5", "w6"), ("w4", "w7")]));
        Assert.Contains("pair 3 (w4, w7): 'w4' is already used in pair 1", ex.Message);
    }

    [Fact]
    public void Constructor_DuplicateWordOrShapeMismatch_Throws()
    {
        Assert.Throws<ArgumentException>(() => new PairSelector(["a", "a"], new float[4], 2, [1, 1]));
        Assert.Throws<ArgumentException>(() => new PairSelector(["a", "b"], new float[3], 2, [1, 1]));
        Assert.Throws<ArgumentException>(() => new PairSelector(["a", "b"], new float[4], 2, [1]));
        Assert.Throws<ArgumentException>(() => new PairSelector(["a", "b"], [0, float.NaN, 0, 0], 2, [1, 1]));
    }
}
