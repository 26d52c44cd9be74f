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

    // The retrain figures on whole GCIDE (300 dimensions, 200 pairs, function words skipped; docs/methods-merge-test.md
    // §6): pseudo-words at a median cosine to span of 0.873 while untouched words came back at 0.885.

    [Fact]
    public void Decide_WithNoiseFloor_JudgesCosineRelativeToIt()
    {
        var pairs = Case(0.873, 4);
        // Absolute rule (fold-in): 0.873 is below 0.9.
        var absolute = MergeVerdict.Decide(pairs);
        Assert.False(absolute.Pass);
        Assert.False(absolute.RelativeToFloor);
        Assert.Equal(0.9, absolute.RequiredCosine);
        Assert.True(double.IsNaN(absolute.NoiseFloor));
        // Relative rule: 0.873 ≥ 0.95 × 0.885 = 0.84075, so the cosine criterion holds.
        var relative = MergeVerdict.Decide(pairs, null, 0.885);
        Assert.True(relative.Pass, string.Join("; ", relative.Reasons));
        Assert.True(relative.RelativeToFloor);
        Assert.Equal(0.885, relative.NoiseFloor);
        Assert.Equal(0.95 * 0.885, relative.RequiredCosine, 12);
    }

    [Fact]
    public void Decide_CosineWellBelowNoiseFloor_FailsNamingFloor()
    {
        // Untouched words come back at 0.98 but pseudo-words lie at only 0.873 from their span: below 0.95 × 0.98 = 0.931.
        var v = MergeVerdict.Decide(Case(0.873, 4), null, 0.98);
        Assert.False(v.Pass);
        var reason = Assert.Single(v.Reasons);
        Assert.Contains("0.95 × the noise floor 0.980 = 0.931", reason);
        // The factor is a threshold like the others: 0.89 × 0.98 = 0.872 lets it pass.
        Assert.True(MergeVerdict.Decide(Case(0.873, 4), new VerdictThresholds { FloorFactor = 0.89 }, 0.98).Pass);
    }

    [Fact]
    public void Decide_NoiseFloorTooLow_FailsForLackOfEvidence()
    {
        // Untouched words keep only 0.3 of their direction: 0.95 × 0.3 would pass almost anything, so it must fail.
        var v = MergeVerdict.Decide(Case(0.873, 4), null, 0.3);
        Assert.False(v.Pass);
        Assert.Contains("too unstable", Assert.Single(v.Reasons));
        Assert.True(MergeVerdict.Decide(Case(0.873, 4), new VerdictThresholds { MinNoiseFloor = 0.25 }, 0.3).Pass);
    }

    [Fact]
    public void Decide_WithNoiseFloor_WeightCriterionUnchanged()
    {
        var v = MergeVerdict.Decide(Case(0.873, 1), null, 0.885);
        Assert.False(v.Pass);
        Assert.Contains("(beta/alpha)/(1/r)", Assert.Single(v.Reasons));
    }

    [Fact]
    public void Decide_BadThreshold_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => MergeVerdict.Decide([], new VerdictThresholds { MinExcessFactor = 0 }));
        Assert.Throws<ArgumentOutOfRangeException>(() => MergeVerdict.Decide([], new VerdictThresholds { FloorFactor = 0 }));
        Assert.Throws<ArgumentOutOfRangeException>(() => MergeVerdict.Decide([], new VerdictThresholds { MinNoiseFloor = 2 }));
        Assert.Throws<ArgumentOutOfRangeException>(() => MergeVerdict.Decide([], null, 1.5));
    }
}
