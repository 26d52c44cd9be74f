using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.Senses;

public class WordTokenizerTests
{
    [Fact]
    public void Tokenize_HyphensApostrophesAndPunctuation_KeepsWordInternalJoiners()
    {
        var tokens = WordTokenizer.Tokenize("State-of-the-art, don't — rock 'n' roll -- well-").Select(t => t.Text).ToArray();
        Assert.Equal(["state-of-the-art", "don't", "rock", "n", "roll", "well"], tokens);
    }

    [Fact]
    public void Tokenize_UnicodeLettersAndDigits_LowerCasesAndSplitsOnSymbols()
    {
        var tokens = WordTokenizer.Tokenize("Café ΑΘΗΝΑ 東京 COVID-19 x²+y").Select(t => t.Text).ToArray();
        // '²' is a number of category OtherNumber, not a decimal digit, so it separates tokens.
        Assert.Equal(["café", "αθηνα", "東京", "covid-19", "x", "y"], tokens);
    }

    [Fact]
    public void Tokenize_TypographicApostrophe_NormalisedToAscii()
    {
        Assert.Equal("it's", WordTokenizer.Tokenize("It\u2019s").Single().Text);
    }

    [Fact]
    public void Tokenize_AfterSurrogatePair_OffsetCountsCodePoints()
    {
        // U+1F600 is one code point but two UTF-16 units: the offset after it is 2 code points, the char index 3.
        string text = "\U0001F600 bank";
        var t = WordTokenizer.Tokenize(text).Single();
        Assert.Equal("bank", t.Text);
        Assert.Equal(2, t.Offset);
        Assert.Equal(3, t.CharIndex);
        Assert.Equal("bank", text.Substring(t.CharIndex, t.CharLength));
    }

    [Fact]
    public void Tokenize_EmptyAndSymbolsOnly_NoTokens()
    {
        Assert.Empty(WordTokenizer.Tokenize(""));
        Assert.Empty(WordTokenizer.Tokenize(" ,.;-'\u2014 "));
    }
}
