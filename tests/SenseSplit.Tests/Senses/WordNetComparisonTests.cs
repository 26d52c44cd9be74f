using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.Senses;

public class WordNetComparisonTests
{
    [Fact]
    public void Spearman_WithTies_MatchesMathNet()
    {
        var rng = new Random(5);
        var x = Enumerable.Range(0, 200).Select(_ => (double)rng.Next(6)).ToArray();
        var y = x.Select(v => v + rng.Next(4)).ToArray();
        // Reference: MathNet.Numerics 5.0.0 Correlation.Spearman (average ranks for ties).
        double expected = MathNet.Numerics.Statistics.Correlation.Spearman(x, y);
        Assert.Equal(expected, WordNetComparison.Spearman(x, y), 10);
    }

    [Fact]
    public void Ranks_Ties_ShareMeanRank()
    {
        Assert.Equal([1.0, 2.5, 2.5, 4.0], WordNetComparison.Ranks([10.0, 20, 20, 30]));
    }

    [Fact]
    public void Compare_TinyConstructedCase_MatchesHandComputation()
    {
        // Bin ⌊log2 count⌋ = 6 (64..127): mono found 1,1,2 ; poly found 2,3 → weight min(3,2)=2.
        // Bin 10 (1024..2047): mono found 1 ; poly found 3 → weight 1. Bin 3 has only mono words: not matched.
        var pairs = new[]
        {
            new SenseCountPair("a", 1, 1, 64), new SenseCountPair("b", 1, 1, 100), new SenseCountPair("c", 2, 1, 127),
            new SenseCountPair("d", 2, 6, 70), new SenseCountPair("e", 3, 9, 80),
            new SenseCountPair("f", 1, 1, 1500), new SenseCountPair("g", 3, 5, 2000),
            new SenseCountPair("h", 4, 1, 10),
            new SenseCountPair("i", 2, 3, 90), // 3 senses: neither group (polysemousMin = 5), counted in ρ only
        };
        var r = WordNetComparison.Compare(pairs);
        Assert.Equal(2, r.MatchedBins);
        Assert.Equal((2 * (4.0 / 3) + 1 * 1) / 3, r.MonosemousMean, 12);
        Assert.Equal((2 * 2.5 + 1 * 3) / 3, r.PolysemousMean, 12);
        Assert.Equal((2 * (1.0 / 3) + 0) / 3, r.MonosemousSeveral, 12);
        Assert.Equal(1.0, r.PolysemousSeveral, 12);
        Assert.Equal(WordNetComparison.Spearman(pairs.Select(p => (double)p.Found).ToArray(), pairs.Select(p => (double)p.Dictionary).ToArray()), r.Spearman, 12);
    }

    [Fact]
    public void FromModel_NamedModel_TwoSenseWordsCountTwo()
    {
        // Dictionary sense counts here are invented for the constructed model (bank, bass, mouse planted with two senses).
        var c = NamedModel.Build();
        var model = SenseModel.Build(c.Vectors, c.Atoms, c.AtomCount, c.Codes, c.Counts);
        var table = new Dictionary<string, int> { ["bank"] = 10, ["bass"] = 8, ["mouse"] = 6, ["loan"] = 1, ["guitar"] = 1, ["trout"] = 1, ["rain"] = 1, ["oven"] = 1, ["notaword"] = 3 };
        var (comparison, pairs) = WordNetComparison.FromModel(model, table);
        Assert.Equal(8, pairs.Count); // "notaword" is not in the vocabulary
        Assert.All(pairs, p => Assert.Equal(p.Dictionary >= 5 ? 2 : 1, p.Found));
        Assert.Equal(WordNetComparison.Compare(pairs), comparison);
        // By hand: ranks of found = (7,7,7,3,3,3,3,3), of the dictionary = (8,7,6,3,3,3,3,3) (pairs sorted by word:
        // bank, bass, mouse first after reordering); Sxy = 30, Sxx = 30, Syy = 32, so ρ = 30/√960.
        Assert.Equal(30 / Math.Sqrt(960), comparison.Spearman, 10);
        if (comparison.MatchedBins > 0)
        {
            Assert.Equal(1.0, comparison.MonosemousMean, 12);
            Assert.Equal(2.0, comparison.PolysemousMean, 12);
        }
    }
}
