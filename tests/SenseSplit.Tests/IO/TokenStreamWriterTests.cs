using SenseSplit.Cli.IO;
using SenseSplit.Core.Text;

namespace SenseSplit.Tests.IO;

public class TokenStreamWriterTests
{
    private sealed class Recorder : ITokenSink
    {
        public readonly List<string> Events = new();
        public void Token(ReadOnlySpan<char> token) => Events.Add(token.ToString());
        public void LineBreak() => Events.Add("<line>");
        public void ParagraphBreak() => Events.Add("<para>");
    }

    private static void Scan(string text, ITokenSink sink)
    {
        var scanner = new TokenScanner(new TokenizerOptions());
        scanner.Scan(text.AsSpan(), true, sink);
        scanner.EndDocument(sink);
    }

    /// <summary>Tokens with segment boundaries, where consecutive breaks collapse to the strongest (what a window sees).</summary>
    private static List<string> Segments(List<string> events)
    {
        var result = new List<string>();
        foreach (var e in events)
        {
            if (e is "<line>" or "<para>")
            {
                if (result.Count == 0) continue;
                if (result[^1] is "<line>" or "<para>") { if (e == "<para>") result[^1] = "<para>"; continue; }
            }
            result.Add(e);
        }
        while (result.Count > 0 && result[^1] is "<line>" or "<para>") result.RemoveAt(result.Count - 1);
        return result;
    }

    [Fact]
    public void Write_Text_OneLinePerInputLineAndOneBlankLinePerParagraph()
    {
        var text = new StringWriter();
        var writer = new TokenStreamWriter(text);
        Scan("\n\nHello, World!\n  ...  \nSecond line.\n\n\n\nNew paragraph\u2029Third", writer);
        // The punctuation-only line is left out; three blank lines make one; U+2029 ends a paragraph too.
        Assert.Equal("hello world\nsecond line\n\nnew paragraph\n\nthird\n", text.ToString());
        Assert.Equal(7, writer.Tokens);
    }

    [Fact]
    public void Write_RescannedOutput_GivesSameTokensAndSegments()
    {
        // Re-reading the written stream with the same tokenizer must give the same tokens and the same places where a
        // window stops, so a trainer reading it sees the stream the merge test counted.
        string input = "Über-cool naïve café's 3.14 and 1,000 items—done.\r\nLine two\u2028line three\n\n\nL'été « arrive »\n漢字テスト";
        var direct = new Recorder();
        Scan(input, direct);
        var text = new StringWriter();
        Scan(input, new TokenStreamWriter(text));
        var again = new Recorder();
        Scan(text.ToString(), again);
        Assert.Equal(Segments(direct.Events), Segments(again.Events));
    }
}
