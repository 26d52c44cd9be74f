using System.Numerics.Tensors;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Core.Senses;

/// <summary>What the catalogue says about an atom beyond its label.</summary>
[Flags]
public enum AtomFlags
{
    None = 0,
    /// <summary>Used by a very large share of the words: a frequency- or syntax-like direction, not a discourse.</summary>
    Generic = 1,
    /// <summary>Its nearest words are hardly closer to each other than random words: senses resting on it are doubtful.</summary>
    Diffuse = 2,
    /// <summary>No word's code uses it.</summary>
    Unused = 4,
}

/// <summary>Settings of atom naming. Defaults are the CLI defaults; each threshold's origin is in docs/methods-senses.md.</summary>
public sealed record AtomNamingOptions
{
    /// <summary>Words that name each atom (its nearest words by cosine).</summary>
    public int LabelWords { get; init; } = 10;
    /// <summary>When counts are known, words seen fewer times than this never name an atom (rare words have noisy vectors).</summary>
    public long MinCount { get; init; } = 10;
    /// <summary>An atom used by more than this many times the mean usage per atom is flagged generic.</summary>
    public double GenericUsageFactor { get; init; } = 5;
    /// <summary>An atom whose coherence is below baseline + this fraction of (median coherence − baseline) is flagged
    /// diffuse; baseline = mean cosine of random word pairs. ½ is our choice, set on a real-English model (docs/methods-senses.md §1).</summary>
    public double DiffuseFraction { get; init; } = 0.5;
    /// <summary>Random word pairs drawn to estimate the baseline cosine.</summary>
    public int BaselinePairs { get; init; } = 4000;
    public int Seed { get; init; } = 1;
    /// <summary>Words per block of the atoms×words product (memory = atoms × block floats).</summary>
    public int BlockWords { get; init; } = 2048;
    /// <summary>0 means Environment.ProcessorCount. Results do not depend on it.</summary>
    public int Threads { get; init; }
}

/// <summary>
/// Names and grades every atom. Label of atom k: the <c>LabelWords</c> words w maximising cos(d_k, v_w) (unit rows, so
/// the cosine is the dot product); coherence: the mean pairwise cosine of those words; usage: the number of words whose
/// code gives the atom a non-zero weight.
/// </summary>
/// <param name="Labels">AtomCount×LabelWords word indices, best first; −1 pads atoms with fewer eligible words.</param>
/// <param name="LabelCosines">Cosine of each label word with its atom, same layout.</param>
public sealed record AtomCatalog(
    int AtomCount, int LabelWords, int[] Labels, float[] LabelCosines, float[] Coherence, int[] Usage, AtomFlags[] Flags,
    double MeanUsage, double GenericUsageThreshold, double BaselineCosine, double MedianCoherence, double DiffuseCoherenceThreshold)
{
    public ReadOnlySpan<int> LabelOf(int atom) => Labels.AsSpan(atom * LabelWords, LabelWords);
    public ReadOnlySpan<float> LabelCosinesOf(int atom) => LabelCosines.AsSpan(atom * LabelWords, LabelWords);
    public bool IsGeneric(int atom) => (Flags[atom] & AtomFlags.Generic) != 0;
    public bool IsDiffuse(int atom) => (Flags[atom] & AtomFlags.Diffuse) != 0;

    /// <summary>Builds the catalogue. Cost: one atoms×words product (AtomCount·Words·Dimensions multiply-adds), done in
    /// blocks of words so that memory stays AtomCount×BlockWords floats; a top-k min-heap per atom keeps the labels.</summary>
    /// <remarks>Labels by nearest words follow Arora, Li, Liang, Ma &amp; Risteski (2018), "Linear Algebraic Structure of
    /// Word Senses, with Applications to Polysemy", TACL 6, §5 (atoms are read through their nearest words).
    /// Ties are broken by the lower word index, so the result does not depend on thread count.</remarks>
    public static AtomCatalog Build(WordVectors vectors, ReadOnlySpan<float> atoms, int atomCount, SparseCodes codes,
        long[]? counts, AtomNamingOptions? options = null)
    {
        options ??= new AtomNamingOptions();
        ArgumentNullException.ThrowIfNull(vectors);
        ArgumentNullException.ThrowIfNull(codes);
        int d = vectors.Dimensions, n = vectors.Count;
        Guard.Positive(d);
        Guard.Positive(atomCount);
        Guard.Positive(options.LabelWords);
        Guard.Positive(options.BlockWords);
        Guard.Length(atoms.Length, (long)atomCount * d, "atoms");
        Guard.Length(vectors.Values.Length, (long)n * d, "word vectors");
        Guard.Length(codes.Rows, n, "code rows");
        if (counts is not null) Guard.Length(counts.Length, n, "counts");
        Guard.Finite(atoms, d, "atoms");

        int k = options.LabelWords;
        int threads = options.Threads > 0 ? options.Threads : Environment.ProcessorCount;
        var labels = new int[atomCount * k];
        var cos = new float[atomCount * k];
        var heapSize = new int[atomCount];
        Array.Fill(labels, -1);
        Array.Fill(cos, float.NegativeInfinity);

        // Eligible words: all, or those seen at least MinCount times.
        bool Eligible(int w) => counts is null || counts[w] >= options.MinCount;

        int block = Math.Min(options.BlockWords, Math.Max(1, n));
        var product = new float[(long)atomCount * block];
        var atomArray = atoms.ToArray();
        var parts = Partitions(atomCount, threads);
        for (int start = 0; start < n; start += block)
        {
            int len = Math.Min(block, n - start);
            Gemm.MultiplyTransposed(atomArray, atomCount, vectors.Values.AsSpan(start * d, len * d), len, d, product, threads);
            Parallel.For(0, parts.Length - 1, new ParallelOptions { MaxDegreeOfParallelism = threads }, p =>
            {
                for (int a = parts[p]; a < parts[p + 1]; a++)
                {
                    var row = product.AsSpan(a * len, len);
                    var hl = labels.AsSpan(a * k, k);
                    var hc = cos.AsSpan(a * k, k);
                    ref int size = ref heapSize[a];
                    for (int j = 0; j < len; j++)
                    {
                        float c = row[j];
                        if (size == k && c <= hc[0]) continue;
                        int w = start + j;
                        if (!float.IsFinite(c) || !Eligible(w)) continue;
                        TopK.Push(hc, hl, ref size, c, w);
                    }
                }
            });
        }
        for (int a = 0; a < atomCount; a++) TopK.SortDescending(cos.AsSpan(a * k, k), labels.AsSpan(a * k, k), heapSize[a]);

        var usage = new int[atomCount];
        for (int i = 0; i < codes.AtomIds.Length; i++)
        {
            int id = codes.AtomIds[i];
            if (id >= 0 && id < atomCount && codes.Weights[i] != 0f) usage[id]++;
        }

        var coherence = new float[atomCount];
        for (int a = 0; a < atomCount; a++)
            coherence[a] = (float)MeanPairwiseCosine(vectors, labels.AsSpan(a * k, heapSize[a]));

        long totalUses = 0;
        foreach (int u in usage) totalUses += u;
        double meanUsage = (double)totalUses / atomCount;
        double genericThreshold = options.GenericUsageFactor * meanUsage;
        double baseline = RandomPairCosine(vectors, counts, options);
        var sorted = coherence.Where((_, a) => heapSize[a] >= 2).Select(c => (double)c).Order().ToArray();
        double median = sorted.Length == 0 ? baseline : sorted.Length % 2 == 1 ? sorted[sorted.Length / 2]
            : 0.5 * (sorted[sorted.Length / 2 - 1] + sorted[sorted.Length / 2]);
        double diffuseThreshold = baseline + options.DiffuseFraction * Math.Max(0, median - baseline);

        var flags = new AtomFlags[atomCount];
        for (int a = 0; a < atomCount; a++)
        {
            var f = AtomFlags.None;
            if (usage[a] == 0) f |= AtomFlags.Unused;
            if (usage[a] > genericThreshold && usage[a] > 0) f |= AtomFlags.Generic;
            if (heapSize[a] < 2 || coherence[a] < diffuseThreshold) f |= AtomFlags.Diffuse;
            flags[a] = f;
        }
        return new AtomCatalog(atomCount, k, labels, cos, coherence, usage, flags, meanUsage, genericThreshold, baseline, median, diffuseThreshold);
    }

    /// <summary>Mean of cos(v_i, v_j) over the pairs i &lt; j of <paramref name="words"/> (0 when fewer than two).</summary>
    public static double MeanPairwiseCosine(WordVectors vectors, ReadOnlySpan<int> words)
    {
        int m = 0;
        double sum = 0;
        for (int i = 0; i < words.Length; i++)
        {
            if (words[i] < 0) continue;
            for (int j = i + 1; j < words.Length; j++)
            {
                if (words[j] < 0) continue;
                sum += TensorPrimitives.CosineSimilarity(vectors.Row(words[i]), vectors.Row(words[j]));
                m++;
            }
        }
        return m == 0 ? 0 : sum / m;
    }

    /// <summary>Mean cosine of seeded random pairs of distinct eligible words: what "no closer than chance" means for this embedding.</summary>
    private static double RandomPairCosine(WordVectors vectors, long[]? counts, AtomNamingOptions options)
    {
        var eligible = new List<int>();
        for (int w = 0; w < vectors.Count; w++)
            if (counts is null || counts[w] >= options.MinCount) eligible.Add(w);
        if (eligible.Count < 2) return 0;
        var rng = new Random(options.Seed);
        double sum = 0;
        for (int p = 0; p < options.BaselinePairs; p++)
        {
            int ii = rng.Next(eligible.Count), jj = rng.Next(eligible.Count - 1);
            if (jj >= ii) jj++; // uniform over the other words
            sum += TensorPrimitives.CosineSimilarity(vectors.Row(eligible[ii]), vectors.Row(eligible[jj]));
        }
        return sum / options.BaselinePairs;
    }

    internal static int[] Partitions(int count, int parts)
    {
        parts = Math.Max(1, Math.Min(parts, Math.Max(1, count)));
        var bounds = new int[parts + 1];
        for (int p = 0; p <= parts; p++) bounds[p] = (int)((long)count * p / parts);
        return bounds;
    }
}

/// <summary>A fixed-capacity min-heap of (score, id) kept in two spans; the root is the weakest kept element.
/// Ties: a new element with an equal score never displaces a kept one, and among equal scores the lower id sorts first.</summary>
internal static class TopK
{
    public static void Push(Span<float> scores, Span<int> ids, ref int size, float score, int id)
    {
        int k = scores.Length;
        if (size < k)
        {
            int i = size++;
            scores[i] = score; ids[i] = id;
            while (i > 0)
            {
                int parent = (i - 1) / 2;
                if (!Less(scores[i], ids[i], scores[parent], ids[parent])) break;
                Swap(scores, ids, i, parent);
                i = parent;
            }
            return;
        }
        if (!Less(scores[0], ids[0], score, id)) return;
        scores[0] = score; ids[0] = id;
        int at = 0;
        while (true)
        {
            int l = 2 * at + 1, r = l + 1, m = at;
            if (l < k && Less(scores[l], ids[l], scores[m], ids[m])) m = l;
            if (r < k && Less(scores[r], ids[r], scores[m], ids[m])) m = r;
            if (m == at) break;
            Swap(scores, ids, at, m);
            at = m;
        }
    }

    /// <summary>"a is weaker than b": lower score, or equal score and higher id.</summary>
    private static bool Less(float sa, int ia, float sb, int ib) => sa < sb || (sa == sb && ia > ib);

    private static void Swap(Span<float> s, Span<int> ids, int i, int j)
    {
        (s[i], s[j]) = (s[j], s[i]);
        (ids[i], ids[j]) = (ids[j], ids[i]);
    }

    /// <summary>Sorts the first <paramref name="size"/> elements best first; the rest stay padded (−1, −∞).</summary>
    public static void SortDescending(Span<float> scores, Span<int> ids, int size)
    {
        var pairs = new (float s, int id)[size];
        for (int i = 0; i < size; i++) pairs[i] = (scores[i], ids[i]);
        Array.Sort(pairs, (x, y) => x.s != y.s ? y.s.CompareTo(x.s) : x.id.CompareTo(y.id));
        for (int i = 0; i < size; i++) { scores[i] = pairs[i].s; ids[i] = pairs[i].id; }
    }
}
