using MathNet.Numerics.Distributions;

namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>One merged pair with its fitted weights.</summary>
public sealed record PairFit(MergePair Pair, MixtureFitResult Fit)
{
    public double Ratio => Pair.Ratio;
    public double WeightRatio => Fit.WeightRatio;
    /// <summary>True when the fit gives a finite β/α (not degenerate, α ≠ 0).</summary>
    public bool HasWeightRatio => double.IsFinite(Fit.WeightRatio);
}

/// <summary>The candidate laws for β/α as a function of r = f1/f2.</summary>
public enum WeightLaw
{
    /// <summary>β/α = 1/r: weights in proportion to frequency; no free parameter.</summary>
    Proportional,
    /// <summary>β/α = 1 − c·log10 r.</summary>
    Logarithmic,
    /// <summary>β/α = A·r^(−γ).</summary>
    Power,
}

/// <summary>A fitted law parameter with its percentile pairs-bootstrap interval and, for comparison, the analytic
/// ordinary-least-squares (Student t) interval. NaN where too few pairs allow a fit.</summary>
public sealed record LawParameter(double Estimate, double Lower, double Upper, double AnalyticLower, double AnalyticUpper, int ResamplesUsed);

/// <summary>One number per law: an RMSE of β/α or a BIC (NaN where the law could not be fitted or no pair is present).</summary>
public sealed record LawValues(double Proportional, double Logarithmic, double Power)
{
    public double Of(WeightLaw law) => law switch
    {
        WeightLaw.Proportional => Proportional,
        WeightLaw.Logarithmic => Logarithmic,
        _ => Power,
    };
}

/// <summary>One ratio bin: its edges, how many usable pairs fell in it, their medians, and each law's RMSE there.</summary>
public sealed record BinSummary(int Bin, double LowerRatio, double UpperRatio, int Pairs, double MedianRatio, double MedianWeightRatio, LawValues Rmse);

/// <summary>Settings of <see cref="WeightLaws.Fit"/>.</summary>
public sealed record WeightLawSettings
{
    /// <summary>Pairs-bootstrap resamples for the intervals of c and γ (1,000 is common practice for percentile intervals).</summary>
    public int Resamples { get; init; } = 1000;
    public int Seed { get; init; } = 1;
    /// <summary>Two-sided confidence level of the intervals.</summary>
    public double Confidence { get; init; } = 0.95;
    /// <summary>A pair's rarer word "keeps a weight well above its frequency share" when β/α &gt; factor/r (our choice: 3).</summary>
    public double WellAboveFactor { get; init; } = 3;
}

/// <summary>What the merged pairs say about β/α against r.</summary>
/// <param name="PairsUsed">Pairs with a finite β/α (all law fits use these).</param>
/// <param name="PairsWithoutWeights">Degenerate pairs (parallel or zero vectors) or α = 0.</param>
/// <param name="C">c of β/α = 1 − c·log10 r.</param>
/// <param name="PowerScale">A of β/α = A·r^(−γ).</param>
/// <param name="Gamma">γ of β/α = A·r^(−γ).</param>
/// <param name="PowerExcluded">Pairs left out of the power-law fit because β/α ≤ 0.</param>
/// <param name="OverallRmse">Each law's RMSE of β/α over all usable pairs.</param>
/// <param name="Bic">Each law's Bayesian information criterion n·ln(RSS/n) + k·ln n (k = 0, 1, 2 free parameters).</param>
/// <param name="BetterLaw">The law with the smallest <paramref name="Bic"/>; null when none could be evaluated.</param>
/// <param name="MedianCosineToSpan">Median over all pairs with a defined cosine to span(v1, v2).</param>
/// <param name="MedianExcessFactor">Median of (β/α)/(1/r) = r·β/α.</param>
/// <param name="ShareWellAbove">Share of usable pairs with β/α &gt; WellAboveFactor/r.</param>
public sealed record WeightLawsResult(
    int PairsUsed, int PairsWithoutWeights,
    LawParameter C, double PowerScale, LawParameter Gamma, int PowerExcluded,
    LawValues OverallRmse, LawValues Bic, WeightLaw? BetterLaw, IReadOnlyList<BinSummary> Bins,
    double MedianCosineToSpan, double MedianExcessFactor, double ShareWellAbove,
    WeightLawSettings Settings);

/// <summary>
/// Fits β/α against r = f1/f2 under three laws and compares them:
/// (a) proportional β/α = 1/r (no free parameter);
/// (b) logarithmic β/α = 1 − c·x, x = log10 r, with c = Σ x(1 − q) / Σ x² minimising Σ (q − 1 + c x)² over pairs;
/// (c) power β/α = A·r^(−γ), fitted by ordinary least squares of log10 q = log10 A − γ x over pairs with q &gt; 0.
/// Errors are RMSE of β/α itself (not of its logarithm), per ratio bin and overall; the better law is the one of
/// smallest BIC on the same squared errors, so that the two-parameter power law (which contains the proportional law
/// at A = 1, γ = 1) must earn its extra parameters.
/// </summary>
/// <remarks>
/// The logarithmic form is the one an earlier preprint of Arora, Li, Liang, Ma &amp; Risteski, "Linear Algebraic
/// Structure of Word Senses, with Applications to Polysemy" (arXiv 1601.03764, 2016) reported for merged pseudo-words
/// (c about 0.5 for r up to about 100, as we recall it; from memory); the journal version (TACL 6, 2018) states a
/// frequency-weighted form instead. Neither is imposed here: all three are fitted and scored on the same pairs.
/// Errors are taken on β/α and not on log10(β/α) because the logarithmic law predicts β/α ≤ 0 once c·log10 r ≥ 1
/// and measured β/α can be ≤ 0; a log-space error would have to drop exactly the pairs that separate the laws.
/// Intervals are percentile intervals of the pairs bootstrap (Efron &amp; Tibshirani 1993, "An Introduction to the
/// Bootstrap", ch. 9 and 13), which does not assume equal error variance across r; the analytic OLS t-interval is
/// given beside it. The BIC is that of Schwarz 1978, "Estimating the dimension of a model", Annals of Statistics 6(2),
/// for Gaussian errors: n·ln(RSS/n) + k·ln n. Quantiles interpolate linearly (Hyndman &amp; Fan 1996, definition 7).
/// </remarks>
public static class WeightLaws
{
    public static string Name(WeightLaw law) => law switch
    {
        WeightLaw.Proportional => "proportional",
        WeightLaw.Logarithmic => "logarithmic",
        _ => "power",
    };

    public static double Predict(WeightLaw law, double ratio, double c, double powerScale, double gamma) => law switch
    {
        WeightLaw.Proportional => 1 / ratio,
        WeightLaw.Logarithmic => 1 - c * Math.Log10(ratio),
        _ => powerScale * Math.Pow(ratio, -gamma),
    };

    public static WeightLawsResult Fit(IReadOnlyList<PairFit> pairs, RatioBins bins, WeightLawSettings? settings = null)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(bins);
        settings ??= new WeightLawSettings();
        Guard.Positive(settings.Resamples);
        if (!(settings.Confidence > 0 && settings.Confidence < 1))
            throw new ArgumentOutOfRangeException(nameof(settings), settings.Confidence, $"confidence ({settings.Confidence}) must lie in (0, 1)");
        if (!(settings.WellAboveFactor > 0) || !double.IsFinite(settings.WellAboveFactor))
            throw new ArgumentOutOfRangeException(nameof(settings), settings.WellAboveFactor, $"well-above factor ({settings.WellAboveFactor}) must be positive");
        for (int i = 0; i < pairs.Count; i++)
        {
            double r = pairs[i].Ratio;
            if (!(r >= 1) || !double.IsFinite(r)) throw new ArgumentException($"pair {i} ({pairs[i].Pair.FrequentWord}, {pairs[i].Pair.RareWord}): ratio {r} must be finite and at least 1", nameof(pairs));
        }

        var used = pairs.Where(p => p.HasWeightRatio).ToArray();
        int n = used.Length;
        var x = used.Select(p => Math.Log10(p.Ratio)).ToArray();
        var q = used.Select(p => p.WeightRatio).ToArray();

        double c = FitLogarithmic(x, q, null, out _);
        var (logA, gamma, powerCount) = FitPower(x, q, null);
        double powerScale = Math.Pow(10, logA);

        var (cLo, cHi, gLo, gHi, cUsed, gUsed) = Bootstrap(x, q, settings);
        var (cAnLo, cAnHi) = AnalyticLogarithmic(x, q, c, settings.Confidence);
        var (gAnLo, gAnHi) = AnalyticPower(x, q, logA, gamma, settings.Confidence);

        var binSummaries = new List<BinSummary>(bins.Count);
        for (int b = 0; b < bins.Count; b++)
        {
            var members = Enumerable.Range(0, n).Where(i => bins.Of(used[i].Ratio) == b).ToArray();
            var errors = new double[3];
            for (int law = 0; law < 3; law++) errors[law] = Math.Sqrt(Mse((WeightLaw)law, members, used, q, c, powerScale, gamma));
            binSummaries.Add(new BinSummary(b, bins.Lower(b), bins.Upper(b), members.Length,
                Median(members.Select(i => used[i].Ratio)), Median(members.Select(i => q[i])),
                new LawValues(errors[0], errors[1], errors[2])));
        }
        var all = Enumerable.Range(0, n).ToArray();
        var rmse = new double[3];
        var bic = new double[3];
        int[] freeParameters = [0, 1, 2];
        for (int law = 0; law < 3; law++)
        {
            double mse = Mse((WeightLaw)law, all, used, q, c, powerScale, gamma);
            rmse[law] = Math.Sqrt(mse);
            // n·ln(RSS/n) = n·ln(MSE); an exact fit gives −∞, and equal −∞ keeps the simpler law below.
            bic[law] = double.IsFinite(mse) ? n * Math.Log(mse) + freeParameters[law] * Math.Log(n) : double.NaN;
        }
        var overallErrors = new LawValues(rmse[0], rmse[1], rmse[2]);
        var bicValues = new LawValues(bic[0], bic[1], bic[2]);

        // Smallest BIC wins; on a tie the law with fewer free parameters (enum order) is kept.
        WeightLaw? better = null;
        foreach (var law in new[] { WeightLaw.Proportional, WeightLaw.Logarithmic, WeightLaw.Power })
        {
            double e = bicValues.Of(law);
            if (!double.IsNaN(e) && (better is null || e < bicValues.Of(better.Value))) better = law;
        }

        double medianCos = Median(pairs.Select(p => p.Fit.CosineToSpan).Where(double.IsFinite));
        double medianExcess = Median(used.Select(p => p.WeightRatio * p.Ratio));
        double shareAbove = n == 0 ? double.NaN : (double)used.Count(p => p.WeightRatio > settings.WellAboveFactor / p.Ratio) / n;

        return new WeightLawsResult(n, pairs.Count - n,
            new LawParameter(c, cLo, cHi, cAnLo, cAnHi, cUsed), powerScale,
            new LawParameter(gamma, gLo, gHi, gAnLo, gAnHi, gUsed), n - powerCount,
            overallErrors, bicValues, better, binSummaries, medianCos, medianExcess, shareAbove, settings);
    }

    /// <summary>Median of r·β/α over usable pairs with r ≥ <paramref name="minRatio"/> and how many there are.</summary>
    public static (double median, int pairs) MedianExcess(IReadOnlyList<PairFit> pairs, double minRatio)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        var values = pairs.Where(p => p.HasWeightRatio && p.Ratio >= minRatio).Select(p => p.WeightRatio * p.Ratio).ToArray();
        return (Median(values), values.Length);
    }

    /// <summary>Median (mean of the two middle values for an even count); NaN for none.</summary>
    public static double Median(IEnumerable<double> values)
    {
        var sorted = values.ToArray();
        if (sorted.Length == 0) return double.NaN;
        Array.Sort(sorted);
        int m = sorted.Length / 2;
        return sorted.Length % 2 == 1 ? sorted[m] : 0.5 * (sorted[m - 1] + sorted[m]);
    }

    /// <summary>Quantile by linear interpolation between order statistics (Hyndman &amp; Fan 1996, definition 7) of a sorted array.</summary>
    public static double Quantile(ReadOnlySpan<double> sorted, double p)
    {
        if (sorted.Length == 0) return double.NaN;
        double h = (sorted.Length - 1) * p;
        int lo = (int)Math.Floor(h);
        int hi = Math.Min(lo + 1, sorted.Length - 1);
        return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
    }

    private static double Mse(WeightLaw law, int[] members, PairFit[] used, double[] q, double c, double powerScale, double gamma)
    {
        if (members.Length == 0) return double.NaN;
        double sum = 0;
        foreach (int i in members)
        {
            double e = q[i] - Predict(law, used[i].Ratio, c, powerScale, gamma);
            sum += e * e;
        }
        return sum / members.Length;
    }

    // c = Σ x(1 − q) / Σ x² over the chosen indices (all when null); NaN when Σ x² = 0 (every pair at r = 1).
    private static double FitLogarithmic(double[] x, double[] q, int[]? index, out double sxx)
    {
        double sxy = 0;
        sxx = 0;
        int n = index?.Length ?? x.Length;
        for (int k = 0; k < n; k++)
        {
            int i = index is null ? k : index[k];
            sxy += x[i] * (1 - q[i]);
            sxx += x[i] * x[i];
        }
        return sxx > 0 ? sxy / sxx : double.NaN;
    }

    // OLS of y = log10 q on x over pairs with q > 0: returns (intercept log10 A, γ = −slope, pairs used).
    private static (double logA, double gamma, int count) FitPower(double[] x, double[] q, int[]? index)
    {
        double sx = 0, sy = 0, sxx = 0, sxy = 0;
        int count = 0;
        int n = index?.Length ?? x.Length;
        for (int k = 0; k < n; k++)
        {
            int i = index is null ? k : index[k];
            if (!(q[i] > 0)) continue;
            double y = Math.Log10(q[i]);
            sx += x[i]; sy += y; sxx += x[i] * x[i]; sxy += x[i] * y;
            count++;
        }
        if (count < 2) return (double.NaN, double.NaN, count);
        double mx = sx / count, my = sy / count;
        double cxx = sxx - count * mx * mx;
        // Relative test: all x equal (up to rounding) leaves the slope undefined.
        if (!(cxx > 1e-12 * Math.Max(1, sxx))) return (double.NaN, double.NaN, count);
        double slope = (sxy - count * mx * my) / cxx;
        return (my - slope * mx, -slope, count);
    }

    private static (double cLo, double cHi, double gLo, double gHi, int cUsed, int gUsed) Bootstrap(double[] x, double[] q, WeightLawSettings s)
    {
        int n = x.Length;
        if (n < 2) return (double.NaN, double.NaN, double.NaN, double.NaN, 0, 0);
        var rng = new Random(s.Seed);
        var index = new int[n];
        var cs = new List<double>(s.Resamples);
        var gs = new List<double>(s.Resamples);
        for (int b = 0; b < s.Resamples; b++)
        {
            for (int k = 0; k < n; k++) index[k] = rng.Next(n);
            double cb = FitLogarithmic(x, q, index, out _);
            if (double.IsFinite(cb)) cs.Add(cb);
            var (_, gb, _) = FitPower(x, q, index);
            if (double.IsFinite(gb)) gs.Add(gb);
        }
        double tail = (1 - s.Confidence) / 2;
        var ca = cs.ToArray(); Array.Sort(ca);
        var ga = gs.ToArray(); Array.Sort(ga);
        return (Quantile(ca, tail), Quantile(ca, 1 - tail), Quantile(ga, tail), Quantile(ga, 1 - tail), ca.Length, ga.Length);
    }

    // Regression through the origin of (1 − q) on x: se(c) = sqrt(RSS/(n−1) / Σx²), t with n − 1 degrees of freedom.
    private static (double lo, double hi) AnalyticLogarithmic(double[] x, double[] q, double c, double confidence)
    {
        int n = x.Length;
        if (n < 2 || !double.IsFinite(c)) return (double.NaN, double.NaN);
        double rss = 0, sxx = 0;
        for (int i = 0; i < n; i++)
        {
            double e = (1 - q[i]) - c * x[i];
            rss += e * e; sxx += x[i] * x[i];
        }
        double se = Math.Sqrt(rss / (n - 1) / sxx);
        double t = StudentT.InvCDF(0, 1, n - 1, 1 - (1 - confidence) / 2);
        return (c - t * se, c + t * se);
    }

    // Simple linear regression of log10 q on x: se(slope) = sqrt(RSS/(n−2) / Sxx), t with n − 2 degrees of freedom.
    private static (double lo, double hi) AnalyticPower(double[] x, double[] q, double logA, double gamma, double confidence)
    {
        if (!double.IsFinite(gamma)) return (double.NaN, double.NaN);
        double rss = 0, sx = 0, sxx = 0;
        int n = 0;
        for (int i = 0; i < x.Length; i++)
        {
            if (!(q[i] > 0)) continue;
            double e = Math.Log10(q[i]) - (logA - gamma * x[i]);
            rss += e * e; sx += x[i]; sxx += x[i] * x[i]; n++;
        }
        if (n < 3) return (double.NaN, double.NaN);
        double cxx = sxx - sx * sx / n;
        double se = Math.Sqrt(rss / (n - 2) / cxx);
        double t = StudentT.InvCDF(0, 1, n - 2, 1 - (1 - confidence) / 2);
        return (gamma - t * se, gamma + t * se);
    }
}
