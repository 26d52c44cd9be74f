namespace SenseSplit.Core.Text;

/// <summary>
/// The encoding of a stream of ids as int32 values, shared by the id file of the first pass and the bulk calls of
/// <see cref="IIdSpanSink"/>: an id (table id or word id, ≥ 0), <see cref="NotKept"/>, or a mark.
/// </summary>
public static class IdStream
{
    /// <summary>A token whose word is not kept (it still occupies its position).</summary>
    public const int NotKept = -1;
    /// <summary>The end of a non-blank line.</summary>
    public const int LineMark = -2;
    /// <summary>The end of a paragraph (a blank line, PARAGRAPH SEPARATOR or the end of a document).</summary>
    public const int ParagraphMark = -3;
}

/// <summary>An <see cref="IIdSink"/> that also takes many values at once, in the <see cref="IdStream"/> encoding;
/// the result is the same as calling <see cref="IIdSink.Id"/>, <see cref="IIdSink.LineBreak"/> and
/// <see cref="IIdSink.ParagraphBreak"/> value by value.</summary>
public interface IIdSpanSink : IIdSink
{
    void Append(ReadOnlySpan<int> values);
}
