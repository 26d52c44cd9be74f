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
}
