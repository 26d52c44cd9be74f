using System.Numerics.Tensors;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Core.Senses;

/// <summary>Codes a batch of vectors (rows×dims) over the model's atoms; the default is <see cref="BatchOmp.Encode"/>.</summary>
public delegate SparseCodes TermEncoder(float[] vectors, int rows);

/// <summary>A term resolved against the vocabulary, with the atoms that may carry its senses (before grouping).</summary>
public sealed record TermPlan(
    TermQuery Query, int Row, bool Composed, bool Unknown, float[]? Vector, int[] Atoms, float[] Weights,
    IReadOnlyList<DroppedAtom> Dropped, IReadOnlyList<string> Notes, IReadOnlyList<string> CloseSpellings);

/// <summary>Occurrences of a term in a corpus assigned, one by one, to the best of the plan's atoms.</summary>
/// <param name="Sums">For each atom of the plan, the sum of the context vectors assigned to it (dims floats).</param>
/// <param name="Counts">For each atom of the plan, how many occurrences were assigned to it.</param>
/// <param name="Mean">Mean context vector over all occurrences of all terms (the common component removed before comparing).</param>
public sealed record TermCorpusEvidence(float[][] Sums, int[] Counts, float[] Mean)
{
    /// <summary>Atoms outside the term's kept atoms that many of its occurrence contexts point to (best atom of the
    /// whole dictionary), candidates for a sense the vector does not carry.</summary>
    public IReadOnlyList<CorpusAtom> CorpusAtoms { get; init; } = [];
}

/// <summary>An atom that <paramref name="Occurrences"/> contexts of a term point to, with the sum of those unit contexts.</summary>
public sealed record CorpusAtom(int Atom, int Occurrences, float[] Sum);

/// <summary>
/// Everything the sense audit needs from a model, computed once: atom catalogue, atom co-usage, the vocabulary index,
/// the words using each atom, label sums and smooth-inverse-frequency weights.
/// </summary>
public sealed class SenseModel
{
    public WordVectors Vectors { get; }
    public float[] Atoms { get; }
    public int AtomCount { get; }
    public int Dimensions => Vectors.Dimensions;
    public SparseCodes Codes { get; }
    public long[]? Counts { get; }
    public SenseOptions Options { get; }
    public AtomCatalog Catalog { get; }
    public AtomCoUsage CoUsage { get; }
    /// <summary>a/(a + p(w)) per word; 1 for every word when counts are unknown.</summary>
    public float[] SifWeights { get; }

    private readonly Dictionary<string, int> _index;
    private readonly int[][] _atomWords;
    private readonly float[] _labelSums;
    private readonly int[] _labelSizes;
    private readonly TermEncoder _encoder;

    private SenseModel(WordVectors vectors, float[] atoms, int atomCount, SparseCodes codes, long[]? counts,
        SenseOptions options, AtomCatalog catalog, TermEncoder? encoder)
    {
        Vectors = vectors; Atoms = atoms; AtomCount = atomCount; Codes = codes; Counts = counts; Options = options;
        Catalog = catalog;
        CoUsage = AtomCoUsage.Build(codes, atomCount);
        int d = vectors.Dimensions;
        _index = new Dictionary<string, int>(vectors.Count, StringComparer.Ordinal);
        for (int w = 0; w < vectors.Count; w++) _index.TryAdd(vectors.Words[w], w);

        var lists = new List<int>[atomCount];
        for (int a = 0; a < atomCount; a++) lists[a] = [];
        for (int w = 0; w < codes.Rows; w++)
        {
            if (!Eligible(w)) continue;
            var ids = codes.AtomsOf(w);
            var ws = codes.WeightsOf(w);
            for (int s = 0; s < ids.Length; s++)
                if (ids[s] >= 0 && ids[s] < atomCount && ws[s] > 0) lists[ids[s]].Add(w);
        }
        _atomWords = lists.Select(l => l.ToArray()).ToArray();

        _labelSums = new float[(long)atomCount * d];
        _labelSizes = new int[atomCount];
        for (int a = 0; a < atomCount; a++)
        {
            var sum = _labelSums.AsSpan(a * d, d);
            foreach (int w in catalog.LabelOf(a))
            {
                if (w < 0) continue;
                TensorPrimitives.Add(sum, vectors.Row(w), sum);
                _labelSizes[a]++;
            }
        }

        SifWeights = new float[vectors.Count];
        if (counts is null) Array.Fill(SifWeights, 1f);
        else
        {
            double total = 0;
            foreach (long c in counts) total += Math.Max(0, c);
            for (int w = 0; w < counts.Length; w++)
            {
                double p = total > 0 ? Math.Max(0, counts[w]) / total : 0;
                SifWeights[w] = (float)(options.SifA / (options.SifA + p));
            }
        }
        _encoder = encoder ?? DefaultEncoder;
    }

    /// <summary>Builds the sense model. <paramref name="vectors"/> rows and <paramref name="atoms"/> rows (atomCount×dims)
    /// are unit vectors; <paramref name="codes"/> has one row per word.</summary>
    public static SenseModel Build(WordVectors vectors, float[] atoms, int atomCount, SparseCodes codes, long[]? counts,
        SenseOptions? options = null, TermEncoder? encoder = null)
    {
        options ??= new SenseOptions();
        ArgumentNullException.ThrowIfNull(vectors);
        ArgumentNullException.ThrowIfNull(atoms);
        Guard.Finite(vectors.Values, vectors.Dimensions, "word vectors");
        var catalog = AtomCatalog.Build(vectors, atoms, atomCount, codes, counts, options.Naming);
        return new SenseModel(vectors, atoms, atomCount, codes, counts, options, catalog, encoder);
    }

    public ReadOnlySpan<float> Atom(int a) => Atoms.AsSpan(a * Dimensions, Dimensions);

    /// <summary>Row of <paramref name="word"/> in the vectors, or −1.</summary>
    public int IndexOf(string word) => _index.GetValueOrDefault(word, -1);

    /// <summary>Words (eligible for labels) whose code gives the atom a positive weight.</summary>
    public IReadOnlyList<int> WordsUsing(int atom) => _atomWords[atom];

    public bool Eligible(int w) => Counts is null || Counts[w] >= Options.Naming.MinCount;

    private float[]? _gram;
    private (long[] counts, double[] ambiguity)? _peers;
    private readonly object _peerLock = new();

    /// <summary>Share of peer words whose grouping ambiguity is below <paramref name="ambiguity"/> (ties half). Peers:
    /// the <see cref="SenseOptions.PeerWindow"/> sampled vocabulary words nearest in count to <paramref name="count"/>,
    /// or all sampled words when the count is unknown. Null with fewer than <see cref="SenseOptions.MinPeers"/>.</summary>
    public double? PeerRank(long? count, double ambiguity)
    {
        var (counts, amb) = Peers();
        int n = counts.Length;
        if (n < Options.MinPeers || n == 0) return null;
        int lo = 0, hi = n;
        if (count is long c && Counts is not null && n > Options.PeerWindow)
        {
            // counts are ascending: centre a window of PeerWindow entries on the first count >= c.
            int at = Array.BinarySearch(counts, c);
            if (at < 0) at = ~at;
            while (at > 0 && counts[at - 1] == c) at--;
            lo = Math.Clamp(at - Options.PeerWindow / 2, 0, n - Options.PeerWindow);
            hi = lo + Options.PeerWindow;
        }
        double below = 0;
        for (int i = lo; i < hi; i++)
            below += amb[i] < ambiguity - 1e-12 ? 1 : Math.Abs(amb[i] - ambiguity) <= 1e-12 ? 0.5 : 0;
        return below / (hi - lo);
    }

    /// <summary>The peer table: up to PeerSample eligible words taken at even steps of the frequency order, with the
    /// ambiguity of their own grouping (no corpus evidence, no gate), sorted by count. Built once, on first use.</summary>
    private (long[] counts, double[] ambiguity) Peers()
    {
        if (_peers is { } ready) return ready;
        lock (_peerLock)
        {
            if (_peers is { } built) return built;
            var rows = Enumerable.Range(0, Vectors.Count).Where(Eligible)
                .OrderBy(w => Counts is null ? 0 : Counts[w]).ThenBy(w => w).ToArray();
            int take = Math.Min(Options.PeerSample, rows.Length);
            var picked = new int[take];
            for (int i = 0; i < take; i++) picked[i] = rows[(int)((long)i * rows.Length / Math.Max(1, take))];
            var counts = new long[take];
            var amb = new double[take];
            Parallel.For(0, take, new ParallelOptions { MaxDegreeOfParallelism = Math.Max(1, Options.Naming.Threads <= 0 ? Environment.ProcessorCount : Options.Naming.Threads) }, i =>
            {
                int w = picked[i];
                var plan = PlanFromCode(TermQuery.From(Vectors.Words[w]), w, false, Vectors.Row(w).ToArray(), Codes.AtomsOf(w), Codes.WeightsOf(w));
                counts[i] = Counts is null ? 0 : Counts[w];
                amb[i] = SenseGrouping.GroupAmbiguity(this, plan);
            });
            _peers = (counts, amb);
            return _peers.Value;
        }
    }

    private SparseCodes DefaultEncoder(float[] vectors, int rows)
    {
        if (_gram is null)
        {
            var gram = new float[(long)AtomCount * AtomCount];
            Gemm.MultiplyTransposed(Atoms, AtomCount, Atoms, AtomCount, Dimensions, gram, Options.Naming.Threads);
            _gram = gram;
        }
        return BatchOmp.Encode(vectors, rows, Dimensions, Atoms, AtomCount, Codes.Sparsity, Options.Naming.Threads, _gram).Codes;
    }

    /// <summary>Resolves each term and picks the atoms that may carry its senses. Composed terms (several words, no
    /// joined entry) are coded together in one call of the encoder.</summary>
    public IReadOnlyList<TermPlan> Plan(IReadOnlyList<TermQuery> terms)
    {
        ArgumentNullException.ThrowIfNull(terms);
        int d = Dimensions;
        var plans = new TermPlan?[terms.Count];
        var composed = new List<(int term, float[] vector)>();
        for (int t = 0; t < terms.Count; t++)
        {
            var q = terms[t];
            int row = IndexOf(q.Term.Trim().ToLowerInvariant());
            if (row < 0 && q.Tokens.Length == 1) row = IndexOf(q.Tokens[0]);
            if (row < 0 && q.Tokens.Length > 1) row = IndexOf(string.Join('_', q.Tokens));
            if (row >= 0)
            {
                plans[t] = PlanFromCode(q, row, false, Vectors.Row(row).ToArray(), Codes.AtomsOf(row), Codes.WeightsOf(row));
                continue;
            }
            if (q.Tokens.Length > 1)
            {
                var missing = q.Tokens.Where(tok => IndexOf(tok) < 0).Distinct().ToArray();
                if (missing.Length == 0)
                {
                    // Composition: v = normalise(Σ_i v_i / |v_i|) over the term's words (normalised mean of unit vectors).
                    var v = new float[d];
                    foreach (var tok in q.Tokens)
                    {
                        var r = Vectors.Row(IndexOf(tok));
                        float norm = TensorPrimitives.Norm(r);
                        if (norm > 0) TensorPrimitives.MultiplyAdd(r, 1f / norm, v, v);
                    }
                    float vn = TensorPrimitives.Norm(v);
                    if (vn > 0 && float.IsFinite(vn))
                    {
                        TensorPrimitives.Multiply(v, 1f / vn, v);
                        composed.Add((t, v));
                        continue;
                    }
                    plans[t] = UnknownPlan(q, ["the words' vectors cancel out (zero mean)"], []);
                    continue;
                }
                var notes = new List<string>();
                var spellings = new List<string>();
                foreach (var tok in missing)
                {
                    var close = Spelling.Closest(tok, Vectors.Words, Counts, Options.MaxEditDistance, Options.MaxSpellings);
                    notes.Add(close.Length > 0 ? $"word '{tok}' is not in the vocabulary (close: {string.Join(", ", close)})" : $"word '{tok}' is not in the vocabulary");
                    spellings.AddRange(close);
                }
                plans[t] = UnknownPlan(q, notes, spellings.Distinct().ToArray());
                continue;
            }
            var key = q.Tokens.Length == 1 ? q.Tokens[0] : q.Key;
            var near = key.Length == 0 ? [] : Spelling.Closest(key, Vectors.Words, Counts, Options.MaxEditDistance, Options.MaxSpellings);
            plans[t] = UnknownPlan(q, [q.Tokens.Length == 0 ? "the term has no letters or digits" : "not in the vocabulary"], near);
        }
        if (composed.Count > 0)
        {
            var batch = new float[composed.Count * d];
            for (int i = 0; i < composed.Count; i++) composed[i].vector.CopyTo(batch, i * d);
            var codes = _encoder(batch, composed.Count);
            for (int i = 0; i < composed.Count; i++)
            {
                var (t, v) = composed[i];
                plans[t] = PlanFromCode(terms[t], -1, true, v, codes.AtomsOf(i), codes.WeightsOf(i));
            }
        }
        return plans.Select(p => p!).ToArray();
    }

    private static TermPlan UnknownPlan(TermQuery q, IReadOnlyList<string> notes, string[] spellings)
        => new(q, -1, false, true, null, [], [], [], notes, spellings);

    /// <summary>Keeps atoms with a positive weight of at least MinRelativeWeight × the largest positive weight that are
    /// not generic; records why each other atom was dropped.</summary>
    private TermPlan PlanFromCode(TermQuery q, int row, bool composed, float[] vector, ReadOnlySpan<int> ids, ReadOnlySpan<float> weights)
    {
        var merged = new Dictionary<int, float>();
        var order = new List<int>();
        for (int s = 0; s < ids.Length; s++)
        {
            if (ids[s] < 0 || ids[s] >= AtomCount || weights[s] == 0) continue;
            if (!merged.ContainsKey(ids[s])) order.Add(ids[s]);
            merged[ids[s]] = merged.GetValueOrDefault(ids[s]) + weights[s];
        }
        float maxPositive = 0;
        foreach (var w in merged.Values) maxPositive = Math.Max(maxPositive, w);
        var dropped = new List<DroppedAtom>();
        var kept = new List<(int atom, float weight)>();
        foreach (int a in order)
        {
            float w = merged[a];
            if (w < 0) dropped.Add(new DroppedAtom(a, w, "negative weight"));
            else if (w < Options.MinRelativeWeight * maxPositive) dropped.Add(new DroppedAtom(a, w, "small weight"));
            else if (Catalog.IsGeneric(a)) dropped.Add(new DroppedAtom(a, w, "generic atom"));
            else kept.Add((a, w));
        }
        var notes = new List<string>();
        if (composed) notes.Add("composed: normalised mean of the words' vectors, coded over the atoms");
        if (kept.Count == 0)
            notes.Add(merged.Count == 0 ? "the code has no atoms" : maxPositive <= 0 ? "the code has no positive weight" : "the code uses only generic atoms");
        kept.Sort((x, y) => x.weight != y.weight ? y.weight.CompareTo(x.weight) : x.atom.CompareTo(y.atom));
        return new TermPlan(q, row, composed, false, vector, kept.Select(k => k.atom).ToArray(), kept.Select(k => k.weight).ToArray(), dropped, notes, []);
    }

    /// <summary>Plans and finishes every term without corpus evidence.</summary>
    public IReadOnlyList<TermSenses> Analyze(IReadOnlyList<TermQuery> terms) => Plan(terms).Select(p => Finish(p, null)).ToArray();

    public TermSenses Analyze(TermQuery term) => Analyze([term])[0];

    /// <summary>Groups the plan's atoms into senses and describes each sense.</summary>
    public TermSenses Finish(TermPlan plan, TermCorpusEvidence? evidence) => SenseGrouping.Finish(this, plan, evidence);

    /// <summary>Label-closeness of atoms a and b: mean cross-cosine of their label words over the geometric mean of
    /// their coherences, with <paramref name="exclude"/> (the term's row) left out of both label sets. NaN when either
    /// set has fewer than two words or a coherence below 0.05 (too diffuse to compare).</summary>
    internal double LabelRatio(int a, int b, int exclude)
    {
        int d = Dimensions;
        var bufA = new float[d];
        var bufB = new float[d];
        int ka = LabelSet(a, exclude, bufA), kb = LabelSet(b, exclude, bufB);
        if (ka < 2 || kb < 2) return double.NaN;
        double cross = TensorPrimitives.Dot(bufA, bufB) / ((double)ka * kb);
        double ca = (TensorPrimitives.Dot(bufA, bufA) - ka) / ((double)ka * (ka - 1));
        double cb = (TensorPrimitives.Dot(bufB, bufB) - kb) / ((double)kb * (kb - 1));
        if (ca < 0.05 || cb < 0.05) return double.NaN;
        return cross / Math.Sqrt(ca * cb);
    }

    /// <summary>Sum of the unit label vectors of <paramref name="atom"/> without <paramref name="exclude"/>; returns their number.
    /// Uses the identity |Σ v_i|² = k + Σ_{i≠j} cos(v_i, v_j) for unit v_i.</summary>
    private int LabelSet(int atom, int exclude, Span<float> sum)
    {
        int d = Dimensions;
        _labelSums.AsSpan(atom * d, d).CopyTo(sum);
        int k = _labelSizes[atom];
        if (exclude >= 0)
        {
            foreach (int w in Catalog.LabelOf(atom))
                if (w == exclude) { TensorPrimitives.Subtract(sum, Vectors.Row(w), sum); k--; }
        }
        return k;
    }
}
