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

public class WordTablePruningTests
{
    /// <summary>Half Zipf-like draws over a few frequent words, half uniform over a million rare ones.</summary>
    private static string[] Stream(int length, int seed)
    {
        var rng = new Random(seed);
        var s = new string[length];
        for (int i = 0; i < length; i++)
            s[i] = rng.Next(2) == 0
                ? "t" + ((int)(1 / (1 - rng.NextDouble()))).ToString(System.Globalization.CultureInfo.InvariantCulture)
                : "r" + rng.Next(1_000_000).ToString(System.Globalization.CultureInfo.InvariantCulture);
        return s;
    }

    [Fact]
    public void Prune_WhileCounting_KeepsLossyCountingGuarantees()
    {
        // Manku & Motwani 2002, "Approximate frequency counts over data streams", VLDB, §4.2: with error bounds Δ, every
        // kept count f satisfies f ≤ true ≤ f + Δ, and every item whose true count exceeds the threshold is kept.
        var stream = Stream(300_000, 1);
        var truth = new Dictionary<string, long>();
        var table = new WordTable();
        foreach (var w in stream)
        {
            truth[w] = truth.GetValueOrDefault(w) + 1;
            if (table.Find(w) < 0 && table.Live >= 4000) table.Prune(0, default);
            table.Increment(w);
        }
        Assert.True(table.Prunings > 3, $"{table.Prunings} prunings");
        long t = table.PruneThreshold;
        Assert.True(t > 0);
        foreach (var (w, count) in truth)
        {
            int id = table.Find(w);
            if (count > t) Assert.True(id >= 0, $"{w} occurs {count} > T = {t} times but was dropped");
            if (id < 0) continue;
            Assert.True(table.CountOf(id) <= count && count <= table.CountOf(id) + table.ErrorOf(id), $"{w}: f = {table.CountOf(id)}, Δ = {table.ErrorOf(id)}, true {count}");
            Assert.True(table.ErrorOf(id) <= t);
        }
        Assert.True(table.Live <= 4001);
        Assert.True(table.Count <= 4096, $"ids are reused: id space {table.Count}");
    }

    [Fact]
    public void Prune_PinnedAndProtectedIds_Survive()
    {
        var table = new WordTable();
        int pinned = table.GetOrAdd("listed");
        for (int i = 0; i < 100; i++) table.Increment("w" + i.ToString(System.Globalization.CultureInfo.InvariantCulture));
        int held = table.Find("w7");
        int removed = table.Prune(keepBelow: 1, keep: [held]);
        // Every removable word has count 1: the threshold rises to 1 and all of them but the held one go.
        Assert.Equal(99, removed);
        Assert.Equal(1, table.PruneThreshold);
        Assert.Equal(pinned, table.Find("listed"));
        Assert.Equal(held, table.Find("w7"));
        Assert.Equal(-1, table.Find("w8"));
        Assert.Equal(2, table.Live);
        // A freed id is reused, with Δ = the threshold; the text of the kept words survives the arena compaction.
        int again = table.Increment("w8");
        Assert.Equal(101, table.Count);
        Assert.Equal(1, table.ErrorOf(again));
        Assert.Equal("w7", table.WordString(held));
        Assert.Equal("listed", table.WordString(pinned));
    }

    [Fact]
    public void VocabularyCounter_TableBudget_StaysWithinAndStopsForwarding()
    {
        var table = new WordTable();
        var forwarded = new List<int>();
        long budget = 1 << 20;
        var counter = new VocabularyCounter(table, null, new ListSink(forwarded), budget);
        foreach (var w in Stream(400_000, 2)) counter.Token(w);
        Assert.True(counter.Pruned);
        Assert.True(table.ApproximateBytes <= budget, $"{table.ApproximateBytes} bytes > {budget}");
        Assert.Equal(400_000, counter.Tokens);
        Assert.True(forwarded.Count < 400_000);
    }

    private sealed class ListSink(List<int> ids) : IIdSink
    {
        public void Id(int id) => ids.Add(id);
        public void LineBreak() { }
        public void ParagraphBreak() { }
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
