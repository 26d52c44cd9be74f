using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

/// <summary>Seeded synthetic inputs shared by the merge-test tests.</summary>
internal static class MergeTestData
{
    public static double Gaussian(Random rng)
    {
        // Box–Muller transform (Box & Muller 1958, Annals of Mathematical Statistics 29).
        double u1 = 1 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }

    public static float[] GaussianMatrix(Random rng, int rows, int cols, double scale = 1)
    {
        var m = new float[rows * cols];
        for (int i = 0; i < m.Length; i++) m[i] = (float)(scale * Gaussian(rng));
        return m;
    }

    public static float[] UnitVector(Random rng, int dims)
    {
        var v = GaussianMatrix(rng, 1, dims);
        double norm = Math.Sqrt(v.Sum(x => (double)x * x));
        for (int i = 0; i < dims; i++) v[i] = (float)(v[i] / norm);
        return v;
    }

    /// <summary>
    /// Pairs from a known linear model: for each pair, unit random v1, v2 (dims), α drawn in [0.5, 2], β = α·q(r),
    /// v = α v1 + β v2 + ε with ε ~ N(0, noise² I). Ratios are log-uniform over [1, maxRatio].
    /// </summary>
    public static List<(MergePair pair, float[] merged, float[] v1, float[] v2, double alpha, double beta)> LinearModel(
        int seed, int pairs, int dims, double noise, double maxRatio, Func<double, double> weightRatio)
    {
        var rng = new Random(seed);
        var list = new List<(MergePair, float[], float[], float[], double, double)>();
        for (int p = 0; p < pairs; p++)
        {
            double r = Math.Pow(10, rng.NextDouble() * Math.Log10(maxRatio));
            long f2 = 20 + rng.Next(200);
            long f1 = (long)Math.Round(f2 * r);
            if (f1 < f2) f1 = f2;
            double ratio = (double)f1 / f2;
            var v1 = UnitVector(rng, dims);
            var v2 = UnitVector(rng, dims);
            double alpha = 0.5 + 1.5 * rng.NextDouble();
            double beta = alpha * weightRatio(ratio);
            var v = new float[dims];
            for (int i = 0; i < dims; i++) v[i] = (float)(alpha * v1[i] + beta * v2[i] + noise * Gaussian(rng));
            list.Add((new MergePair($"f{p}", $"r{p}", f1, f2, 2 * p, 2 * p + 1, 0), v, v1, v2, alpha, beta));
        }
        return list;
    }

    public static List<PairFit> Fits(IEnumerable<(MergePair pair, float[] merged, float[] v1, float[] v2, double alpha, double beta)> data)
        => data.Select(d => new PairFit(d.pair, MixtureFit.Fit(d.merged, d.v1, d.v2))).ToList();

    /// <summary>A pair fit with chosen numbers, for verdict and law tests that need no vectors.</summary>
    public static PairFit Constructed(int id, double ratio, double weightRatio, double cosine)
    {
        long f2 = 1000;
        long f1 = (long)Math.Round(f2 * ratio);
        var pair = new MergePair($"f{id}", $"r{id}", f1, f2, 2 * id, 2 * id + 1, 0);
        double alpha = 1, beta = weightRatio;
        return new PairFit(pair, new MixtureFitResult(alpha, beta, cosine, Math.Sqrt(Math.Max(0, 1 - cosine * cosine)), false, ""));
    }
}
