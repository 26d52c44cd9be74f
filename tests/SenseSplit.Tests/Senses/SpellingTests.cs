using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.Senses;

public class SpellingTests
{
    [Theory]
    // Textbook examples of Levenshtein distance (e.g. kitten→sitting = 3: k→s, e→i, +g; from memory, widely quoted).
    [InlineData("kitten", "sitting", 3)]
    [InlineData("flaw", "lawn", 2)]
    [InlineData("", "abc", 3)]
    [InlineData("same", "same", 0)]
    [InlineData("intention", "execution", 5)]
    public void Distance_KnownPairs_MatchesTextbookValues(string a, string b, int expected)
    {
        Assert.Equal(expected, Spelling.Distance(a, b));
        Assert.Equal(expected, Spelling.Distance(b, a));
    }

    [Fact]
    public void Distance_BeyondLimit_ReturnsLimitPlusOne()
    {
        Assert.Equal(3, Spelling.Distance("kitten", "sitting", 2));
        Assert.Equal(3, Spelling.Distance("a", "abcdef", 2));
    }

    [Fact]
    public void Closest_OrdersByDistanceThenCount()
    {
        var vocab = new[] { "bank", "banks", "bans", "tank", "blank", "river" };
        var counts = new long[] { 100, 50, 5, 80, 90, 10 };
        var close = Spelling.Closest("bamk", vocab, counts, 2, 4);
        // distance 1: bank; distance 2: blank (90), tank (80), banks (50), bans (5).
        Assert.Equal(["bank", "blank", "tank", "banks"], close);
    }
}
