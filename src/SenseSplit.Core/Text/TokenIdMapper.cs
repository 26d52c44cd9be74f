namespace SenseSplit.Core.Text;

/// <summary>
/// Turns scanned tokens into ids for a later pass: token → <see cref="WordTable"/> id (lookup only, no insertion),
/// optional phrase joining on table ids, then table id → word id through a vocabulary map (-1 for words not kept),
/// handed to <paramref name="target"/> with the line and paragraph breaks.
/// </summary>
public sealed class TokenIdMapper(WordTable table, int[] tableToWord, PhraseJoiner? joiner, IIdSink target) : ITokenSink, IIdSink
{
    private int[]? _mapped;

    /// <summary>Tokens that were not in the table (the input changed since the table was built, or the table was pruned).</summary>
    public long UnknownTokens { get; private set; }

    public void Token(ReadOnlySpan<char> token)
    {
        int id = table.Find(token);
        if (id < 0) UnknownTokens++;
        if (joiner is null) Id(id); else joiner.Push(id, this);
    }

    /// <summary>A table id from a replayed id stream (not yet phrase-joined).</summary>
    public void TableId(int id)
    {
        if (joiner is null) Id(id); else joiner.Push(id, this);
    }

    /// <summary>Many replayed values in the <see cref="IdStream"/> encoding (table ids and marks). Without phrases and
    /// with a target that takes spans, the ids are mapped in bulk; otherwise value by value.</summary>
    public void TableIds(ReadOnlySpan<int> values)
    {
        if (joiner is null && target is IIdSpanSink spans)
        {
            _mapped ??= new int[1 << 16];
            var map = tableToWord;
            while (values.Length > 0)
            {
                int n = Math.Min(values.Length, _mapped.Length);
                var chunk = values[..n];
                var mapped = _mapped.AsSpan(0, n);
                for (int i = 0; i < chunk.Length; i++)
                {
                    int v = chunk[i];
                    // Ids map through the vocabulary (out of range: not kept); marks pass unchanged.
                    mapped[i] = v >= 0 ? ((uint)v < (uint)map.Length ? map[v] : IdStream.NotKept) : v;
                }
                spans.Append(mapped);
                values = values[n..];
            }
            return;
        }
        foreach (int v in values)
        {
            if (v >= IdStream.NotKept) TableId(v);
            else if (v == IdStream.LineMark) LineBreak();
            else ParagraphBreak();
        }
    }

    public void LineBreak()
    {
        joiner?.Flush(this);
        target.LineBreak();
    }

    public void ParagraphBreak()
    {
        joiner?.Flush(this);
        target.ParagraphBreak();
    }

    public void Id(int id) => target.Id((uint)id < (uint)tableToWord.Length ? tableToWord[id] : -1);
}
