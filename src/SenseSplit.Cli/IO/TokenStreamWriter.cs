using SenseSplit.Core.Text;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Writes a token stream as text a whitespace-splitting trainer reads back token for token: the tokens of one input
/// line separated by single spaces and ended by "\n"; a paragraph break (blank line, U+2029, end of a document) as one
/// empty line. A line that held no token (only punctuation) is left out, so it cannot turn into a paragraph break;
/// several paragraph breaks in a row give one empty line, and none is written before the first token.
/// </summary>
/// <remarks>Re-scanning the written text with the same tokenizer options gives the same tokens, except the number
/// token (its angle brackets are separators) and pseudo-words (their marker U+2295 is a separator).</remarks>
public sealed class TokenStreamWriter(TextWriter output) : ITokenSink
{
    private bool _lineHasTokens;
    private bool _anyWritten;
    private bool _paragraphOpen; // a paragraph break is owed before the next token

    public long Tokens { get; private set; }
    public long Lines { get; private set; }

    public void Token(ReadOnlySpan<char> token)
    {
        if (_paragraphOpen)
        {
            output.Write('\n');
            _paragraphOpen = false;
        }
        if (_lineHasTokens) output.Write(' ');
        output.Write(token);
        _lineHasTokens = true;
        _anyWritten = true;
        Tokens++;
    }

    public void LineBreak()
    {
        if (!_lineHasTokens) return;
        output.Write('\n');
        _lineHasTokens = false;
        Lines++;
    }

    public void ParagraphBreak()
    {
        LineBreak();
        if (_anyWritten) _paragraphOpen = true;
    }
}
