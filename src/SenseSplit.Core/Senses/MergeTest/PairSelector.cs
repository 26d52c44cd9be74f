using System.Globalization;
using System.Numerics.Tensors;
using System.Text;

namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>Settings of <see cref="PairSelector.Select"/>. Defaults are our choices, documented in docs/methods-merge-test.md.</summary>
public sealed record PairSelectionSettings
{
    /// <summary>Pairs wanted in all.</summary>
    public int Pairs { get; init; } = 200;
    /// <summary>Log-spaced ratio bins over [1, <see cref="MaxRatio"/>]; pairs are spread evenly over them.</summary>
    public int Bins { get; init; } = 8;
    /// <summary>Largest ratio r = f1/f2 of a selected pair (top edge of the last bin).</summary>
    public double MaxRatio { get; init; } = 1000;
    /// <summary>Least count of the rarer word, so its own vector is not mostly noise (our choice: 20).</summary>
    public long MinRareCount { get; init; } = 20;
    /// <summary>The two words are "unrelated" when |cos(v1, v2)| is below this (our choice: 0.2).</summary>
    public double MaxAbsCosine { get; init; } = 0.2;
    /// <summary>Nearest neighbours per word that must not overlap (and must not contain the other word).</summary>
    public int Neighbours { get; init; } = 10;
    /// <summary>Frequent-word candidates drawn per rare word before moving to the next rare word.</summary>
    public int TriesPerRareWord { get; init; } = 20;
    public int Seed { get; init; } = 1;
    /// <summary>
    /// The this-many most frequent words of the vocabulary (by count, ties by row) count as function words and are
    /// never paired; 0 pairs them too. Our choice: 100. In English text the hundred most frequent words are nearly all
    /// function words (articles, prepositions, pronouns, auxiliaries) and together make up about half of all tokens
    /// (a commonly cited figure for large English corpora). Merging one of them changes the context of almost every
    /// other word, so the merge would no longer be a local change, and their vectors carry syntax rather than a sense.
    /// </summary>
    public int SkipMostFrequent { get; init; } = 100;
    /// <summary>Only words with at least one letter and no number character (<see cref="PairSelector.IsPlainWord"/>)
    /// are paired: numbers, dates, section marks and punctuation tokens have no sense to keep apart.</summary>
    public bool PlainWordsOnly { get; init; } = true;
    /// <summary>Words never used in a pair (e.g. glossary terms or stop words), compared ordinally.</summary>
    public IReadOnlySet<string>? Excluded { get; init; }
}

/// <summary>The chosen pairs, the bins they were spread over, how many landed in each, and notes on shortfalls or
/// on user pairs that break a selection rule.</summary>
public sealed record PairSelection(IReadOnlyList<MergePair> Pairs, RatioBins Bins, IReadOnlyList<int> PairsPerBin,
    IReadOnlyList<int> TargetPerBin, int EligibleWords, IReadOnlyList<string> Notes)
{
    /// <summary>Words left out as function words (<see cref="PairSelectionSettings.SkipMostFrequent"/>).</summary>
    public int SkippedFrequent { get; init; }
    /// <summary>Words left out for having no letter or a number character (<see cref="PairSelectionSettings.PlainWordsOnly"/>).</summary>
    public int SkippedNotPlain { get; init; }
    /// <summary>Count of the most frequent word that may still be paired (0 when none may).</summary>
    public long MostFrequentPairable { get; init; }
}

/// <summary>
/// Chooses pairs (w1, w2) of unrelated words to merge: f1 ≥ f2 ≥ MinRareCount, r = f1/f2 spread over log-spaced bins of
/// [1, MaxRatio], |cos(v1, v2)| &lt; MaxAbsCosine, disjoint top-k neighbour sets that hold neither word, every word in at
/// most one pair, no function word (the SkipMostFrequent most frequent words) and no token without letters or with a
/// number character. Words are rows of a words×dims row-major matrix; counts are corpus frequencies.
/// </summary>
/// <remarks>
/// The pseudo-word design (merge two unrelated words, re-embed, compare) follows Arora, Li, Liang, Ma &amp; Risteski
/// 2018, "Linear Algebraic Structure of Word Senses, with Applications to Polysemy", TACL 6, who merged random word
/// pairs; spreading r over log-spaced bins and the unrelatedness tests are ours, so each decade of r is represented and
/// a merged pair is not secretly one sense. Sampling uses one seeded <see cref="Random"/> in a fixed order, so the
/// result depends only on the inputs and the seed. Bins are filled from the highest ratio down (they need the scarce
/// very frequent words), then any shortfall is spread round-robin over the bins that still have candidates.
/// </remarks>
public sealed class PairSelector
{
    private readonly string[] _words;
    private readonly float[] _vectors;
    private readonly int _dims;
    private readonly long[] _counts;
    private readonly double[] _inverseNorms;
    private readonly Dictionary<string, int> _index;
    private readonly Dictionary<int, int[]> _neighbourCache = new();
    private int _neighbourCacheK = -1;

    public PairSelector(string[] words, float[] vectors, int dims, long[] counts)
    {
        ArgumentNullException.ThrowIfNull(words);
        ArgumentNullException.ThrowIfNull(vectors);
        ArgumentNullException.ThrowIfNull(counts);
        Guard.Positive(dims);
        Guard.Length(vectors.Length, (long)words.Length * dims, "vectors (words×dims)");
        Guard.Length(counts.Length, words.Length, "counts (one per word)");
        Guard.Finite(vectors, dims, "vectors");
        _index = new Dictionary<string, int>(words.Length, StringComparer.Ordinal);
        for (int i = 0; i < words.Length; i++)
        {
            if (counts[i] < 0) throw new ArgumentException($"count of word '{words[i]}' (row {i}) is {counts[i]} (must not be negative)", nameof(counts));
            if (!_index.TryAdd(words[i], i)) throw new ArgumentException($"word '{words[i]}' appears twice (rows {_index[words[i]]} and {i})", nameof(words));
        }
        _words = words;
        _vectors = vectors;
        _dims = dims;
        _counts = counts;
        _inverseNorms = new double[words.Length];
        for (int i = 0; i < words.Length; i++)
        {
            double norm = Math.Sqrt(TensorPrimitives.Dot(Row(i), Row(i)));
            _inverseNorms[i] = norm > 0 ? 1 / norm : 0;
        }
    }

    /// <summary>Cosine of the vectors of rows <paramref name="a"/> and <paramref name="b"/> (0 for a zero vector).</summary>
    public double Cosine(int a, int b) => TensorPrimitives.Dot(Row(a), Row(b)) * _inverseNorms[a] * _inverseNorms[b];

    /// <summary>The <paramref name="k"/> rows of highest cosine to row <paramref name="word"/> (itself excluded), best first, ties by row.</summary>
    public int[] NearestNeighbours(int word, int k)
    {
        Guard.NonNegative(word);
        Guard.Below(word, _words.Length, "words");
        Guard.Positive(k);
        if (_neighbourCacheK != k) { _neighbourCache.Clear(); _neighbourCacheK = k; }
        if (_neighbourCache.TryGetValue(word, out var cached)) return cached;
        int size = Math.Min(k, _words.Length - 1);
        var best = new int[size];
        var bestScore = new double[size];
        int filled = 0;
        var query = Row(word);
        for (int j = 0; j < _words.Length; j++)
        {
            if (j == word) continue;
            double s = TensorPrimitives.Dot(query, Row(j)) * _inverseNorms[j];
            if (filled == size && !(s > bestScore[size - 1])) continue;
            // Insertion into the short sorted list; equal scores keep the earlier row first.
            int pos = filled < size ? filled : size - 1;
            while (pos > 0 && s > bestScore[pos - 1]) { best[pos] = best[pos - 1]; bestScore[pos] = bestScore[pos - 1]; pos--; }
            best[pos] = j; bestScore[pos] = s;
            if (filled < size) filled++;
        }
        _neighbourCache[word] = best;
        return best;
    }

    public PairSelection Select(PairSelectionSettings? settings = null)
    {
        var s = settings ?? new PairSelectionSettings();
        CheckSettings(s);
        var bins = new RatioBins(s.Bins, s.MaxRatio);
        var rng = new Random(s.Seed);
        var frequent = MostFrequent(s.SkipMostFrequent);
        int skippedNotPlain = 0;
        bool Plain(int i)
        {
            if (!s.PlainWordsOnly || IsPlainWord(_words[i])) return true;
            skippedNotPlain++;
            return false;
        }

        // Eligible words sorted by count (ties by row) for range look-ups of frequent partners.
        var eligible = Enumerable.Range(0, _words.Length)
            .Where(i => _counts[i] >= s.MinRareCount && _inverseNorms[i] > 0 && !PseudoWord.IsPseudoWord(_words[i])
                        && !frequent[i] && Plain(i) && (s.Excluded is null || !s.Excluded.Contains(_words[i])))
            .OrderBy(i => _counts[i]).ThenBy(i => i).ToArray();
        var sortedCounts = eligible.Select(i => _counts[i]).ToArray();
        // Rare-word candidates in one seeded order (Fisher–Yates), shared by all bins.
        var order = (int[])eligible.Clone();
        for (int i = order.Length - 1; i > 0; i--)
        {
            int j = rng.Next(i + 1);
            (order[i], order[j]) = (order[j], order[i]);
        }

        var used = new bool[_words.Length];
        var pairs = new List<MergePair>();
        var perBin = new int[bins.Count];
        var target = new int[bins.Count];
        for (int b = 0; b < bins.Count; b++) target[b] = s.Pairs / bins.Count + (b < s.Pairs % bins.Count ? 1 : 0);
        var cursor = new int[bins.Count];

        bool TryAddOne(int bin)
        {
            double lo = bins.Lower(bin), hi = bins.Upper(bin);
            while (cursor[bin] < order.Length)
            {
                int rare = order[cursor[bin]++];
                if (used[rare]) continue;
                long f2 = _counts[rare];
                // Partners with f2·lo ≤ f1 < f2·hi (≤ for the last bin, whose top edge is MaxRatio).
                int first = LowerBound(sortedCounts, f2 * lo * (1 - 1e-12));
                int end = LowerBound(sortedCounts, f2 * hi * (1 + 1e-12));
                if (bin == bins.Count - 1) end = UpperBoundInclusive(sortedCounts, f2 * hi * (1 + 1e-12));
                if (end <= first) continue;
                for (int t = 0; t < s.TriesPerRareWord; t++)
                {
                    int frequent = eligible[rng.Next(first, end)];
                    if (frequent == rare || used[frequent]) continue;
                    double r = (double)_counts[frequent] / f2;
                    if (r < 1 || r > s.MaxRatio || bins.Of(r) != bin) continue;
                    double cos = Cosine(frequent, rare);
                    if (!(Math.Abs(cos) < s.MaxAbsCosine)) continue;
                    if (!NeighboursDisjoint(frequent, rare, s.Neighbours)) continue;
                    used[frequent] = used[rare] = true;
                    pairs.Add(new MergePair(_words[frequent], _words[rare], _counts[frequent], f2, frequent, rare, cos));
                    perBin[bin]++;
                    return true;
                }
            }
            return false;
        }

        for (int b = bins.Count - 1; b >= 0; b--)
            while (perBin[b] < target[b] && TryAddOne(b)) { }

        var notes = new List<string>();
        for (int b = bins.Count - 1; b >= 0; b--)
            if (perBin[b] < target[b])
                notes.Add($"ratio bin {bins.Label(b)}: {perBin[b]} of {target[b]} pairs found");

        // Spread any shortfall over bins that still have candidates, highest ratio first, one pair at a time.
        bool progress = true;
        while (pairs.Count < s.Pairs && progress)
        {
            progress = false;
            for (int b = bins.Count - 1; b >= 0 && pairs.Count < s.Pairs; b--)
                if (cursor[b] < order.Length && TryAddOne(b)) progress = true;
        }
        if (pairs.Count < s.Pairs)
            notes.Add($"{pairs.Count} of {s.Pairs} pairs found among {eligible.Length} words with count >= {s.MinRareCount.ToString(CultureInfo.InvariantCulture)}");

        return new PairSelection(pairs, bins, perBin, target, eligible.Length, notes)
        {
            SkippedFrequent = frequent.Count(f => f), SkippedNotPlain = skippedNotPlain,
            MostFrequentPairable = eligible.Length == 0 ? 0 : _counts[eligible[^1]],
        };
    }

    /// <summary>
    /// True when <paramref name="word"/> has at least one letter (Unicode category L*) and no number character
    /// (category N*: digits, Roman-numeral letters, fractions). "1st", "x2", "§", "--" and "3.14" are not plain words;
    /// "don't", "well-known" and "naïve" are.
    /// </summary>
    public static bool IsPlainWord(string word)
    {
        ArgumentNullException.ThrowIfNull(word);
        bool letter = false;
        foreach (var rune in word.EnumerateRunes())
        {
            if (Rune.IsNumber(rune)) return false;
            if (Rune.IsLetter(rune)) letter = true;
        }
        return letter;
    }

    /// <summary>Flags the <paramref name="n"/> rows of highest count (ties by row), the function words.</summary>
    private bool[] MostFrequent(int n)
    {
        var flags = new bool[_words.Length];
        if (n <= 0) return flags;
        foreach (int i in Enumerable.Range(0, _words.Length).OrderByDescending(i => _counts[i]).ThenBy(i => i).Take(n)) flags[i] = true;
        return flags;
    }

    /// <summary>
    /// Validates pairs given by the user: both words known, the two distinct, no word in two pairs, counts positive.
    /// Each pair is ordered so that the more frequent word comes first. Pairs that break a selection rule
    /// (count, cosine, shared neighbours, ratio range) are kept and named in the notes.
    /// </summary>
    public PairSelection FromUser(IReadOnlyList<(string first, string second)> userPairs, PairSelectionSettings? settings = null)
    {
        ArgumentNullException.ThrowIfNull(userPairs);
        var s = settings ?? new PairSelectionSettings();
        CheckSettings(s);
        var bins = new RatioBins(s.Bins, s.MaxRatio);
        var usedIn = new Dictionary<string, int>(StringComparer.Ordinal);
        var pairs = new List<MergePair>();
        var notes = new List<string>();
        var perBin = new int[bins.Count];
        var frequent = MostFrequent(s.SkipMostFrequent);
        for (int p = 0; p < userPairs.Count; p++)
        {
            var (a, b) = userPairs[p];
            string where = $"pair {p + 1} ({a}, {b})";
            if (string.IsNullOrEmpty(a) || string.IsNullOrEmpty(b)) throw new ArgumentException($"{where}: both words must be given");
            if (!_index.TryGetValue(a, out int ia)) throw new ArgumentException($"{where}: '{a}' is not in the vocabulary");
            if (!_index.TryGetValue(b, out int ib)) throw new ArgumentException($"{where}: '{b}' is not in the vocabulary");
            if (ia == ib) throw new ArgumentException($"{where}: the two words must differ");
            foreach (var w in new[] { a, b })
                if (usedIn.TryGetValue(w, out int earlier)) throw new ArgumentException($"{where}: '{w}' is already used in pair {earlier}");
            usedIn[a] = p + 1;
            usedIn[b] = p + 1;
            if (_counts[ia] <= 0 || _counts[ib] <= 0) throw new ArgumentException($"{where}: both words need a positive count (have {_counts[ia]} and {_counts[ib]})");
            if (_inverseNorms[ia] == 0 || _inverseNorms[ib] == 0) throw new ArgumentException($"{where}: a word has a zero vector");
            // The more frequent word is w1; on equal counts the order given is kept.
            var (f, r) = _counts[ia] >= _counts[ib] ? (ia, ib) : (ib, ia);
            double cos = Cosine(f, r);
            var pair = new MergePair(_words[f], _words[r], _counts[f], _counts[r], f, r, cos);
            pairs.Add(pair);
            perBin[bins.Of(pair.Ratio)]++;
            if (_counts[r] < s.MinRareCount) notes.Add($"{where}: rarer word count {_counts[r]} is below {s.MinRareCount}");
            if (!(Math.Abs(cos) < s.MaxAbsCosine)) notes.Add($"{where}: |cos| = {Math.Abs(cos).ToString("F3", CultureInfo.InvariantCulture)} is not below {s.MaxAbsCosine.ToString("G", CultureInfo.InvariantCulture)}");
            if (!NeighboursDisjoint(f, r, s.Neighbours)) notes.Add($"{where}: the two words share nearest neighbours");
            foreach (int w in new[] { f, r })
            {
                if (frequent[w]) notes.Add($"{where}: '{_words[w]}' is among the {s.SkipMostFrequent.ToString(CultureInfo.InvariantCulture)} most frequent words (a function word)");
                else if (s.PlainWordsOnly && !IsPlainWord(_words[w])) notes.Add($"{where}: '{_words[w]}' is not a plain word (it needs a letter and no digit)");
            }
            if (pair.Ratio > s.MaxRatio) notes.Add($"{where}: ratio {pair.Ratio.ToString("G4", CultureInfo.InvariantCulture)} is above {s.MaxRatio.ToString("G", CultureInfo.InvariantCulture)} (counted in the last bin)");
        }
        return new PairSelection(pairs, bins, perBin, perBin.ToArray(), pairs.Count, notes);
    }

    private bool NeighboursDisjoint(int a, int b, int k)
    {
        var na = NearestNeighbours(a, k);
        var nb = NearestNeighbours(b, k);
        if (Array.IndexOf(na, b) >= 0 || Array.IndexOf(nb, a) >= 0) return false;
        foreach (int x in na) if (Array.IndexOf(nb, x) >= 0) return false;
        return true;
    }

    private ReadOnlySpan<float> Row(int i) => _vectors.AsSpan(i * _dims, _dims);

    // First index whose count is ≥ value.
    private static int LowerBound(long[] sorted, double value)
    {
        int lo = 0, hi = sorted.Length;
        while (lo < hi) { int mid = (lo + hi) >>> 1; if (sorted[mid] < value) lo = mid + 1; else hi = mid; }
        return lo;
    }

    // First index whose count is > value.
    private static int UpperBoundInclusive(long[] sorted, double value)
    {
        int lo = 0, hi = sorted.Length;
        while (lo < hi) { int mid = (lo + hi) >>> 1; if (sorted[mid] <= value) lo = mid + 1; else hi = mid; }
        return lo;
    }

    private static void CheckSettings(PairSelectionSettings s)
    {
        Guard.Positive(s.Pairs);
        Guard.Positive(s.Bins);
        Guard.Positive(s.Neighbours);
        Guard.Positive(s.TriesPerRareWord);
        Guard.NonNegative(s.SkipMostFrequent);
        if (s.MinRareCount < 1) throw new ArgumentOutOfRangeException(nameof(s), s.MinRareCount, $"minimum rare count ({s.MinRareCount}) must be at least 1");
        if (!(s.MaxAbsCosine > 0 && s.MaxAbsCosine <= 1)) throw new ArgumentOutOfRangeException(nameof(s), s.MaxAbsCosine, $"cosine threshold ({s.MaxAbsCosine}) must lie in (0, 1]");
        if (!(s.MaxRatio > 1) || !double.IsFinite(s.MaxRatio)) throw new ArgumentOutOfRangeException(nameof(s), s.MaxRatio, $"largest ratio ({s.MaxRatio}) must be finite and above 1");
    }
}
