using MathNet.Numerics.Distributions;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class WeightLawsTests
{
    private static readonly RatioBins Bins = new(8, 1000);

    // Standard error of an interval's estimate, recovered from its analytic t-interval half-width.
    private static double StandardError(LawParameter p, int dof) => (p.AnalyticUpper - p.AnalyticLower) / 2 / StudentT.InvCDF(0, 1, dof, 0.975);

    [Fact]
    public void Fit_LogarithmicModelVectors_RecoversWeightsAndC()
    {
        // Known linear model: v = α v1 + β v2 + ε, β/α = 1 − c·log10 r with c = 0.3 (β/α stays ≥ 0.1 up to r = 1000).
        const double c = 0.3, noise = 0.004;
        int dims = 100;
        var data = MergeTestData.LinearModel(seed: 17, pairs: 240, dims, noise, maxRatio: 1000, r => 1 - c * Math.Log10(r));
        var fits = MergeTestData.Fits(data);

        for (int i = 0; i < data.Count; i++)
        {
            // OLS covariance σ²(XᵀX)⁻¹ (Gauss–Markov, any regression textbook) for X = [v1 v2]: per-pair standard errors.
            var (_, _, v1, v2, alpha, beta) = data[i];
            double g11 = v1.Sum(x => (double)x * x), g22 = v2.Sum(x => (double)x * x), g12 = v1.Zip(v2, (x, y) => (double)x * y).Sum();
            double det = g11 * g22 - g12 * g12;
            double seAlpha = noise * Math.Sqrt(g22 / det), seBeta = noise * Math.Sqrt(g11 / det);
            // 5 standard errors: a Gaussian exceeds it with probability 6e-7, so 480 checks almost surely pass when correct.
            Assert.True(Math.Abs(fits[i].Fit.Alpha - alpha) < 5 * seAlpha, $"pair {i}: α {fits[i].Fit.Alpha} vs {alpha}");
            Assert.True(Math.Abs(fits[i].Fit.Beta - beta) < 5 * seBeta, $"pair {i}: β {fits[i].Fit.Beta} vs {beta}");
        }

        var laws = WeightLaws.Fit(fits, Bins, new WeightLawSettings { Resamples = 500, Seed = 3 });
        Assert.Equal(240, laws.PairsUsed);
        double se = StandardError(laws.C, laws.PairsUsed - 1);
        // Resolution check: the data must separate c = 0.3 from the preprint's 0.5 by far, or the recovery proves little.
        Assert.True(se < 0.01, $"standard error of c {se}");
        // Unbiased OLS estimate: within 4 standard errors of the truth (probability 6e-5 of a false alarm).
        Assert.True(Math.Abs(laws.C.Estimate - c) < 4 * se, $"c = {laws.C.Estimate} (se {se})");
        Assert.InRange(c, laws.C.Lower, laws.C.Upper); // the 95% bootstrap interval covers the truth (seed fixed)
        Assert.Equal(WeightLaw.Logarithmic, laws.BetterLaw);
        Assert.True(laws.MedianCosineToSpan > 0.99); // ||ε|| ≈ 0.04 against ||v|| ≳ 0.5
    }

    [Fact]
    public void Fit_PreprintSetting_RecoversCOfHalfUpToRatio100()
    {
        // The setting reported for merged pseudo-words in the 2016 preprint of Arora, Li, Liang, Ma & Risteski
        // (c ≈ 0.5 for r up to about 100; from memory), generated here from the model and fitted back.
        const double c = 0.5;
        var data = MergeTestData.LinearModel(seed: 5, pairs: 160, dims: 80, noise: 0.004, maxRatio: 100, r => 1 - c * Math.Log10(r));
        var laws = WeightLaws.Fit(MergeTestData.Fits(data), new RatioBins(6, 100), new WeightLawSettings { Resamples = 300 });
        double se = StandardError(laws.C, laws.PairsUsed - 1);
        Assert.True(Math.Abs(laws.C.Estimate - c) < 4 * se, $"c = {laws.C.Estimate} (se {se})");
        Assert.Equal(WeightLaw.Logarithmic, laws.BetterLaw);
    }

    [Fact]
    public void Fit_PowerModelVectors_RecoversGammaAndPicksPower()
    {
        // β/α = A·r^(−γ) with A = 0.8, γ = 0.6; small noise so that β/α stays positive (≥ 0.013 at r = 1000).
        const double a = 0.8, gamma = 0.6, noise = 0.0008;
        var data = MergeTestData.LinearModel(seed: 23, pairs: 240, dims: 100, noise, maxRatio: 1000, r => a * Math.Pow(r, -gamma));
        var laws = WeightLaws.Fit(MergeTestData.Fits(data), Bins, new WeightLawSettings { Resamples = 500 });
        Assert.Equal(0, laws.PowerExcluded);
        double se = StandardError(laws.Gamma, laws.PairsUsed - 2);
        Assert.True(se < 0.01, $"standard error of γ {se}");
        // Fitting log10(β/α) adds a small downward bias (E log(q + e) < log q, about σ²/(2q²) in ln units, under 1%
        // here), well inside 4 standard errors.
        Assert.True(Math.Abs(laws.Gamma.Estimate - gamma) < 4 * se, $"γ = {laws.Gamma.Estimate} (se {se})");
        Assert.InRange(laws.PowerScale, a * 0.95, a * 1.05);
        Assert.InRange(gamma, laws.Gamma.Lower, laws.Gamma.Upper);
        Assert.Equal(WeightLaw.Power, laws.BetterLaw);
    }

    [Fact]
    public void Fit_ProportionalModelVectors_PicksProportionalDespiteNestedPowerLaw()
    {
        // β/α = 1/r is the power law at A = 1, γ = 1; the BIC (Schwarz 1978) charges the power law its two parameters,
        // so the parameter-free law must win on data it generated.
        var data = MergeTestData.LinearModel(seed: 31, pairs: 240, dims: 100, noise: 0.002, maxRatio: 1000, r => 1 / r);
        var laws = WeightLaws.Fit(MergeTestData.Fits(data), Bins, new WeightLawSettings { Resamples = 200 });
        Assert.Equal(WeightLaw.Proportional, laws.BetterLaw);
        Assert.InRange(laws.Gamma.Estimate, 0.9, 1.1);
        Assert.InRange(laws.MedianExcessFactor, 0.8, 1.25);
    }

    [Fact]
    public void Fit_BootstrapIntervals_HaveNominalCoverage()
    {
        // Percentile pairs-bootstrap intervals (Efron & Tibshirani 1993, "An Introduction to the Bootstrap", ch. 13)
        // and the analytic t-interval should each cover the true c in about 95% of repeated data sets. 200 data sets:
        // the binomial standard deviation of the observed share is 1.5%, so [0.89, 0.995] is about ±4 of them.
        var rng = new Random(12);
        int coveredBootstrap = 0, coveredAnalytic = 0, sets = 200;
        const double c = 0.4;
        for (int s = 0; s < sets; s++)
        {
            var pairs = new List<PairFit>();
            for (int i = 0; i < 60; i++)
            {
                var p = MergeTestData.Constructed(i, Math.Pow(10, 3 * rng.NextDouble()), 0, 1);
                double q = 1 - c * Math.Log10(p.Ratio) + 0.05 * MergeTestData.Gaussian(rng);
                pairs.Add(p with { Fit = p.Fit with { Beta = q } });
            }
            var laws = WeightLaws.Fit(pairs, Bins, new WeightLawSettings { Resamples = 300, Seed = s });
            if (laws.C.Lower <= c && c <= laws.C.Upper) coveredBootstrap++;
            if (laws.C.AnalyticLower <= c && c <= laws.C.AnalyticUpper) coveredAnalytic++;
        }
        Assert.InRange(coveredBootstrap / (double)sets, 0.89, 0.995);
        Assert.InRange(coveredAnalytic / (double)sets, 0.89, 0.995);
    }

    [Fact]
    public void Fit_ExactProportionalPairs_ZeroErrorInEveryBinAndCountsAddUp()
    {
        var rng = new Random(2);
        var pairs = new List<PairFit>();
        for (int i = 0; i < 50; i++)
        {
            var p = MergeTestData.Constructed(i, Math.Pow(10, 3 * rng.NextDouble()), 0, 0.95);
            pairs.Add(p with { Fit = p.Fit with { Beta = 1 / p.Ratio } });
        }
        var laws = WeightLaws.Fit(pairs, Bins, new WeightLawSettings { Resamples = 50 });
        Assert.Equal(50, laws.Bins.Sum(b => b.Pairs));
        foreach (var bin in laws.Bins.Where(b => b.Pairs > 0)) Assert.True(bin.Rmse.Proportional < 1e-12);
        Assert.Equal(0, laws.OverallRmse.Proportional, 12);
        Assert.Equal(WeightLaw.Proportional, laws.BetterLaw);
        Assert.Equal(1, laws.MedianExcessFactor, 9);
        Assert.Equal(0, laws.ShareWellAbove);
        Assert.Equal(0.95, laws.MedianCosineToSpan, 12);
    }

    [Fact]
    public void Fit_NonPositiveWeightRatios_ExcludedFromPowerFitAndCounted()
    {
        var pairs = new List<PairFit>();
        for (int i = 0; i < 20; i++) pairs.Add(MergeTestData.Constructed(i, 2 + i * 10, i % 5 == 0 ? -0.05 : 1.0 / (1 + i), 0.9));
        pairs.Add(new PairFit(new MergePair("x", "y", 10, 5, 100, 101, 0), new MixtureFitResult(double.NaN, double.NaN, 0.5, 0.86, true, "parallel")));
        var laws = WeightLaws.Fit(pairs, Bins, new WeightLawSettings { Resamples = 50 });
        Assert.Equal(20, laws.PairsUsed);
        Assert.Equal(1, laws.PairsWithoutWeights);
        Assert.Equal(4, laws.PowerExcluded);
        Assert.Equal(0.9, laws.MedianCosineToSpan, 12); // 20 at 0.9 and one degenerate at 0.5
    }

    [Fact]
    public void Fit_SameSeed_SameIntervals()
    {
        var data = MergeTestData.LinearModel(seed: 1, pairs: 40, dims: 20, noise: 0.01, maxRatio: 1000, r => 1 - 0.2 * Math.Log10(r));
        var fits = MergeTestData.Fits(data);
        var a = WeightLaws.Fit(fits, Bins, new WeightLawSettings { Resamples = 100, Seed = 4 });
        var b = WeightLaws.Fit(fits, Bins, new WeightLawSettings { Resamples = 100, Seed = 4 });
        var c = WeightLaws.Fit(fits, Bins, new WeightLawSettings { Resamples = 100, Seed = 5 });
        Assert.Equal(a.C, b.C);
        Assert.Equal(a.Gamma, b.Gamma);
        Assert.NotEqual(a.C.Lower, c.C.Lower);
    }

    [Fact]
    public void Fit_ShareWellAboveAndMedianExcess_CountConstructedPairs()
    {
        // r = 10 for all; β/α = 0.1 (factor 1), 0.2 (2), 0.5 (5), 0.8 (8): two of four exceed 3/r.
        var pairs = new[] { 0.1, 0.2, 0.5, 0.8 }.Select((q, i) => MergeTestData.Constructed(i, 10, q, 0.9)).ToList();
        var laws = WeightLaws.Fit(pairs, Bins, new WeightLawSettings { Resamples = 20 });
        Assert.Equal(0.5, laws.ShareWellAbove, 12);
        Assert.Equal(3.5, laws.MedianExcessFactor, 9);
        var (median, count) = WeightLaws.MedianExcess(pairs, 10);
        Assert.Equal(4, count);
        Assert.Equal(3.5, median, 9);
        Assert.Equal(0, WeightLaws.MedianExcess(pairs, 11).pairs);
    }

    [Fact]
    public void Quantile_MatchesRDefaultType7()
    {
        // R's quantile() default (type 7, Hyndman & Fan 1996): quantile(1:10, c(.1, .25, .5)) = 1.9, 3.25, 5.5.
        double[] x = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10];
        Assert.Equal(1.9, WeightLaws.Quantile(x, 0.1), 12);
        Assert.Equal(3.25, WeightLaws.Quantile(x, 0.25), 12);
        Assert.Equal(5.5, WeightLaws.Quantile(x, 0.5), 12);
        Assert.Equal(5.5, WeightLaws.Median(x.Reverse()), 12);
        Assert.True(double.IsNaN(WeightLaws.Median([])));
    }

    [Fact]
    public void Fit_RatioBelowOne_Throws()
    {
        var bad = MergeTestData.Constructed(0, 1, 1, 1);
        bad = bad with { Pair = bad.Pair with { FrequentCount = 5, RareCount = 10 } };
        Assert.Throws<ArgumentException>(() => WeightLaws.Fit([bad], Bins));
    }
}
