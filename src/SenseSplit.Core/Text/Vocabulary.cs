namespace SenseSplit.Core.Text;

/// <summary>
/// The kept words, most frequent first (id 0 = most frequent). Ties in count are broken by ordinal order of the
/// words' UTF-16 text, so the vocabulary is the same on every run and machine.
/// </summary>
public sealed class Vocabulary
{
    private Vocabulary(string[] words, long[] counts, int[] fromTable)
    {
        Words = words;
        Counts = counts;
        TableIdToWordId = fromTable;
    }

    /// <summary>The kept words, most frequent first.</summary>
    public string[] Words { get; }
    /// <summary>The counts used to select the words (same order as <see cref="Words"/>).</summary>
    public long[] Counts { get; }
    /// <summary>For each id of the <see cref="WordTable"/> the vocabulary was selected from: its word id, or -1 if not kept.</summary>
    public int[] TableIdToWordId { get; }
    public int Count => Words.Length;

    /// <summary>Keeps the words with count at least <paramref name="minCount"/>, at most <paramref name="maxWords"/> of
    /// them (the most frequent; ties by ordinal text). <paramref name="exclude"/> (optional, by table id) removes words
    /// from the candidates.</summary>
    public static Vocabulary Select(WordTable table, long minCount, int maxWords, Func<int, bool>? exclude = null)
    {
        ArgumentNullException.ThrowIfNull(table);
        Guard.Positive(maxWords);
        if (minCount < 1) throw new ArgumentOutOfRangeException(nameof(minCount), minCount, $"minCount ({minCount}) must be positive");
        var candidates = new List<int>();
        for (int id = 0; id < table.Count; id++)
            if (table.CountOf(id) >= minCount && (exclude is null || !exclude(id))) candidates.Add(id);
        candidates.Sort((a, b) =>
        {
            int byCount = table.CountOf(b).CompareTo(table.CountOf(a));
            return byCount != 0 ? byCount : table.Word(a).SequenceCompareTo(table.Word(b));
        });
        int kept = Math.Min(maxWords, candidates.Count);
        var words = new string[kept];
        var counts = new long[kept];
        var map = new int[table.Count];
        Array.Fill(map, -1);
        for (int w = 0; w < kept; w++)
        {
            int id = candidates[w];
            words[w] = table.WordString(id);
            counts[w] = table.CountOf(id);
            map[id] = w;
        }
        return new Vocabulary(words, counts, map);
    }

    /// <summary>Word id of a table id (-1 when the word is not kept or the id is newer than the vocabulary).</summary>
    public int WordIdOf(int tableId) => (uint)tableId < (uint)TableIdToWordId.Length ? TableIdToWordId[tableId] : -1;
}

/// <summary>Receives a stream of ids (table ids or word ids) with line and paragraph breaks.</summary>
public interface IIdSink
{
    void Id(int id);
    void LineBreak();
    void ParagraphBreak();
}

/// <summary>Pass-1 sink: counts every token in a <see cref="WordTable"/>, optionally after joining listed phrases.</summary>
/// <remarks>With a byte budget for the table, the table is pruned by lossy counting (<see cref="WordTable.Prune"/>)
/// whenever adding a new word would take it past the budget. The words in the table before counting starts (e.g. the
/// words of a phrase list) and the ids the phrase joiner still holds are never pruned. After the first pruning the
/// table's ids are reused, so the id stream is no longer forwarded (<see cref="Pruned"/>): a later pass must read the
/// text again and look every token up.</remarks>
public sealed class VocabularyCounter : ITokenSink, IIdSink
{
    private readonly WordTable _table;
    private readonly PhraseJoiner? _joiner;
    private IIdSink? _forward;
    private readonly long _maxTableBytes;
    private readonly int _pinned;

    /// <param name="forward">Optional: receives the (joined) table-id stream with its breaks, e.g. to spool it for later passes.</param>
    /// <param name="maxTableBytes">Budget of the table (<see cref="WordTable.ApproximateBytes"/>); unlimited by default.</param>
    public VocabularyCounter(WordTable table, PhraseJoiner? joiner = null, IIdSink? forward = null, long maxTableBytes = long.MaxValue)
    {
        _table = table ?? throw new ArgumentNullException(nameof(table));
        _joiner = joiner;
        _forward = forward;
        if (maxTableBytes < 1) throw new ArgumentOutOfRangeException(nameof(maxTableBytes), maxTableBytes, $"table budget ({maxTableBytes} bytes) must be positive");
        _maxTableBytes = maxTableBytes;
        _pinned = table.Count;
    }

    /// <summary>Tokens counted (after phrase joining, a phrase counts once).</summary>
    public long Tokens { get; private set; }

    /// <summary>The table was pruned: its counts are lower bounds (at most <see cref="WordTable.PruneThreshold"/> too
    /// low) and the id stream stopped at the first pruning.</summary>
    public bool Pruned => _table.Prunings > 0;

    public void Token(ReadOnlySpan<char> token)
    {
        int id = _table.Find(token);
        if (id < 0)
        {
            if (_maxTableBytes != long.MaxValue && _table.BytesAfterAdding(token.Length) > _maxTableBytes)
            {
                _table.Prune(_pinned, _joiner is null ? default : _joiner.Pending);
                if (_forward is not null && Pruned) _forward = null;
            }
            id = _table.GetOrAdd(token);
        }
        if (_joiner is null) Id(id); else _joiner.Push(id, this);
    }

    public void LineBreak()
    {
        _joiner?.Flush(this);
        _forward?.LineBreak();
    }

    public void ParagraphBreak()
    {
        _joiner?.Flush(this);
        _forward?.ParagraphBreak();
    }

    void IIdSink.LineBreak() { }
    void IIdSink.ParagraphBreak() { }

    public void Id(int id)
    {
        _table.Add(id, 1);
        Tokens++;
        _forward?.Id(id);
    }
}

/// <summary>Counts table ids (after a table was pruned and reset, <see cref="WordTable.ResetCounts"/>): every id
/// ≥ 0 adds one to its word's count, so the words left in the table get exact counts; others (-1) are skipped.</summary>
public sealed class TableRecount(WordTable table) : IIdSink
{
    public long Tokens { get; private set; }

    public void Id(int id)
    {
        Tokens++;
        if (id >= 0) table.Add(id, 1);
    }

    public void LineBreak() { }
    public void ParagraphBreak() { }
}
