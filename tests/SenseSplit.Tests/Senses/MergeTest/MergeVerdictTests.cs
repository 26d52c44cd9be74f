using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class MergeVerdictTests
{
    // Twelve pairs: six at r = 2 and six at r = 50, with chosen β/α and cosines.
    private static List<PairFit> Case(double cosine, double excessAtHighRatio)
    {
        var list = new List<PairFit>();
        for (int i = 0; i < 6; i++) list.Add(MergeTestData.Constructed(i, 2, 0.9, cosine));
        for (int i = 6; i < 12; i++) list.Add(MergeTestData.Constructed(i, 50, excessAtHighRatio / 50, cosine));
        return list;
    }

    [Fact]
    public void Decide_HighCosineAndRareWordKept_Passes()
    {
        var v = MergeVerdict.Decide(Case(0.95, 4));
        Assert.True(v.Pass);
        Assert.Equal("pass", v.Label);
        Assert.Empty(v.Reasons);
        Assert.Equal(6, v.PairsHighRatio);
        Assert.Equal(4, v.MedianExcessHighRatio, 6);
    }

    [Fact]
    public void Decide_LowCosine_FailsNamingCosine()
    {
        var v = MergeVerdict.Decide(Case(0.85, 4));
        Assert.False(v.Pass);
        Assert.Equal("fail", v.Label);
        Assert.Single(v.Reasons);
        Assert.Contains("cosine", v.Reasons[0]);
    }

    [Fact]
    public void Decide_RareWordAtFrequencyShare_FailsNamingRatio()
    {
        // Weights in proportion to frequency ((β/α)·r = 1) bury the rarer word: below the factor 2.
        var v = MergeVerdict.Decide(Case(0.95, 1));
        Assert.False(v.Pass);
        Assert.Single(v.Reasons);
        Assert.Contains("(beta/alpha)/(1/r)", v.Reasons[0]);
    }

    [Fact]
    public void Decide_TooFewHighRatioPairs_FailsForLackOfEvidence()
    {
        var pairs = Case(0.95, 4).Take(9).ToList(); // three pairs at r = 50
        var v = MergeVerdict.Decide(pairs);
        Assert.False(v.Pass);
        Assert.Contains("only 3 pairs", v.Reasons[0]);
    }

    [Fact]
    public void Decide_OverriddenThresholds_Applied()
    {
        var pairs = Case(0.85, 1.5);
        Assert.False(MergeVerdict.Decide(pairs).Pass);
        var relaxed = new VerdictThresholds { MinMedianCosine = 0.8, MinExcessFactor = 1.2, MinPairs = 3 };
        var v = MergeVerdict.Decide(pairs, relaxed);
        Assert.True(v.Pass);
        Assert.Same(relaxed, v.Thresholds);
        // A higher ratio cut-off leaves no pair at or above it.
        Assert.False(MergeVerdict.Decide(pairs, relaxed with { HighRatio = 100 }).Pass);
    }

    [Fact]
    public void Decide_DegeneratePairs_LeftOutOfWeightCriterion()
    {
        var pairs = Case(0.95, 4);
        for (int i = 0; i < 3; i++)
            pairs.Add(new PairFit(new MergePair($"d{i}", $"e{i}", 5000, 100, 200 + 2 * i, 201 + 2 * i, 0),
                new MixtureFitResult(double.NaN, double.NaN, 0.95, 0.3, true, "parallel")));
        var v = MergeVerdict.Decide(pairs);
        Assert.True(v.Pass);
        Assert.Equal(6, v.PairsHighRatio);
        Assert.Equal(15, v.PairsWithCosine);
    }

    [Fact]
    public void Decide_BadThreshold_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => MergeVerdict.Decide([], new VerdictThresholds { MinExcessFactor = 0 }));
    }
}
