using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.SparseCoding;

/// <summary>Settings of a synthetic sparse-coding problem with a known ("planted") dictionary.</summary>
public sealed record PlantedOptions
{
    public int Rows { get; init; } = 100_000;
    public int Dimensions { get; init; } = 300;
    public int Atoms { get; init; } = 2000;
    /// <summary>Atoms per vector (every vector uses exactly this many distinct atoms).</summary>
    public int Sparsity { get; init; } = 5;
    /// <summary>Expected ratio ||noise|| / ||signal|| per vector; 0.05 is "5% noise".</summary>
    public double Noise { get; init; } = 0.05;
    /// <summary>Weights are random sign × uniform magnitude in [MinWeight, 1]; 0 gives weights uniform in [−1, 1].</summary>
    public double MinWeight { get; init; } = 0.2;
    public int Seed { get; init; } = 1;
}

/// <summary>A planted problem: vectors X (Rows×Dimensions) = codes · atoms + noise, with the true atoms and codes.</summary>
public sealed record PlantedProblem(float[] Vectors, int Rows, int Dimensions, float[] Atoms, int AtomCount, SparseCodes TrueCodes);

/// <summary>
/// Generates X = A·D + E with D (atoms×dims) i.i.d. Gaussian rows scaled to unit length, A (rows×atoms) with exactly
/// <c>sparsity</c> non-zeros per row at distinct uniformly random atoms, and white Gaussian noise E scaled per row to the
/// requested ratio to the signal; and measures how many planted atoms a learned dictionary recovers.
/// </summary>
/// <remarks>
/// The design is the synthetic experiment of M. Aharon, M. Elad and A. Bruckstein (2006), "K-SVD: An algorithm for
/// designing overcomplete dictionaries for sparse representation", IEEE Trans. Signal Processing 54(11), §V-A
/// (random unit-norm dictionary, each signal a combination of a few atoms with i.i.d. uniform coefficients at random
/// locations, white Gaussian noise), scaled to embedding-like sizes. Deterministic for a seed (System.Random with a seed,
/// Box–Muller normals).
/// </remarks>
public static class PlantedDictionary
{
    public static PlantedProblem Generate(PlantedOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        int rows = options.Rows, dims = options.Dimensions, k = options.Atoms, s = options.Sparsity;
        Guard.Positive(rows);
        Guard.Positive(dims);
        Guard.Positive(k);
        Guard.Positive(s);
        Guard.AtMost(s, k, "atoms");
        if (!(options.Noise >= 0) || double.IsInfinity(options.Noise))
            throw new ArgumentOutOfRangeException(nameof(options), $"noise ({options.Noise}) must be finite and not negative");
        if (!(options.MinWeight >= 0 && options.MinWeight <= 1))
            throw new ArgumentOutOfRangeException(nameof(options), $"minimum weight ({options.MinWeight}) must be in [0, 1]");

        var rng = new Random(options.Seed);
        var atoms = new float[k * dims];
        for (int a = 0; a < k; a++)
        {
            var row = atoms.AsSpan(a * dims, dims);
            double sq;
            do
            {
                sq = 0;
                for (int j = 0; j < dims; j++) { row[j] = (float)Normal(rng); sq += (double)row[j] * row[j]; }
            } while (sq == 0);
            float inv = (float)(1 / Math.Sqrt(sq));
            for (int j = 0; j < dims; j++) row[j] *= inv;
        }

        var ids = new int[rows * s];
        var weights = new float[rows * s];
        var x = new float[rows * dims];
        var noise = new double[dims];
        for (int i = 0; i < rows; i++)
        {
            var rowIds = ids.AsSpan(i * s, s);
            for (int t = 0; t < s; t++)
            {
                int pick;
                do pick = rng.Next(k); while (rowIds[..t].Contains(pick));
                rowIds[t] = pick;
                double mag = options.MinWeight + (1 - options.MinWeight) * rng.NextDouble();
                weights[i * s + t] = (float)(rng.Next(2) == 0 ? -mag : mag);
            }
            var xi = x.AsSpan(i * dims, dims);
            for (int t = 0; t < s; t++)
            {
                var d = atoms.AsSpan(rowIds[t] * dims, dims);
                float wgt = weights[i * s + t];
                for (int j = 0; j < dims; j++) xi[j] += wgt * d[j];
            }
            if (options.Noise > 0)
            {
                double signal = 0, nn = 0;
                for (int j = 0; j < dims; j++) { signal += (double)xi[j] * xi[j]; noise[j] = Normal(rng); nn += noise[j] * noise[j]; }
                // White noise of per-entry standard deviation σ = Noise·||signal||/√dims, so E||noise||² = Noise²·||signal||².
                double sigma = options.Noise * Math.Sqrt(signal / dims);
                for (int j = 0; j < dims; j++) xi[j] += (float)(sigma * noise[j]);
            }
        }
        return new PlantedProblem(x, rows, dims, atoms, k, new SparseCodes(rows, s, ids, weights));
    }

    /// <summary>Number of planted atoms d_i (plantedCount×dims) for which some learned atom d̂_j (learnedCount×dims)
    /// has |d_iᵀ d̂_j| above <paramref name="cosine"/>. Aharon et al. (2006, §V-A) count an atom as found when
    /// 1 − |d_iᵀ d̂_j| &lt; 0.01, i.e. cosine 0.99. Independent of atom order and sign.</summary>
    public static int CountRecovered(ReadOnlySpan<float> planted, int plantedCount, ReadOnlySpan<float> learned, int learnedCount,
        int dims, double cosine = 0.99, int threads = 0)
    {
        Guard.Positive(plantedCount);
        Guard.Positive(learnedCount);
        Guard.Positive(dims);
        Guard.Length(planted.Length, (long)plantedCount * dims, $"planted atoms ({plantedCount}×{dims})");
        Guard.Length(learned.Length, (long)learnedCount * dims, $"learned atoms ({learnedCount}×{dims})");
        var found = 0;
        const int block = 256;
        var c = new float[block * learnedCount];
        for (int first = 0; first < plantedCount; first += block)
        {
            int m = Math.Min(block, plantedCount - first);
            Gemm.MultiplyTransposed(planted.Slice(first * dims, m * dims), m, learned, learnedCount, dims, c, threads);
            for (int i = 0; i < m; i++)
            {
                var row = c.AsSpan(i * learnedCount, learnedCount);
                float best = 0;
                foreach (float v in row) best = Math.Max(best, Math.Abs(v));
                if (best > cosine) found++;
            }
        }
        return found;
    }

    private static double Normal(Random rng)
    {
        // Box–Muller; 1 − U avoids log(0).
        double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
