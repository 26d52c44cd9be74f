using SenseSplit.Core.Text;

namespace SenseSplit.Tests.Text;

public class WordTableTests
{
    [Fact]
    public void Increment_ManyWords_CountsMatchDictionary()
    {
        var table = new WordTable();
        var reference = new Dictionary<string, long>();
        var rng = new Random(3);
        for (int i = 0; i < 50_000; i++)
        {
            string w = "w" + rng.Next(5000).ToString(System.Globalization.CultureInfo.InvariantCulture) + (i % 3 == 0 ? "é" : "");
            table.Increment(w);
            reference[w] = reference.GetValueOrDefault(w) + 1;
        }
        Assert.Equal(reference.Count, table.Count);
        foreach (var (w, c) in reference) Assert.Equal(c, table.CountOf(table.Find(w)));
        Assert.Equal(-1, table.Find("absent"));
    }

    [Fact]
    public void GetOrAdd_IdsInOrderOfFirstSight()
    {
        var table = new WordTable();
        Assert.Equal(0, table.GetOrAdd("b"));
        Assert.Equal(1, table.GetOrAdd("a"));
        Assert.Equal(0, table.GetOrAdd("b"));
        Assert.Equal("a", table.WordString(1));
    }
}

public class VocabularyTests
{
    [Fact]
    public void Select_MinCountMaxWordsAndTies_AreDeterministic()
    {
        var table = new WordTable();
        foreach (var (w, c) in new[] { ("zeta", 5), ("alpha", 5), ("beta", 9), ("rare", 1), ("mid", 5) })
            table.Add(table.GetOrAdd(w), c);
        var v = Vocabulary.Select(table, minCount: 2, maxWords: 3);
        // Highest count first, ties by ordinal text: beta(9), alpha(5), mid(5); zeta(5) is cut by maxWords.
        Assert.Equal(["beta", "alpha", "mid"], v.Words);
        Assert.Equal([9L, 5, 5], v.Counts);
        Assert.Equal(-1, v.WordIdOf(table.Find("zeta")));
        Assert.Equal(-1, v.WordIdOf(table.Find("rare")));
        Assert.Equal(0, v.WordIdOf(table.Find("beta")));
    }
}
