using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class PairSelectorTests
{
    // 3,000 words. The 100 most frequent (the ones the selector skips as function words) have Zipf counts
    // f_i = round(2·10⁶ / (i+1)) (Zipf's law with exponent 1, common practice for text); below them counts fall
    // log-linearly from 19,802 to 20 at the last row, so that the pairable words alone span a ratio of 1000, as the
    // long tail of a corpus of some 25 M tokens does (a Zipf tail over 3,000 words would span only 30). Random Gaussian
    // vectors in 40 dimensions, where |cos| of two random words exceeds 0.2 about a fifth of the time, so the cosine
    // rule really rejects candidates. Every tenth word gets a near-copy (cos ≈ 0.99) so that neighbour sets overlap
    // for some candidates.
    private static (string[] words, float[] vectors, long[] counts) Vocabulary(int n = 3000, int dims = 40, int seed = 7)
    {
        var rng = new Random(seed);
        var words = Enumerable.Range(0, n).Select(W).ToArray();
        var counts = Enumerable.Range(0, n).Select(i => i < 100 || n <= 101
            ? (long)Math.Round(2e6 / (i + 1))
            : (long)Math.Round(19_802 * Math.Pow(20 / 19_802.0, (i - 100) / (double)(n - 101)))).ToArray();
        var vectors = MergeTestData.GaussianMatrix(rng, n, dims);
        for (int i = 10; i < n; i += 10)
            for (int j = 0; j < dims; j++) vectors[i * dims + j] = vectors[(i - 1) * dims + j] + (float)(0.1 * MergeTestData.Gaussian(rng));
        return (words, vectors, counts);
    }

    /// <summary>Name of row i: "w" and i written in the letters a–j for the digits 0–9 ("wbc" is row 12), so that
    /// names are plain words (no digit) and the pair choice does not skip them.</summary>
    private static string W(int i) => "w" + string.Concat(i.ToString(System.Globalization.CultureInfo.InvariantCulture).Select(d => (char)('a' + d - '0')));

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
            // Counts fall with the row, so the 100 most frequent words (the function words) are rows 0–99.
            Assert.True(p.FrequentIndex >= 100 && p.RareIndex >= 100, $"({p.FrequentWord}, {p.RareWord}) uses a function word");
        }
    }

    [Fact]
    public void Select_FunctionWordsNumbersAndSymbols_NeverPaired()
    {
        // Every third word from row 100 on is renamed to a token that is not a plain word: numbers, a word with a
        // digit, symbols, punctuation. The top 100 rows are the most frequent words.
        var (words, vectors, counts) = Vocabulary();
        string[] notPlain = ["1984", "3d", "x2", "§", "--", "3.14", "½", "Ⅻ"];
        var planted = new HashSet<string>();
        for (int i = 100, k = 0; i < words.Length; i += 3, k++) { words[i] = notPlain[k % notPlain.Length] + new string('\'', k / notPlain.Length); planted.Add(words[i]); }
        var selector = new PairSelector(words, vectors, 40, counts);
        var selection = selector.Select(Settings);
        Assert.Equal(48, selection.Pairs.Count);
        Assert.Equal(100, selection.SkippedFrequent);
        // Planted tokens with a count of at least 20 (the rarer-word minimum) are the ones the rule had to skip.
        Assert.Equal(Enumerable.Range(0, words.Length).Count(i => planted.Contains(words[i]) && counts[i] >= 20), selection.SkippedNotPlain);
        Assert.Equal(counts[100 + 1], selection.MostFrequentPairable); // row 100 is planted, row 101 is the first plain one
        foreach (var p in selection.Pairs)
        {
            Assert.True(p.FrequentIndex >= 100 && p.RareIndex >= 100, $"({p.FrequentWord}, {p.RareWord}) uses a function word");
            Assert.DoesNotContain(p.FrequentWord, planted);
            Assert.DoesNotContain(p.RareWord, planted);
        }
        // Not vacuous: with both rules off the same draw does use function words and planted tokens.
        var open = selector.Select(Settings with { SkipMostFrequent = 0, PlainWordsOnly = false });
        var used = open.Pairs.SelectMany(p => new[] { p.FrequentIndex, p.RareIndex }).ToList();
        Assert.Contains(used, i => i < 100);
        Assert.Contains(used, i => planted.Contains(words[i]));
        Assert.Equal(0, open.SkippedFrequent);
        Assert.Equal(0, open.SkippedNotPlain);
    }

    [Theory]
    // Unicode general categories (Unicode Standard Annex #44, the Character Database): digits are Nd, '½' is No,
    // 'Ⅻ' (U+216B) is Nl, '§' is Po, '⊕' is Sm; letters with diacritics ('ï', 'é') are Ll.
    [InlineData("house", true)]
    [InlineData("don't", true)]
    [InlineData("well-known", true)]
    [InlineData("naïve", true)]
    [InlineData("café", true)]
    [InlineData("1984", false)]
    [InlineData("1st", false)]
    [InlineData("x2", false)]
    [InlineData("3.14", false)]
    [InlineData("½", false)]
    [InlineData("Ⅻ", false)]
    [InlineData("§", false)]
    [InlineData("--", false)]
    [InlineData("", false)]
    public void IsPlainWord_LettersWithoutNumbers(string word, bool expected)
        => Assert.Equal(expected, PairSelector.IsPlainWord(word));

    [Fact]
    public void Select_SkipMostFrequent_TiesBrokenByRow()
    {
        // Rows 0–4 share the top count: skipping 3 leaves rows 3 and 4 pairable.
        var (words, vectors, counts) = Vocabulary(n: 400);
        for (int i = 0; i < 5; i++) counts[i] = 3_000_000;
        var s = new PairSelectionSettings { Pairs = 400, Bins = 1, MaxRatio = 1e6, SkipMostFrequent = 3, MinRareCount = 1, MaxAbsCosine = 1, Neighbours = 1 };
        var selection = new PairSelector(words, vectors, 40, counts).Select(s);
        var used = selection.Pairs.SelectMany(p => new[] { p.FrequentIndex, p.RareIndex }).ToHashSet();
        Assert.Equal(3, selection.SkippedFrequent);
        Assert.DoesNotContain(0, used);
        Assert.DoesNotContain(2, used);
        Assert.Equal(3_000_000, selection.MostFrequentPairable);
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
        var excluded = new HashSet<string>(Enumerable.Range(101, 5).Select(W));
        var selection = new PairSelector(words, vectors, 40, counts).Select(Settings with { Excluded = excluded });
        var used = selection.Pairs.SelectMany(p => new[] { p.FrequentWord, p.RareWord }).ToHashSet();
        Assert.DoesNotContain(words[0], used);
        Assert.False(used.Overlaps(excluded));
    }

    [Fact]
    public void Select_SmallVocabulary_ReportsShortfall()
    {
        var (words, vectors, counts) = Vocabulary(n: 60);
        // All 60 words are among the 100 most frequent: with the default, none may be paired at all.
        var none = new PairSelector(words, vectors, 40, counts).Select(new PairSelectionSettings());
        Assert.Empty(none.Pairs);
        Assert.Equal(60, none.SkippedFrequent);
        var selection = new PairSelector(words, vectors, 40, counts).Select(new PairSelectionSettings { SkipMostFrequent = 0 });
        Assert.NotEmpty(selection.Pairs);
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
        var selection = selector.FromUser([(W(300), W(2)), (W(9), W(10))]);
        Assert.Equal(W(2), selection.Pairs[0].FrequentWord); // W(2) is the more frequent one
        Assert.Equal(W(300), selection.Pairs[0].RareWord);
        Assert.Equal((double)counts[2] / counts[300], selection.Pairs[0].Ratio, 12);
        // (W(9), W(10)) are near-copies: kept, but the notes say they break the cosine and neighbour rules.
        Assert.Contains(selection.Notes, n => n.Contains("pair 2 (wj, wba)") && n.Contains("|cos|"));
        Assert.Contains(selection.Notes, n => n.Contains("pair 2 (wj, wba)") && n.Contains("neighbours"));
    }

    [Fact]
    public void FromUser_FunctionWordOrNumber_KeptWithNote()
    {
        var (words, vectors, counts) = Vocabulary(n: 400);
        words[300] = "1984";
        var selection = new PairSelector(words, vectors, 40, counts).FromUser([(W(2), W(250)), ("1984", W(200))]);
        Assert.Equal(2, selection.Pairs.Count);
        Assert.Contains(selection.Notes, n => n.StartsWith($"pair 1 ({W(2)}, {W(250)}): '{W(2)}' is among the 100 most frequent words", StringComparison.Ordinal));
        Assert.Contains(selection.Notes, n => n.StartsWith($"pair 2 (1984, {W(200)}): '1984' is not a plain word", StringComparison.Ordinal));
        Assert.DoesNotContain(selection.Notes, n => n.Contains($"'{W(250)}'") || n.Contains($"'{W(200)}'"));
    }

    [Theory]
    [InlineData("wb", "nosuch", "'nosuch' is not in the vocabulary")]
    [InlineData("wb", "wb", "the two words must differ")]
    public void FromUser_BadPair_ThrowsNamingPair(string a, string b, string message)
    {
        var (words, vectors, counts) = Vocabulary(n: 50);
        var ex = Assert.Throws<ArgumentException>(() => new PairSelector(words, vectors, 40, counts).FromUser([(W(3), W(4)), (a, b)]));
        Assert.Contains($"pair 2 ({a}, {b})", ex.Message);
        Assert.Contains(message, ex.Message);
    }

    [Fact]
    public void FromUser_WordReused_ThrowsNamingEarlierPair()
    {
        var (words, vectors, counts) = Vocabulary(n: 50);
        var ex = Assert.Throws<ArgumentException>(() => new PairSelector(words, vectors, 40, counts).FromUser([(W(3), W(4)), (W(5), W(6)), (W(4), W(7))]));
        Assert.Contains("pair 3 (we, wh): 'we' is already used in pair 1", ex.Message);
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
