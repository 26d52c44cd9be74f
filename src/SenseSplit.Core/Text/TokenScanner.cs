using System.Text;

namespace SenseSplit.Core.Text;

/// <summary>How text is cut into tokens. Defaults: lower-case, numbers kept as they are.</summary>
public sealed record TokenizerOptions
{
    /// <summary>Keep letters' case (default: map every letter to lower case, Unicode simple case mapping).</summary>
    public bool KeepCase { get; init; }
    /// <summary>Replace every number token (digits, with '.', ',' or '-' between digits, no letter) by <see cref="TokenScanner.NumberToken"/>.</summary>
    public bool FoldNumbers { get; init; }
}

/// <summary>Receives what <see cref="TokenScanner"/> finds, in text order.</summary>
public interface ITokenSink
{
    /// <summary>A token; the span is only valid during the call.</summary>
    void Token(ReadOnlySpan<char> token);
    /// <summary>A non-blank line ended.</summary>
    void LineBreak();
    /// <summary>A blank line (only whitespace), a PARAGRAPH SEPARATOR or the end of a document.</summary>
    void ParagraphBreak();
}

/// <summary>
/// Streaming, allocation-free tokenizer over UTF-16 chunks. Feed consecutive chunks of one document to
/// <see cref="Scan"/>; it consumes all but an incomplete trailing token (at most <see cref="MaxTokenLength"/> + 2
/// chars), which the caller passes again at the start of the next chunk. Rules (docs/tokenizer.md): tokens are runs of
/// letters, marks and digits; a hyphen or apostrophe between two word characters stays inside the token ('-' and
/// '\'' after normalisation); '.' and ',' stay between two digits; each Han ideograph is a token of its own;
/// everything else (punctuation, symbols, emoji) separates tokens and is dropped. Tokens longer than
/// <see cref="MaxTokenLength"/> chars are dropped and counted in <see cref="OverlongTokens"/>.
/// </summary>
public sealed class TokenScanner
{
    /// <summary>Longest token kept, in UTF-16 chars; longer runs are dropped (they are almost always junk: URLs, hashes).</summary>
    public const int MaxTokenLength = 100;

    /// <summary>What <see cref="TokenizerOptions.FoldNumbers"/> puts in place of a number. It contains '&lt;' and '&gt;',
    /// which the tokenizer never leaves inside a token, so no word of the text can be equal to it.</summary>
    public const string NumberToken = "<num>";

    private readonly bool _keepCase;
    private readonly bool _foldNumbers;
    private readonly char[] _token = new char[MaxTokenLength + 4];
    private bool _lineBlank = true;
    private bool _skipping;

    public TokenScanner(TokenizerOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        _keepCase = options.KeepCase;
        _foldNumbers = options.FoldNumbers;
    }

    /// <summary>Tokens dropped for being longer than <see cref="MaxTokenLength"/>.</summary>
    public long OverlongTokens { get; private set; }

    /// <summary>Ends the current document: a pending line break and a paragraph break go to the sink; state is reset.</summary>
    public void EndDocument(ITokenSink sink)
    {
        if (!_lineBlank) sink.LineBreak();
        sink.ParagraphBreak();
        _lineBlank = true;
        _skipping = false;
    }

    /// <summary>Tokenizes <paramref name="text"/>; returns how many chars were consumed. With <paramref name="final"/>
    /// everything is consumed (end of the document; call <see cref="EndDocument"/> afterwards).</summary>
    public int Scan<TSink>(ReadOnlySpan<char> text, bool final, TSink sink) where TSink : ITokenSink
    {
        var kinds = CharClasses.Kind;
        int n = text.Length;
        int i = 0;
        if (_skipping)
        {
            // Continue dropping an overlong token that ran over the previous chunk's end.
            while (i < n && IsWordish(kinds[text[i]])) i++;
            if (i == n && !final) return n;
            _skipping = false;
        }
        while (i < n)
        {
            char c = text[i];
            switch (kinds[c])
            {
                case CharKind.Space:
                    i++;
                    break;
                case CharKind.LineEnd:
                    EndLine(sink);
                    i++;
                    break;
                case CharKind.CarriageReturn:
                    if (i + 1 < n) { i += text[i + 1] == '\n' ? 2 : 1; EndLine(sink); }
                    else if (final) { i++; EndLine(sink); }
                    else return i; // CR at the chunk's end: wait for a possible LF
                    break;
                case CharKind.ParagraphEnd:
                    if (!_lineBlank) sink.LineBreak();
                    sink.ParagraphBreak();
                    _lineBlank = true;
                    i++;
                    break;
                case CharKind.Ideograph:
                    _lineBlank = false;
                    sink.Token(text.Slice(i, 1));
                    i++;
                    break;
                case CharKind.HighSurrogate:
                {
                    if (i + 1 >= n) { if (!final) return i; _lineBlank = false; i++; break; }
                    if (!Rune.TryCreate(c, text[i + 1], out var rune)) { _lineBlank = false; i++; break; }
                    var kind = CharClasses.OfRune(rune);
                    if (kind is CharKind.Letter or CharKind.Digit)
                    {
                        int end = ScanWord(text, i, final, sink);
                        if (end < 0) return i;
                        i = end;
                    }
                    else
                    {
                        _lineBlank = false;
                        if (kind == CharKind.Ideograph) sink.Token(text.Slice(i, 2));
                        i += 2;
                    }
                    break;
                }
                case CharKind.Letter:
                case CharKind.Digit:
                {
                    int end = ScanWord(text, i, final, sink);
                    if (end < 0) return i;
                    i = end;
                    break;
                }
                default: // separators, punctuation, stray hyphens/apostrophes, soft hyphens outside words
                    _lineBlank = false;
                    i++;
                    break;
            }
        }
        return n;
    }

    private static bool IsWordish(CharKind k) =>
        k is CharKind.Letter or CharKind.Digit or CharKind.Mark or CharKind.Hyphen or CharKind.Apostrophe or CharKind.NumberSeparator
            or CharKind.HighSurrogate or CharKind.Ignorable;

    private void EndLine<TSink>(TSink sink) where TSink : ITokenSink
    {
        if (_lineBlank) sink.ParagraphBreak(); else sink.LineBreak();
        _lineBlank = true;
    }

    /// <summary>Word character at <paramref name="j"/>: 0 = no, 1 = letter/digit code unit, 2 = surrogate pair, -1 = cannot tell yet (chunk end).</summary>
    private static int WordCharAt(ReadOnlySpan<char> text, int j, bool final, out bool digit)
    {
        digit = false;
        if (j >= text.Length) return final ? 0 : -1;
        char c = text[j];
        var k = CharClasses.Kind[c];
        if (k == CharKind.Letter) return 1;
        if (k == CharKind.Digit) { digit = true; return 1; }
        if (k == CharKind.HighSurrogate)
        {
            if (j + 1 >= text.Length) return final ? 0 : -1;
            if (!Rune.TryCreate(c, text[j + 1], out var rune)) return 0;
            var rk = CharClasses.OfRune(rune);
            if (rk == CharKind.Letter) return 2;
            if (rk == CharKind.Digit) { digit = true; return 2; }
        }
        return 0;
    }

    /// <summary>Scans one word starting at <paramref name="start"/> (a letter or digit); emits it and returns the index
    /// after it, or -1 when the chunk ends before the word is known to be complete.</summary>
    private int ScanWord<TSink>(ReadOnlySpan<char> text, int start, bool final, TSink sink) where TSink : ITokenSink
    {
        _lineBlank = false;
        var kinds = CharClasses.Kind;
        var lower = CharClasses.Lower;
        var buf = _token;
        int n = text.Length;
        int len = 0;
        bool hasLetter = false, overlong = false, lastDigit = false;
        int j = start;
        while (true)
        {
            if (j >= n)
            {
                if (!final) { if (overlong) { _skipping = true; OverlongTokens++; return n; } return -1; }
                break;
            }
            char c = text[j];
            var k = kinds[c];
            if (k == CharKind.Letter)
            {
                if (len < buf.Length) buf[len] = _keepCase ? c : lower[c];
                len++; j++; hasLetter = true; lastDigit = false;
            }
            else if (k == CharKind.Digit)
            {
                if (len < buf.Length) buf[len] = c;
                len++; j++; lastDigit = true;
            }
            else if (k == CharKind.Mark)
            {
                if (len < buf.Length) buf[len] = c;
                len++; j++;
            }
            else if (k == CharKind.Ignorable)
            {
                j++;
            }
            else if (k == CharKind.HighSurrogate)
            {
                int w = WordCharAt(text, j, final, out bool d);
                if (w < 0) { if (overlong) { _skipping = true; OverlongTokens++; return n; } return -1; }
                if (w == 0) break;
                var rune = new Rune(c, text[j + 1]);
                if (!d && !_keepCase) rune = Rune.ToLowerInvariant(rune);
                if (len + 2 <= buf.Length) len += rune.EncodeToUtf16(buf.AsSpan(len));
                else len += rune.Utf16SequenceLength;
                j += 2; hasLetter |= !d; lastDigit = d;
            }
            else if (k is CharKind.Hyphen or CharKind.Apostrophe or CharKind.NumberSeparator)
            {
                // Kept only between two word characters ('.' and ',' only between two digits).
                if (k == CharKind.NumberSeparator && !lastDigit) break;
                int w = WordCharAt(text, j + 1, final, out bool nextDigit);
                if (w < 0) { if (overlong) { _skipping = true; OverlongTokens++; return n; } return -1; }
                if (w == 0 || (k == CharKind.NumberSeparator && !nextDigit)) break;
                if (len < buf.Length) buf[len] = k == CharKind.Hyphen ? '-' : k == CharKind.Apostrophe ? '\'' : c;
                len++; j++; lastDigit = false;
            }
            else break;
            if (len > MaxTokenLength) overlong = true;
        }
        if (overlong || len > MaxTokenLength) { OverlongTokens++; return j; }
        if (_foldNumbers && !hasLetter) sink.Token(NumberToken);
        else sink.Token(buf.AsSpan(0, len));
        return j;
    }
}
