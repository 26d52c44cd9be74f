using SenseSplit.Core.Text;

namespace SenseSplit.Tests.Text;

public class PhraseTests
{
    private sealed class Collect(WordTable table) : IIdSink
    {
        public readonly List<string> Items = new();
        public void Id(int id) => Items.Add(table.WordString(id));
        public void LineBreak() => Items.Add("|");
        public void ParagraphBreak() => Items.Add("¶");
    }

    private static List<string> Join(string[] phrases, string text)
    {
        var table = new WordTable();
        var set = new PhraseSet();
        foreach (var p in phrases) set.Add(table, p.Split(' ').Select(w => table.GetOrAdd(w)).ToArray());
        var joiner = new PhraseJoiner(set);
        var sink = new Collect(table);
        foreach (var line in text.Split('\n'))
        {
            foreach (var w in line.Split(' ', StringSplitOptions.RemoveEmptyEntries)) joiner.Push(table.GetOrAdd(w), sink);
            joiner.Flush(sink);
            sink.LineBreak();
        }
        return sink.Items;
    }

    [Fact]
    public void Join_GreedyLongestMatch()
    {
        var phrases = new[] { "new york", "new york city", "york city", "city hall" };
        Assert.Equal(["i", "love", "new_york_city", "hall", "|"], Join(phrases, "i love new york city hall"));
        Assert.Equal(["new_york", "state", "|"], Join(phrases, "new york state"));
        Assert.Equal(["new", "|", "york_city", "|"], Join(phrases, "new\nyork city"));
    }

    [Fact]
    public void Join_PrefixWithoutCompletion_PassesThrough()
    {
        var phrases = new[] { "a b c d" };
        Assert.Equal(["a", "b", "c", "x", "a_b_c_d", "|"], Join(phrases, "a b c x a b c d"));
    }

    [Fact]
    public void Join_OverlappingCandidates_LeftmostWins()
    {
        var phrases = new[] { "a b", "b c" };
        Assert.Equal(["a_b", "c", "|"], Join(phrases, "a b c"));
        Assert.Equal(["x", "b_c", "|"], Join(phrases, "x b c"));
    }

    [Fact]
    public void Npmi_BoundaryCases_MatchDefinition()
    {
        // Bouma 2009, GSCL, §3: NPMI = 1 for complete co-occurrence, 0 for independence, -1 in the limit of never together.
        Assert.Equal(1.0, PhraseScorer.Npmi(10, 10, 10, 100, 100), 12);
        // Independence: p(ab) = p(a)p(b) = 0.1 · 0.2.
        Assert.Equal(0.0, PhraseScorer.Npmi(2, 10, 20, 100, 100), 12);
        Assert.Equal(-1.0, PhraseScorer.Npmi(0, 10, 20, 100, 100), 12);
        // Hand-computed: p(ab)=0.05, p(a)=p(b)=0.1: ln(5)/-ln(0.05) = 1.6094/2.9957 = 0.53724.
        Assert.Equal(0.53724, PhraseScorer.Npmi(5, 10, 10, 100, 100), 4);
    }

    [Fact]
    public void BigramCounter_WithScorer_FindsPlantedCollocation()
    {
        // ids: 0 "the" (every other token), 1 "hot" + 2 "dog" (always together, in a third of the lines), 3..22 fillers.
        var counter = new BigramCounter();
        var counts = new long[23];
        var rng = new Random(5);
        long tokens = 0;
        for (int line = 0; line < 2000; line++)
        {
            var ids = new List<int>();
            for (int i = 0; i < 4; i++) { ids.Add(0); ids.Add(3 + rng.Next(20)); }
            if (rng.Next(3) == 0) ids.InsertRange(2 * rng.Next(5), [1, 2]);
            foreach (int id in ids) { counter.Id(id); counts[id]++; tokens++; }
            counter.LineBreak();
        }
        var chosen = PhraseScorer.Select(counter.Pairs(), id => counts[id], tokens, counter.Bigrams, minCount: 5, threshold: 0.5);
        var only = Assert.Single(chosen);
        Assert.Equal((1, 2), (only.First, only.Second));
        Assert.True(only.Npmi > 0.9, $"NPMI of the planted pair is {only.Npmi}");
    }
}
