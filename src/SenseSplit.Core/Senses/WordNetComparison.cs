namespace SenseSplit.Core.Senses;

/// <summary>One word's audited sense count, its corpus count and its dictionary sense count.</summary>
public readonly record struct SenseCountPair(string Word, int Found, int Dictionary, long Count);

/// <summary>Result of comparing audited sense counts with a dictionary's (e.g. WordNet's).</summary>
/// <param name="MonosemousMean">Mean audited senses of dictionary-monosemous words, weighted to the frequency bins shared with the polysemous group.</param>
/// <param name="PolysemousMean">Same for words with at least PolysemousMin dictionary senses.</param>
/// <param name="Spearman">Spearman's ρ between audited and dictionary counts over all words of the table found in the model.</param>
/// <param name="MonosemousSeveral">Share of (matched) monosemous words the audit called ambiguous: the false-alarm rate.</param>
public sealed record SenseCountComparison(int Words, int MatchedBins, double MonosemousMean, double PolysemousMean,
    double MonosemousSeveral, double PolysemousSeveral, double Spearman);

/// <summary>Frequency-matched pairs of a polysemous and a monosemous word (dictionary counts), and how often the audit
/// gives the polysemous one more senses.</summary>
/// <param name="Pairs">Matched pairs.</param>
/// <param name="PolysemousMore">Share of pairs where the polysemous word got more senses.</param>
/// <param name="PolysemousFewer">Share where it got fewer.</param>
/// <param name="SignZ">Sign test on the untied pairs: (more − fewer) / √(more + fewer); normal approximation.</param>
public sealed record MatchedComparison(int Pairs, double PolysemousMore, double PolysemousFewer, double MonosemousMean,
    double PolysemousMean, double MonosemousSeveral, double PolysemousSeveral, double SignZ);

/// <summary>
/// Hook for the dictionary evaluation: do words with many dictionary senses get more audited senses than words with
/// one, at matched frequency? Words are binned by ⌊log2 count⌋; within each bin holding both groups, each group's
/// mean is taken, and the bins are averaged with weight min(n_mono, n_poly) (frequency matching by stratification).
/// </summary>
/// <remarks>The comparison of Arora, Li, Liang, Ma &amp; Risteski (2018), TACL 6, asks the same of atoms; WordNet:
/// G. A. Miller (1995), "WordNet: a lexical database for English", CACM 38(11). Spearman's ρ is Pearson's correlation of
/// the ranks, ties given their mean rank (C. Spearman 1904).</remarks>
public static class WordNetComparison
{
    /// <summary>Audits every word of <paramref name="dictionarySenses"/> (word → dictionary sense count, e.g. read from
    /// WordNet's index files) that the model knows and has a count for, and compares. Found = senses of the audit
    /// (0 for a term left with no sense). Returns the pairs too, for a per-word listing.</summary>
    public static (SenseCountComparison comparison, IReadOnlyList<SenseCountPair> pairs) FromModel(
        SenseModel model, IReadOnlyDictionary<string, int> dictionarySenses, int polysemousMin = 5)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(dictionarySenses);
        if (model.Counts is null) throw new ArgumentException("the comparison matches words on frequency: the model needs word counts");
        var words = dictionarySenses.Where(kv => kv.Value > 0 && model.IndexOf(kv.Key) >= 0)
            .OrderBy(kv => kv.Key, StringComparer.Ordinal).ToArray();
        var results = model.Analyze(words.Select(kv => TermQuery.From(kv.Key)).ToArray());
        var pairs = new SenseCountPair[words.Length];
        for (int i = 0; i < words.Length; i++)
        {
            var r = results[i];
            pairs[i] = new SenseCountPair(words[i].Key, r.Verdict == Verdict.Several ? r.Senses.Count : Math.Min(1, r.Senses.Count),
                words[i].Value, model.Counts[model.IndexOf(words[i].Key)]);
        }
        return (Compare(pairs, polysemousMin), pairs);
    }

    /// <summary>The naive rule the audit must beat: a word's "senses" are the atoms of its code with a weight above
    /// <paramref name="threshold"/>. Same word order and counts as <paramref name="audited"/>.</summary>
    public static SenseCountPair[] NaiveCounts(SenseModel model, IReadOnlyList<SenseCountPair> audited, float threshold = 0.2f)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(audited);
        var result = new SenseCountPair[audited.Count];
        for (int i = 0; i < audited.Count; i++)
        {
            int row = model.IndexOf(audited[i].Word);
            int n = 0;
            if (row >= 0) foreach (float w in model.Codes.WeightsOf(row)) if (w > threshold) n++;
            result[i] = audited[i] with { Found = n };
        }
        return result;
    }

    /// <summary>
    /// Pairs every polysemous word (≥ <paramref name="polysemousMin"/> dictionary senses), taken in a seeded random
    /// order, with the unused monosemous word nearest in corpus count, if that count is within ±<paramref name="tolerance"/>
    /// (relative) of its own; compares the audited sense counts of each pair.
    /// </summary>
    public static MatchedComparison CompareMatched(IReadOnlyList<SenseCountPair> pairs, int polysemousMin = 5, double tolerance = 0.1, int seed = 1)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        Guard.Positive(polysemousMin);
        var mono = pairs.Where(p => p.Dictionary == 1 && p.Count > 0).OrderBy(p => p.Count).ThenBy(p => p.Word, StringComparer.Ordinal).ToArray();
        var poly = pairs.Where(p => p.Dictionary >= polysemousMin && p.Count > 0).OrderBy(p => p.Word, StringComparer.Ordinal).ToArray();
        new Random(seed).Shuffle(poly);
        var monoCounts = mono.Select(p => p.Count).ToArray();
        var used = new bool[mono.Length];
        var matched = new List<(SenseCountPair poly, SenseCountPair mono)>();
        foreach (var p in poly)
        {
            long lo = (long)Math.Ceiling(p.Count * (1 - tolerance)), hi = (long)Math.Floor(p.Count * (1 + tolerance));
            int start = LowerBound(monoCounts, lo);
            int best = -1;
            for (int j = start; j < mono.Length && monoCounts[j] <= hi; j++)
                if (!used[j] && (best < 0 || Math.Abs(monoCounts[j] - p.Count) < Math.Abs(monoCounts[best] - p.Count))) best = j;
            if (best < 0) continue;
            used[best] = true;
            matched.Add((p, mono[best]));
        }
        int n = matched.Count;
        if (n == 0) return new MatchedComparison(0, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN, double.NaN);
        int more = matched.Count(m => m.poly.Found > m.mono.Found), fewer = matched.Count(m => m.poly.Found < m.mono.Found);
        double z = more + fewer > 0 ? (more - fewer) / Math.Sqrt(more + fewer) : 0;
        return new MatchedComparison(n, (double)more / n, (double)fewer / n, matched.Average(m => (double)m.mono.Found),
            matched.Average(m => (double)m.poly.Found), matched.Average(m => m.mono.Found >= 2 ? 1.0 : 0.0),
            matched.Average(m => m.poly.Found >= 2 ? 1.0 : 0.0), z);
    }

    private static int LowerBound(long[] sorted, long value)
    {
        int lo = 0, hi = sorted.Length;
        while (lo < hi) { int mid = (lo + hi) >>> 1; if (sorted[mid] < value) lo = mid + 1; else hi = mid; }
        return lo;
    }

    /// <summary>
    /// Sense counts from the lines of WordNet's <c>index.noun</c>, <c>index.verb</c>, <c>index.adj</c>, <c>index.adv</c>
    /// (WordNet 3.0 index format, wndb(5WN): <c>lemma pos synset_cnt p_cnt ...</c>; licence lines start with two
    /// spaces). A lemma's count is the sum of synset_cnt over the parts of speech; multiword lemmas (with '_') are skipped.
    /// </summary>
    public static Dictionary<string, int> ParseIndexLines(IEnumerable<string> lines)
    {
        ArgumentNullException.ThrowIfNull(lines);
        var result = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var line in lines)
        {
            if (line.Length == 0 || line.StartsWith("  ", StringComparison.Ordinal)) continue;
            var f = line.Split(' ', 4);
            if (f.Length < 3 || f[0].Contains('_') || !int.TryParse(f[2], System.Globalization.NumberStyles.None, System.Globalization.CultureInfo.InvariantCulture, out int n)) continue;
            result[f[0]] = result.GetValueOrDefault(f[0]) + n;
        }
        return result;
    }

    public static SenseCountComparison Compare(IReadOnlyList<SenseCountPair> pairs, int polysemousMin = 5)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        Guard.Positive(polysemousMin);
        var bins = pairs.Where(p => p.Count > 0 && p.Dictionary > 0)
            .GroupBy(p => (int)Math.Floor(Math.Log2(p.Count)));
        double wsum = 0, mono = 0, poly = 0, monoSev = 0, polySev = 0;
        int matched = 0;
        foreach (var bin in bins)
        {
            var m = bin.Where(p => p.Dictionary == 1).ToArray();
            var q = bin.Where(p => p.Dictionary >= polysemousMin).ToArray();
            if (m.Length == 0 || q.Length == 0) continue;
            double w = Math.Min(m.Length, q.Length);
            matched++;
            wsum += w;
            mono += w * m.Average(p => p.Found);
            poly += w * q.Average(p => p.Found);
            monoSev += w * m.Average(p => p.Found >= 2 ? 1.0 : 0.0);
            polySev += w * q.Average(p => p.Found >= 2 ? 1.0 : 0.0);
        }
        double rho = Spearman(pairs.Select(p => (double)p.Found).ToArray(), pairs.Select(p => (double)p.Dictionary).ToArray());
        return wsum == 0
            ? new SenseCountComparison(pairs.Count, 0, double.NaN, double.NaN, double.NaN, double.NaN, rho)
            : new SenseCountComparison(pairs.Count, matched, mono / wsum, poly / wsum, monoSev / wsum, polySev / wsum, rho);
    }

    /// <summary>Spearman's rank correlation; NaN when fewer than two values or either side is constant.</summary>
    public static double Spearman(IReadOnlyList<double> x, IReadOnlyList<double> y)
    {
        Guard.Length(y.Count, x.Count, "y");
        if (x.Count < 2) return double.NaN;
        var rx = Ranks(x);
        var ry = Ranks(y);
        double mx = rx.Average(), my = ry.Average(), sxy = 0, sxx = 0, syy = 0;
        for (int i = 0; i < rx.Length; i++)
        {
            sxy += (rx[i] - mx) * (ry[i] - my);
            sxx += (rx[i] - mx) * (rx[i] - mx);
            syy += (ry[i] - my) * (ry[i] - my);
        }
        return sxx == 0 || syy == 0 ? double.NaN : sxy / Math.Sqrt(sxx * syy);
    }

    /// <summary>1-based ranks, ties sharing their mean rank.</summary>
    public static double[] Ranks(IReadOnlyList<double> v)
    {
        var order = Enumerable.Range(0, v.Count).OrderBy(i => v[i]).ToArray();
        var ranks = new double[v.Count];
        for (int i = 0; i < order.Length;)
        {
            int j = i;
            while (j + 1 < order.Length && v[order[j + 1]] == v[order[i]]) j++;
            double r = (i + j) / 2.0 + 1;
            for (int k = i; k <= j; k++) ranks[order[k]] = r;
            i = j + 1;
        }
        return ranks;
    }
}
