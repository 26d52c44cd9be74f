using System.Globalization;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class PseudoWordTests
{
    [Fact]
    public void Marker_IsMathSymbolNotLetterOrDigit()
    {
        // Unicode Character Database (through .NET's tables): U+2295 CIRCLED PLUS has general category Sm, so a
        // tokenizer that keeps letters, digits and inner connectors never emits it inside a word.
        Assert.Equal(UnicodeCategory.MathSymbol, char.GetUnicodeCategory(PseudoWord.Marker));
        Assert.False(char.IsLetterOrDigit(PseudoWord.Marker));
        Assert.False(char.IsPunctuation(PseudoWord.Marker));
    }

    [Fact]
    public void Compose_JoinsWithMarker()
    {
        Assert.Equal("harbour\u2295lantern", PseudoWord.Compose("harbour", "lantern"));
        Assert.True(PseudoWord.IsPseudoWord(PseudoWord.Compose("a", "b")));
        Assert.False(PseudoWord.IsPseudoWord("harbour"));
    }

    [Fact]
    public void Choose_NameTaken_PicksFirstFreeNumberedVariant()
    {
        var vocabulary = new HashSet<string> { "a\u2295b", "a\u2295b\u22952" };
        Assert.Equal("a\u2295b\u22953", PseudoWord.Choose("a", "b", vocabulary.Contains));
        Assert.Equal("a\u2295c", PseudoWord.Choose("a", "c", vocabulary.Contains));
    }

    [Fact]
    public void Colliding_ListsMarkedTokens()
    {
        Assert.Equal(["x\u2295y"], PseudoWord.Colliding(["plain", "x\u2295y", "other"]));
    }

    [Theory]
    [InlineData("", "b")]
    [InlineData("a b", "c")]
    [InlineData("a", "b\u2295c")]
    public void Compose_BadWord_Throws(string a, string b)
    {
        Assert.Throws<ArgumentException>(() => PseudoWord.Compose(a, b));
    }
}
