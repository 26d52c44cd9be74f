namespace SenseSplit.Core.Text;

/// <summary>
/// Turns scanned tokens into ids for a later pass: token → <see cref="WordTable"/> id (lookup only, no insertion),
/// optional phrase joining on table ids, then table id → word id through a vocabulary map (-1 for words not kept),
/// handed to <paramref name="target"/> with the line and paragraph breaks.
/// </summary>
public sealed class TokenIdMapper(WordTable table, int[] tableToWord, PhraseJoiner? joiner, IIdSink target) : ITokenSink, IIdSink
{
    /// <summary>Tokens that were not in the table (the input changed since the table was built).</summary>
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
