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

    /// <summary>
    /// When the merged vectors come from a second embedding (a re-embedding of the merged corpus, rotated back by
    /// Procrustes), the cosine criterion is relative: pass needs the median cosine to span at least this factor times
    /// the noise floor, the median cosine of the untouched words to their own old vectors after the same rotation.
    /// Our choice: 0.95. Retraining moves every word, merged or not; if the embedding represents a merged word as a
    /// weighted sum, the pseudo-words come back about as close to their span as the untouched words come back to
    /// themselves (on whole GCIDE, 0.873 against 0.885, and within 0.03 of untouched words of the same count band,
    /// docs/methods-merge-test.md §6), so the factor tolerates that spread
    /// and no more.
    /// </summary>
    public double FloorFactor { get; init; } = 0.95;

    /// <summary>
    /// Least noise floor at which the relative criterion is trusted (our choice: 0.5). Below it untouched words keep
    /// less than half their direction through retraining, and a pseudo-word's cosine to span says nothing about the
    /// merge; the test then fails for lack of evidence.
    /// </summary>
    public double MinNoiseFloor { get; init; } = 0.5;
}

/// <summary>The outcome of the merge test with the numbers it rests on and the reasons for a fail.</summary>
/// <remarks><see cref="NoiseFloor"/> is NaN when the merged vectors were not re-embedded (fold-in); then
/// <see cref="RequiredCosine"/> is the absolute threshold, else <see cref="VerdictThresholds.FloorFactor"/> × floor.</remarks>
public sealed record MergeVerdictResult(
    bool Pass, double MedianCosineToSpan, int PairsWithCosine,
    double MedianExcessHighRatio, int PairsHighRatio,
    IReadOnlyList<string> Reasons, VerdictThresholds Thresholds)
{
    public string Label => Pass ? "pass" : "fail";

    /// <summary>Median cosine of untouched words to their old vectors after alignment (NaN without a re-embedding).</summary>
    public double NoiseFloor { get; init; } = double.NaN;

    /// <summary>The least median cosine to span that passes: absolute, or relative to <see cref="NoiseFloor"/>.</summary>
    public double RequiredCosine { get; init; } = double.NaN;

    /// <summary>True when the cosine criterion was judged against the noise floor.</summary>
    public bool RelativeToFloor => double.IsFinite(NoiseFloor);
}

/// <summary>
/// Pass when (1) the median cosine of merged vectors to span(v1, v2) is at least the threshold and (2) over pairs with
/// r ≥ 10, the median of (β/α)/(1/r) is at least the factor; each median needs a minimum number of pairs, else the
/// test fails for lack of evidence. With a noise floor (re-embedded vectors), (1) becomes: median cosine to span ≥
/// FloorFactor × floor, and a floor below MinNoiseFloor fails for lack of evidence. The verdict judges the embedding
/// against these thresholds only; it does not prefer either published law.
/// </summary>
public static class MergeVerdict
{
    /// <param name="pairs">Fitted pairs.</param>
    /// <param name="thresholds">Thresholds (defaults when null).</param>
    /// <param name="noiseFloor">Median cosine of the untouched words to their old vectors after aligning a
    /// re-embedding; NaN (the default) when the merged vectors were folded into the original embedding.</param>
    public static MergeVerdictResult Decide(IReadOnlyList<PairFit> pairs, VerdictThresholds? thresholds = null, double noiseFloor = double.NaN)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        var t = thresholds ?? new VerdictThresholds();
        if (!double.IsNaN(noiseFloor) && !(noiseFloor >= -1 && noiseFloor <= 1)) throw new ArgumentOutOfRangeException(nameof(noiseFloor), noiseFloor, $"noise floor ({noiseFloor}) must be a cosine in [-1, 1] or NaN");
        if (!(t.FloorFactor > 0) || !double.IsFinite(t.FloorFactor)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.FloorFactor, $"floor factor ({t.FloorFactor}) must be positive");
        if (!(t.MinNoiseFloor >= -1 && t.MinNoiseFloor <= 1)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.MinNoiseFloor, $"least noise floor ({t.MinNoiseFloor}) must lie in [-1, 1]");
        if (!(t.MinMedianCosine >= -1 && t.MinMedianCosine <= 1)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.MinMedianCosine, $"cosine threshold ({t.MinMedianCosine}) must lie in [-1, 1]");
        if (!(t.HighRatio >= 1) || !double.IsFinite(t.HighRatio)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.HighRatio, $"high ratio ({t.HighRatio}) must be finite and at least 1");
        if (!(t.MinExcessFactor > 0) || !double.IsFinite(t.MinExcessFactor)) throw new ArgumentOutOfRangeException(nameof(thresholds), t.MinExcessFactor, $"excess factor ({t.MinExcessFactor}) must be positive");
        Guard.Positive(t.MinPairs);

        var inv = System.Globalization.CultureInfo.InvariantCulture;
        var cosines = pairs.Select(p => p.Fit.CosineToSpan).Where(double.IsFinite).ToArray();
        double medianCos = WeightLaws.Median(cosines);
        var (medianExcess, highPairs) = WeightLaws.MedianExcess(pairs, t.HighRatio);

        bool relative = !double.IsNaN(noiseFloor);
        double required = relative ? t.FloorFactor * noiseFloor : t.MinMedianCosine;
        var reasons = new List<string>();
        if (cosines.Length < t.MinPairs)
            reasons.Add($"only {cosines.Length} pairs have a cosine to span (need {t.MinPairs})");
        else if (relative && !(noiseFloor >= t.MinNoiseFloor))
            reasons.Add($"untouched words come back with a median cosine of only {noiseFloor.ToString("F3", inv)} to their old vectors (need {t.MinNoiseFloor.ToString("G", inv)}): the re-embedding is too unstable to judge the cosine to span");
        else if (!(medianCos >= required))
            reasons.Add(relative
                ? $"median cosine to span {medianCos.ToString("F3", inv)} is below {t.FloorFactor.ToString("G", inv)} × the noise floor {noiseFloor.ToString("F3", inv)} = {required.ToString("F3", inv)}"
                : $"median cosine to span {medianCos.ToString("F3", inv)} is below {t.MinMedianCosine.ToString("G", inv)}");
        if (highPairs < t.MinPairs)
            reasons.Add($"only {highPairs} pairs with r >= {t.HighRatio.ToString("G", inv)} have weights (need {t.MinPairs})");
        else if (!(medianExcess >= t.MinExcessFactor))
            reasons.Add($"median (beta/alpha)/(1/r) for r >= {t.HighRatio.ToString("G", inv)} is {medianExcess.ToString("G3", inv)}, below {t.MinExcessFactor.ToString("G", inv)}");

        return new MergeVerdictResult(reasons.Count == 0, medianCos, cosines.Length, medianExcess, highPairs, reasons, t)
        {
            NoiseFloor = relative ? noiseFloor : double.NaN, RequiredCosine = required,
        };
    }
}
