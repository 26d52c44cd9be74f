namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// The least-squares weights of v ≈ α·v1 + β·v2 for one merged pair. <see cref="CosineToSpan"/> is the cosine between
/// v and its projection p = α·v1 + β·v2 (= ||p||/||v||); <see cref="RelativeResidual"/> is ||v − p||/||v||.
/// When <see cref="IsDegenerate"/> is set (v1 and v2 parallel, a zero vector), α and β are NaN and the pair carries no
/// weight information (for parallel vectors the cosine to their common line is still given, else it is NaN); <see cref="Diagnostic"/> says why.
/// </summary>
public sealed record MixtureFitResult(double Alpha, double Beta, double CosineToSpan, double RelativeResidual, bool IsDegenerate, string Diagnostic)
{
    /// <summary>β/α; NaN when degenerate or α = 0.</summary>
    public double WeightRatio => IsDegenerate || Alpha == 0 ? double.NaN : Beta / Alpha;
}

/// <summary>
/// Least squares for two regressors: minimise ||v − α v1 − β v2||² over (α, β) for vectors of length dims, through
/// the 2×2 normal equations [v1·v1 v1·v2; v1·v2 v2·v2] [α; β] = [v1·v; v2·v], solved by Cramer's rule in double.
/// </summary>
/// <remarks>
/// The model v_merged ≈ α v_w1 + β v_w2 is the linearity assertion tested with merged pseudo-words by Arora, Li, Liang,
/// Ma &amp; Risteski 2018, "Linear Algebraic Structure of Word Senses, with Applications to Polysemy", TACL 6. Normal
/// equations are textbook least squares (e.g. Golub &amp; Van Loan, Matrix Computations, §5.3); with two columns their
/// conditioning is 1/sin²θ of the angle between v1 and v2, so the fit is declared degenerate when
/// sin²θ = det/(||v1||²||v2||²) falls below <see cref="ParallelTolerance"/> (|cos θ| above about 0.999 999 5).
/// </remarks>
public static class MixtureFit
{
    /// <summary>Smallest sin²θ between v1 and v2 for which the weights are reported (our choice: 1e-6).</summary>
    public const double ParallelTolerance = 1e-6;

    public static MixtureFitResult Fit(ReadOnlySpan<float> merged, ReadOnlySpan<float> frequent, ReadOnlySpan<float> rare)
    {
        Guard.Positive(merged.Length);
        Guard.Length(frequent.Length, merged.Length, "frequent word's vector");
        Guard.Length(rare.Length, merged.Length, "rare word's vector");
        Guard.Finite(merged, 0, "merged vector");
        Guard.Finite(frequent, 0, "frequent word's vector");
        Guard.Finite(rare, 0, "rare word's vector");

        double g11 = 0, g12 = 0, g22 = 0, b1 = 0, b2 = 0, vv = 0;
        for (int i = 0; i < merged.Length; i++)
        {
            double v = merged[i], x = frequent[i], y = rare[i];
            g11 += x * x; g12 += x * y; g22 += y * y;
            b1 += x * v; b2 += y * v; vv += v * v;
        }
        if (vv == 0) return Degenerate("the merged vector is zero");
        if (g11 == 0) return Degenerate("the frequent word's vector is zero");
        if (g22 == 0) return Degenerate("the rare word's vector is zero");
        double det = g11 * g22 - g12 * g12;
        double sin2 = det / (g11 * g22);
        if (sin2 < ParallelTolerance)
        {
            // The span is the line through v1: the cosine to it is still defined, the split into α and β is not.
            double cosLine = Math.Min(1, Math.Abs(b1) / Math.Sqrt(g11 * vv));
            return new MixtureFitResult(double.NaN, double.NaN, cosLine, Math.Sqrt(Math.Max(0, 1 - cosLine * cosLine)), true,
                $"the two word vectors are parallel (sin² of their angle is {sin2.ToString("G3", System.Globalization.CultureInfo.InvariantCulture)})");
        }

        double alpha = (b1 * g22 - b2 * g12) / det;
        double beta = (g11 * b2 - g12 * b1) / det;

        // Residual r = v − α v1 − β v2, recomputed directly rather than from ||v||² − ||p||² to avoid cancellation.
        double rr = 0, pp = 0;
        for (int i = 0; i < merged.Length; i++)
        {
            double p = alpha * frequent[i] + beta * rare[i];
            double r = merged[i] - p;
            rr += r * r; pp += p * p;
        }
        double norm = Math.Sqrt(vv);
        // cos(v, p) = v·p / (||v|| ||p||) and v·p = ||p||² for an orthogonal projection, so cos = ||p|| / ||v||.
        double cosine = Math.Min(1, Math.Sqrt(pp) / norm);
        return new MixtureFitResult(alpha, beta, cosine, Math.Sqrt(rr) / norm, false, "");
    }

    private static MixtureFitResult Degenerate(string why) => new(double.NaN, double.NaN, double.NaN, double.NaN, true, why);
}
