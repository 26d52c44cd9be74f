using SenseSplit.Core.Cooccurrence;

namespace SenseSplit.Core.Text;

/// <summary>
/// A set of multiword terms over <see cref="WordTable"/> ids, as a trie: each phrase is a sequence of at least two
/// table ids and has a table id of its own (its words joined with '_'; '_' never occurs inside a scanned token, so a
/// joined phrase cannot collide with a word of the text).
/// </summary>
public sealed class PhraseSet
{
    private readonly Dictionary<long, int> _edges = new();
    private readonly List<int> _phraseOfNode = [-1];
    private readonly List<bool> _hasChildren = [false];
    private bool[] _startsPhrase = [];

    /// <summary>Separator between the words of a joined phrase.</summary>
    public const char Joiner = '_';

    public int Count { get; private set; }
    public int LongestPhrase { get; private set; }

    /// <summary>Adds the phrase made of <paramref name="words"/> (table ids); returns the phrase's own table id
    /// (added to <paramref name="table"/> when new). Phrases of fewer than two words are rejected.</summary>
    public int Add(WordTable table, ReadOnlySpan<int> words)
    {
        ArgumentNullException.ThrowIfNull(table);
        if (words.Length < 2) throw new ArgumentException($"a phrase needs at least two words (got {words.Length})", nameof(words));
        int node = 0;
        foreach (int w in words)
        {
            long key = ((long)node << 32) | (uint)w;
            if (!_edges.TryGetValue(key, out int child))
            {
                child = _phraseOfNode.Count;
                _phraseOfNode.Add(-1);
                _hasChildren.Add(false);
                _edges.Add(key, child);
                _hasChildren[node] = true;
            }
            node = child;
        }
        if (_phraseOfNode[node] >= 0) return _phraseOfNode[node];
        int length = 0;
        foreach (int w in words) length += table.Word(w).Length + 1;
        var text = new char[length - 1];
        int at = 0;
        for (int i = 0; i < words.Length; i++)
        {
            if (i > 0) text[at++] = Joiner;
            var word = table.Word(words[i]);
            word.CopyTo(text.AsSpan(at));
            at += word.Length;
        }
        int id = table.GetOrAdd(text);
        _phraseOfNode[node] = id;
        Count++;
        LongestPhrase = Math.Max(LongestPhrase, words.Length);
        if (words[0] >= _startsPhrase.Length) Array.Resize(ref _startsPhrase, Math.Max(words[0] + 1, _startsPhrase.Length * 2));
        _startsPhrase[words[0]] = true;
        return id;
    }

    internal bool StartsPhrase(int id) => (uint)id < (uint)_startsPhrase.Length && _startsPhrase[id];
    internal bool TryStep(int node, int id, out int child) => _edges.TryGetValue(((long)node << 32) | (uint)id, out child);
    internal int PhraseAt(int node) => _phraseOfNode[node];
    internal bool HasChildren(int node) => _hasChildren[node];
}

/// <summary>
/// Joins the phrases of a <see cref="PhraseSet"/> in an id stream by greedy longest match from the left: at each
/// position the longest listed phrase starting there is replaced by its phrase id; otherwise the id passes through.
/// Call <see cref="Flush"/> at every line end (phrases never run across lines).
/// </summary>
public sealed class PhraseJoiner
{
    private readonly PhraseSet _phrases;
    private readonly int[] _pending;
    private int _count;

    public PhraseJoiner(PhraseSet phrases)
    {
        _phrases = phrases ?? throw new ArgumentNullException(nameof(phrases));
        _pending = new int[Math.Max(2, phrases.LongestPhrase)];
    }

    public void Push<TSink>(int id, TSink next) where TSink : IIdSink
    {
        if (_count == 0 && !_phrases.StartsPhrase(id)) { next.Id(id); return; }
        _pending[_count++] = id;
        Process(false, next);
    }

    public void Flush<TSink>(TSink next) where TSink : IIdSink => Process(true, next);

    /// <summary>Ids held back while a phrase may still match.</summary>
    internal ReadOnlySpan<int> Pending => _pending.AsSpan(0, _count);

    private void Process<TSink>(bool flush, TSink next) where TSink : IIdSink
    {
        while (_count > 0)
        {
            int node = 0, best = 0, bestPhrase = -1;
            bool open = true;
            for (int m = 0; m < _count; m++)
            {
                if (!_phrases.TryStep(node, _pending[m], out node)) { open = false; break; }
                int p = _phrases.PhraseAt(node);
                if (p >= 0) { best = m + 1; bestPhrase = p; }
            }
            // Everything pending is a prefix of a longer phrase: wait for the next id.
            if (open && _phrases.HasChildren(node) && !flush && _count < _pending.Length) return;
            int take;
            if (best >= 2) { next.Id(bestPhrase); take = best; }
            else { next.Id(_pending[0]); take = 1; }
            _count -= take;
            Array.Copy(_pending, take, _pending, 0, _count);
            // The remainder may start with an id that begins no phrase: pass those through at once.
            while (_count > 0 && !_phrases.StartsPhrase(_pending[0]))
            {
                next.Id(_pending[0]);
                _count--;
                Array.Copy(_pending, 1, _pending, 0, _count);
            }
        }
    }
}

/// <summary>
/// Counts adjacent word pairs within a line (both words kept in a vocabulary) to find collocations for
/// <see cref="PhraseScorer"/>. Ids are word ids; -1 (not kept) breaks pairs.
/// </summary>
public sealed class BigramCounter : IIdSink
{
    private readonly PairHashMap _pairs = new(1 << 16, long.MaxValue);
    private int _previous = -1;

    /// <summary>Adjacent pairs seen (of any words, kept or not): the bigram total.</summary>
    public long Bigrams { get; private set; }
    private bool _havePrevious;

    public void Id(int id)
    {
        if (_havePrevious)
        {
            Bigrams++;
            if (_previous >= 0 && id >= 0) _pairs.Add(((ulong)(uint)_previous << 32) | (uint)id, 1);
        }
        _previous = id;
        _havePrevious = true;
    }

    public void LineBreak() { _havePrevious = false; _previous = -1; }
    public void ParagraphBreak() => LineBreak();

    /// <summary>Every counted pair (first, second, count), in no particular order.</summary>
    public IEnumerable<(int First, int Second, long Count)> Pairs()
    {
        foreach (var (key, value) in _pairs.Entries()) yield return ((int)(key >> 32), (int)(uint)key, value);
    }
}

/// <summary>
/// Normalised pointwise mutual information of a word pair, NPMI(a,b) = ln(p(a,b) / (p(a) p(b))) / -ln p(a,b),
/// in [-1, 1] (1: the words only occur together).
/// </summary>
/// <remarks>Bouma 2009, "Normalized (pointwise) mutual information in collocation extraction", GSCL, eq. (5).
/// p(a,b) = count(a b) / bigrams, p(a) = count(a) / tokens.</remarks>
public static class PhraseScorer
{
    public static double Npmi(long pairCount, long firstCount, long secondCount, long tokens, long bigrams)
    {
        if (pairCount <= 0 || firstCount <= 0 || secondCount <= 0 || tokens <= 0 || bigrams <= 0) return -1;
        double pab = (double)pairCount / bigrams;
        double pa = (double)firstCount / tokens, pb = (double)secondCount / tokens;
        if (pab >= 1) return 1;
        return Math.Log(pab / (pa * pb)) / -Math.Log(pab);
    }

    /// <summary>The pairs with count at least <paramref name="minCount"/> and NPMI at least <paramref name="threshold"/>,
    /// best first (NPMI descending, then count descending, then ids), as (first, second, count, npmi).</summary>
    public static List<(int First, int Second, long Count, double Npmi)> Select(
        IEnumerable<(int First, int Second, long Count)> pairs, Func<int, long> countOf, long tokens, long bigrams,
        long minCount, double threshold)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(countOf);
        var chosen = new List<(int, int, long, double)>();
        foreach (var (a, b, c) in pairs)
        {
            if (c < minCount) continue;
            double npmi = Npmi(c, countOf(a), countOf(b), tokens, bigrams);
            if (npmi >= threshold) chosen.Add((a, b, c, npmi));
        }
        chosen.Sort((x, y) =>
        {
            int r = y.Item4.CompareTo(x.Item4);
            if (r != 0) return r;
            r = y.Item3.CompareTo(x.Item3);
            if (r != 0) return r;
            r = x.Item1.CompareTo(y.Item1);
            return r != 0 ? r : x.Item2.CompareTo(y.Item2);
        });
        return chosen;
    }
}
