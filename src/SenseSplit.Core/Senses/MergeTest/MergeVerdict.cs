namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>Thresholds of <see cref="MergeVerdict.Decide"/>; every one can be overridden.</summary>
public sealed record VerdictThresholds
{
    /// <summary>
    /// Least median cosine between a merged vector and span(v1, v2). Our choice: 0.9, i.e. a typical merged vector
    /// leaves at most sin(arccos 0.9) ≈ 44% of its norm outside the plane of its two words. The earlier 2016 preprint
    /// of Arora, Li, Liang, Ma &amp; Risteski reported a mean of about 0.97 on a large corpus; 0.9 leaves room for the
    /// smaller corpora and noisier vectors of a typical user.
    /// </summary>
    public double MinMedianCosine { get; init; } = 0.9;

    /// <summary>Pairs at or above this ratio enter the weight criterion (our choice: 10, where 1/r and a weight
    /// that keeps the rarer word visible differ clearly).</summary>
    public double HighRatio { get; init; } = 10;

    /// <summary>
    /// Least median of (β/α)/(1/r) over pairs with r ≥ <see cref="HighRatio"/>. Our choice: 2, the rarer word keeps
    /// at least twice its frequency share; a weight no larger than its share (factor ≈ 1) would bury a rare sense
    /// under a frequent one, which sparse coding of the vector then cannot recover.
    /// </summary>
    public double MinExcessFactor { get; init; } = 2;

    /// <summary>Fewest pairs each median needs before it is trusted (our choice: 5).</summary>
    public int MinPairs { get; init; } = 5;
}

/// <summary>The outcome of the merge test with the numbers it rests on and the reasons for a fail.</summary>
public sealed record MergeVerdictResult(
    bool Pass, double MedianCosineToSpan, int PairsWithCosine,
    double MedianExcessHighRatio, int PairsHighRatio,
    IReadOnlyList<string> Reasons, VerdictThresholds Thresholds)
{
    public string Label => Pass ? "pass" : "fail";
}

/// <summary>
/// Pass when (1) the median cosine of merged vectors to span(v1, v2) is at least the threshold and (2) over pairs with
/// r ≥ 10, the median of (β/α)/(1/r) is at least the factor; each median needs a minimum number of pairs, else the
/// test fails for lack of evidence. The verdict judges the embedding against these thresholds only; it does not
/// prefer either published law.
/// </summary>
public static class MergeVerdict
{
    public static MergeVerdictResult Decide(IReadOnlyList<PairFit> pairs, VerdictThresholds? thresholds = null)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        var t = thresholds ?? new VerdictThresholds();
        if (!(t.MinMedianCosine >= -1 && t.MinMedianCosine <= 1)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.MinMedianCosine, $"cosine threshold ({t.MinMedianCosine}) must lie in [-1, 1]");
        if (!(t.HighRatio >= 1) || !double.IsFinite(t.HighRatio)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.HighRatio, $"high ratio ({t.HighRatio}) must be finite and at least 1");
        if (!(t.MinExcessFactor > 0) || !double.IsFinite(t.MinExcessFactor)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.MinExcessFactor, $"excess factor ({t.MinExcessFactor}) must be positive");
        Guard.Positive(t.MinPairs);

        var inv = System.Globalization.CultureInfo.InvariantCulture;
        var cosines = pairs.Select(p => p.Fit.CosineToSpan).Where(double.IsFinite).ToArray();
        double medianCos = WeightLaws.Median(cosines);
        var (medianExcess, highPairs) = WeightLaws.MedianExcess(pairs, t.HighRatio);

        var reasons = new List<string>();
        if (cosines.Length < t.MinPairs)
            reasons.Add($"only {cosines.Length} pairs have a cosine to span (need {t.MinPairs})");
        else if (!(medianCos >= t.MinMedianCosine))
            reasons.Add($"median cosine to span {medianCos.ToString("F3", inv)} is below {t.MinMedianCosine.ToString("G", inv)}");
        if (highPairs < t.MinPairs)
            reasons.Add($"only {highPairs} pairs with r >= {t.HighRatio.ToString("G", inv)} have weights (need {t.MinPairs})");
        else if (!(medianExcess >= t.MinExcessFactor))
            reasons.Add($"median (beta/alpha)/(1/r) for r >= {t.HighRatio.ToString("G", inv)} is {medianExcess.ToString("G3", inv)}, below {t.MinExcessFactor.ToString("G", inv)}");

        return new MergeVerdictResult(reasons.Count == 0, medianCos, cosines.Length, medianExcess, highPairs, reasons, t);
    }
}
