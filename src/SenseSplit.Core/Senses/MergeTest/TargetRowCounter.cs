using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Text;

namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// Collects the co-occurrence rows of a few target words from a stream of word ids, with the embed counter's rules:
/// X[t, c] = Σ over occurrences of t and c at distance d ≤ window inside one segment of 1/d (words × words; each
/// target's row is stored sparsely). Segments end at a paragraph break, and at a line break unless
/// <c>windowAcrossLines</c>. Id −1 is a word that is not kept: it takes a position but is counted nowhere.
/// </summary>
/// <remarks>
/// This is row t of the symmetric matrix <see cref="CooccurrenceCounter"/> counts (the 1/d symmetric window, common
/// practice, e.g. Pennington, Socher &amp; Manning 2014, "GloVe", §4.2); a pair of two occurrences of t adds 1/d from
/// each side, so X[t, t] = 2 Σ 1/d, as <see cref="CooccurrenceCounts.Get"/> reports the diagonal. Weights are summed as
/// exact integers L/d with L = lcm(1..window) and divided by L once when a row is read, so the sums are exact and
/// match the embed counter's to the last bit before its float rounding. Memory: one dictionary entry per distinct
/// (target, context) pair; the stream itself is not kept beyond the last <c>window</c> ids.
/// </remarks>
public sealed class TargetRowCounter : IIdSink
{
    private readonly int _words;
    private readonly int _window;
    private readonly bool _acrossLines;
    private readonly int[] _targetOf;
    private readonly Dictionary<int, long>[] _rows;
    private readonly long[] _occurrences;
    private readonly long[] _weights;
    private readonly int[] _recent; // ring buffer of the last ids of the current segment
    private int _position;          // ids seen in the current segment (the ring holds the last min(window, position))

    /// <param name="words">Vocabulary size; ids are in [0, words) or −1.</param>
    /// <param name="targets">Word ids whose rows are wanted (distinct).</param>
    public TargetRowCounter(int words, IReadOnlyList<int> targets, int window, bool windowAcrossLines)
    {
        ArgumentNullException.ThrowIfNull(targets);
        Guard.Positive(words);
        if (window < 1 || window > CooccurrenceOptions.MaxWindow)
            throw new ArgumentOutOfRangeException(nameof(window), window, $"window ({window}) must be between 1 and {CooccurrenceOptions.MaxWindow}");
        _words = words;
        _window = window;
        _acrossLines = windowAcrossLines;
        _targetOf = new int[words];
        Array.Fill(_targetOf, -1);
        for (int t = 0; t < targets.Count; t++)
        {
            int id = targets[t];
            if ((uint)id >= (uint)words) throw new ArgumentOutOfRangeException(nameof(targets), id, $"target {t} has word id {id}, outside [0, {words})");
            if (_targetOf[id] >= 0) throw new ArgumentException($"word id {id} is target {_targetOf[id]} and target {t}", nameof(targets));
            _targetOf[id] = t;
        }
        _rows = new Dictionary<int, long>[targets.Count];
        for (int t = 0; t < _rows.Length; t++) _rows[t] = new Dictionary<int, long>();
        _occurrences = new long[targets.Count];
        long l = 1;
        for (int d = 2; d <= window; d++) l = l / Gcd(l, d) * d;
        Scale = l;
        _weights = new long[window + 1];
        for (int d = 1; d <= window; d++) _weights[d] = l / d;
        _recent = new int[window];
    }

    /// <summary>The integer scale L = lcm(1..window) of the internal weights.</summary>
    public long Scale { get; }
    public int Targets => _rows.Length;
    /// <summary>Ids received (kept or not).</summary>
    public long Tokens { get; private set; }

    /// <summary>Occurrences of target <paramref name="target"/> in the stream.</summary>
    public long Occurrences(int target) => _occurrences[target];

    public void Id(int id)
    {
        if (id < -1 || id >= _words) throw new ArgumentOutOfRangeException(nameof(id), id, $"word id ({id}) must be -1 or below the vocabulary size ({_words})");
        Tokens++;
        int ty = id >= 0 ? _targetOf[id] : -1;
        if (ty >= 0) _occurrences[ty]++;
        int back = id >= 0 ? Math.Min(_position, _window) : 0;
        for (int d = 1; d <= back; d++)
        {
            int x = _recent[(_position - d) % _window];
            if (x < 0) continue;
            int tx = _targetOf[x];
            if (tx < 0 && ty < 0) continue;
            long w = _weights[d];
            // The pair (x, id) at distance d adds 1/d to X[x, id] and to X[id, x]; both are kept if they are targets.
            if (tx >= 0) Add(_rows[tx], id, w);
            if (ty >= 0) Add(_rows[ty], x, w);
        }
        _recent[_position % _window] = id;
        _position++;
        // Keep the counter bounded; only position mod window and min(position, window) matter.
        if (_position >= 1 << 30) _position = _position % _window + _window;
    }

    public void LineBreak()
    {
        if (!_acrossLines) _position = 0;
    }

    public void ParagraphBreak() => _position = 0;

    /// <summary>Row of target <paramref name="target"/>: context ids in increasing order and X[t, c] (exact sums / L).</summary>
    public (int[] Contexts, double[] Counts) Row(int target)
    {
        var row = _rows[target];
        var contexts = row.Keys.ToArray();
        Array.Sort(contexts);
        var counts = new double[contexts.Length];
        for (int i = 0; i < contexts.Length; i++) counts[i] = (double)row[contexts[i]] / Scale;
        return (contexts, counts);
    }

    /// <summary>Σ_c X[t, c] of target <paramref name="target"/>, summed exactly before the one division by L.</summary>
    public double RowTotal(int target)
    {
        long sum = 0;
        foreach (long v in _rows[target].Values) sum += v;
        return (double)sum / Scale;
    }

    private static void Add(Dictionary<int, long> row, int context, long w)
    {
        ref long slot = ref System.Runtime.InteropServices.CollectionsMarshal.GetValueRefOrAddDefault(row, context, out _);
        slot += w;
    }

    private static long Gcd(long a, long b) { while (b != 0) (a, b) = (b, a % b); return a; }
}
