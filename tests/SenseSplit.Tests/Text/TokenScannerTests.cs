using System.Text;
using SenseSplit.Core.Text;

namespace SenseSplit.Tests.Text;

public class TokenScannerTests
{
    /// <summary>Records tokens, "|" for a line break and "¶" for a paragraph break.</summary>
    private sealed class Recorder : ITokenSink
    {
        public readonly List<string> Items = new();
        public void Token(ReadOnlySpan<char> token) => Items.Add(token.ToString());
        public void LineBreak() => Items.Add("|");
        public void ParagraphBreak() => Items.Add("¶");
    }

    private static List<string> Scan(string text, TokenizerOptions? options = null, int chunk = 0)
    {
        var scanner = new TokenScanner(options ?? new TokenizerOptions());
        var sink = new Recorder();
        if (chunk <= 0)
        {
            int used = scanner.Scan(text.AsSpan(), true, sink);
            Assert.Equal(text.Length, used);
        }
        else
        {
            // Feed in small chunks, carrying the unconsumed tail like the corpus reader does.
            string pending = "";
            for (int at = 0; at < text.Length; at += chunk)
            {
                string piece = pending + text.Substring(at, Math.Min(chunk, text.Length - at));
                bool final = at + chunk >= text.Length;
                int used = scanner.Scan(piece.AsSpan(), final, sink);
                pending = piece[used..];
            }
            Assert.Equal("", pending);
        }
        scanner.EndDocument(sink);
        return sink.Items;
    }

    private static string Tokens(string text, TokenizerOptions? options = null) =>
        string.Join(" ", Scan(text, options).Where(t => t is not "|" and not "¶"));

    [Fact]
    public void Scan_InternalHyphensAndApostrophes_AreKept()
    {
        Assert.Equal("don't state-of-the-art l'eau rock'n'roll", Tokens("Don't state-of-the-art l'eau rock'n'roll"));
    }

    [Fact]
    public void Scan_EdgeHyphensApostrophesAndQuotes_AreDropped()
    {
        Assert.Equal("hello dogs well-known x y", Tokens("'hello' dogs' --well-known-- x -- y"));
    }

    [Fact]
    public void Scan_TypographicApostropheAndUnicodeHyphen_AreNormalised()
    {
        Assert.Equal("don't e-mail", Tokens("Don\u2019t e\u2010mail"));
    }

    [Fact]
    public void Scan_Punctuation_SplitsTokens()
    {
        Assert.Equal("a b c d e f", Tokens("a,b.c;d!e?(f)"));
    }

    [Fact]
    public void Scan_UnicodeLetters_AreLowerCasedUnlessKeepCase()
    {
        Assert.Equal("école straße ελλάδα москва", Tokens("ÉCOLE Straße ΕΛΛΆΔΑ МОСКВА"));
        Assert.Equal("ÉCOLE Straße", Tokens("ÉCOLE Straße", new TokenizerOptions { KeepCase = true }));
    }

    [Fact]
    public void Scan_CombiningMarks_StayInsideTheWord()
    {
        // "é" written as e + COMBINING ACUTE ACCENT (U+0301).
        Assert.Equal("cafe\u0301 ok", Tokens("Cafe\u0301 ok"));
    }

    [Fact]
    public void Scan_Numbers_KeptOrFolded()
    {
        Assert.Equal("3.14 1,000 12-15 1990s v1.2 x", Tokens("3.14, 1,000 12-15 1990s v1.2. x"));
        var fold = new TokenizerOptions { FoldNumbers = true };
        Assert.Equal("<num> <num> <num> 1990s v1.2 x", Tokens("3.14, 1,000 12-15 1990s v1.2. x", fold));
    }

    [Fact]
    public void Scan_FoldedNumberMarker_CannotComeFromText()
    {
        // '<' and '>' always separate, so the text "<num>" is the word "num", never the marker.
        Assert.Equal("num", Tokens("<num>"));
    }

    [Fact]
    public void Scan_HanIdeographs_AreOneTokenEach_KanaAndHangulRuns()
    {
        Assert.Equal("東 京 は ひらがな 한국어", Tokens("東京は ひらがな 한국어"));
        // A supplementary-plane ideograph (U+20B9F) is a token of its own too.
        Assert.Equal("\U00020B9F a", Tokens("\U00020B9Fa"));
    }

    [Fact]
    public void Scan_EmojiAndSymbols_AreDropped()
    {
        Assert.Equal("i love it", Tokens("I \u2764\uFE0F love 😀 it ™ © €"));
    }

    [Fact]
    public void Scan_SupplementaryLetters_AreWordCharacters()
    {
        // U+10428 DESERET SMALL LETTER LONG I; U+10400 is its capital.
        Assert.Equal("\U00010428\U00010428", Tokens("\U00010400\U00010428"));
    }

    [Fact]
    public void Scan_SoftHyphen_IsSkippedInsideWords()
    {
        Assert.Equal("hyphenation", Tokens("hy\u00ADphen\u00ADation"));
    }

    [Fact]
    public void Scan_LinesAndBlankLines_GiveBreaks()
    {
        var items = Scan("a b\r\nc\n\n \t\nd\re\u2029f");
        Assert.Equal(["a", "b", "|", "c", "|", "¶", "¶", "d", "|", "e", "|", "¶", "f", "|", "¶"], items);
    }

    [Fact]
    public void Scan_OtherLineEnds_NelLineSeparatorVtFf()
    {
        // NEL (U+0085), LINE SEPARATOR (U+2028), VT and FF end lines too (docs/tokenizer.md).
        Assert.Equal(["a", "|", "b", "|", "c", "|", "d", "|", "e", "|", "¶"], Scan("a\u0085b\u2028c\vd\fe"));
    }

    [Fact]
    public void Scan_AccentedLettersPrecomposedAndCombined_AreDifferentTokens()
    {
        // No Unicode normalisation: precomposed é (U+00E9) and e + U+0301 stay distinct (docs/tokenizer.md, "Case").
        Assert.Equal("caf\u00e9 cafe\u0301 na\u00efve \u00e5ngstr\u00f6m", Tokens("CAF\u00c9 CAFE\u0301 Na\u00efve \u00c5ngstr\u00f6m"));
    }

    [Fact]
    public void Scan_MarkWithoutWord_IsDropped()
    {
        Assert.Equal("a b", Tokens("a \u0301 b"));
    }

    [Fact]
    public void Scan_PunctuationOnlyLine_IsNotBlank()
    {
        Assert.Equal(["a", "|", "|", "b", "|", "¶"], Scan("a\n***\nb"));
    }

    [Fact]
    public void Scan_OverlongToken_IsDroppedAndCounted()
    {
        var scanner = new TokenScanner(new TokenizerOptions());
        var sink = new Recorder();
        string text = "ok " + new string('x', TokenScanner.MaxTokenLength + 1) + " fine " + new string('y', TokenScanner.MaxTokenLength);
        scanner.Scan(text.AsSpan(), true, sink);
        Assert.Equal(["ok", "fine", new string('y', TokenScanner.MaxTokenLength)], sink.Items);
        Assert.Equal(1, scanner.OverlongTokens);
    }

    [Theory]
    [InlineData(1)]
    [InlineData(2)]
    [InlineData(3)]
    [InlineData(7)]
    public void Scan_ChunkedInput_MatchesWholeInput(int chunk)
    {
        string text = "Don't stop\r\nstate-of-the-art 3.14 東京 😀 \U00010400x\n\nl'eau -- end\r" + new string('z', 150) + " tail";
        Assert.Equal(Scan(text), Scan(text, chunk: chunk));
    }

    [Fact]
    public void Scan_RandomText_ChunkedEqualsWhole()
    {
        // Property check over seeded random strings drawn from an alphabet of tricky characters.
        string alphabet = "ab Z-'’.,1\n\r\t東😀é\u0301\u00AD\u2029";
        var rng = new Random(7);
        for (int trial = 0; trial < 200; trial++)
        {
            var sb = new StringBuilder();
            int len = rng.Next(0, 60);
            var elements = System.Globalization.StringInfo.GetTextElementEnumerator(alphabet);
            var pieces = new List<string>();
            while (elements.MoveNext()) pieces.Add((string)elements.Current);
            for (int i = 0; i < len; i++) sb.Append(pieces[rng.Next(pieces.Count)]);
            string text = sb.ToString();
            Assert.Equal(Scan(text), Scan(text, chunk: 1 + rng.Next(5)));
        }
    }
}
