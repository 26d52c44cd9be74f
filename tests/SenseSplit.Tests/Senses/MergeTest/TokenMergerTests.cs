using SenseSplit.Core.Senses.MergeTest;
using SenseSplit.Core.Text;

namespace SenseSplit.Tests.Senses.MergeTest;

public class TokenMergerTests
{
    private sealed class Recorder : ITokenSink
    {
        public readonly List<string> Events = new();
        public void Token(ReadOnlySpan<char> token) => Events.Add(token.ToString());
        public void LineBreak() => Events.Add("<line>");
        public void ParagraphBreak() => Events.Add("<para>");
    }

    private static List<string> Scan(string text, ITokenSink sink, TokenizerOptions? options = null)
    {
        var scanner = new TokenScanner(options ?? new TokenizerOptions());
        scanner.Scan(text.AsSpan(), true, sink);
        scanner.EndDocument(sink);
        return (sink as Recorder)?.Events ?? [];
    }

    [Fact]
    public void Token_NormalisedFormsOfPairWords_BecomePseudoWord()
    {
        var recorder = new Recorder();
        var merger = new TokenMerger<Recorder>([("bank", "oboe", "bank⊕oboe"), ("tree", "lamp", "tree⊕lamp")], recorder);
        // "Bank," lower-cases to "bank" and loses its comma; "bank's" and "river-bank" are other tokens and stay.
        Scan("The Bank, the OBOE and bank's river-bank.\nA tree lamp\n\nbanks", merger);
        Assert.Equal(["the", "bank⊕oboe", "the", "bank⊕oboe", "and", "bank's", "river-bank", "<line>", "a", "tree⊕lamp", "tree⊕lamp", "<line>", "<para>", "banks", "<line>", "<para>"], recorder.Events);
        Assert.Equal(2, merger.Replaced(0));
        Assert.Equal(2, merger.Replaced(1));
    }

    [Fact]
    public void Token_KeepCase_OnlyExactCaseMatches()
    {
        var recorder = new Recorder();
        var merger = new TokenMerger<Recorder>([("bank", "oboe", "bank⊕oboe")], recorder);
        Scan("Bank bank", merger, new TokenizerOptions { KeepCase = true });
        Assert.Equal(["Bank", "bank⊕oboe", "<line>", "<para>"], recorder.Events);
    }

    [Fact]
    public void Constructor_WordInTwoPairsOrPseudoIsAWord_Throws()
    {
        var r = new Recorder();
        var twice = Assert.Throws<ArgumentException>(() => new TokenMerger<Recorder>([("a", "b", "a⊕b"), ("c", "a", "c⊕a")], r));
        Assert.Contains("'a' is already in pair 1", twice.Message);
        Assert.Throws<ArgumentException>(() => new TokenMerger<Recorder>([("a", "a", "a⊕a")], r));
        Assert.Throws<ArgumentException>(() => new TokenMerger<Recorder>([("a", "b", "c"), ("c", "d", "c⊕d")], r));
        Assert.Throws<ArgumentException>(() => new TokenMerger<Recorder>([("a", "", "a⊕")], r));
    }
}
