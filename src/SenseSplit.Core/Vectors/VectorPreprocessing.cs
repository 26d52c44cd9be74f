using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.Vectors;

/// <summary>What <see cref="VectorPreprocessing.RemoveTopComponents"/> removed: the mean (1×dims), the principal
/// directions (Count×dims, unit rows, largest variance first) and their variances (eigenvalues of the covariance).</summary>
public sealed record RemovedComponents(float[] Mean, float[] Directions, int Count, double[] Variances);

/// <summary>In-place preprocessing of word vectors (rows×dims, row-major) before dictionary learning.</summary>
public static class VectorPreprocessing
{
    /// <summary>
    /// Scales every row x to unit length, x ← x / ||x||₂ (norm accumulated in double). Zero rows cannot be scaled:
    /// they are left as they are and their indices returned (ascending), for the caller to report.
    /// </summary>
    public static int[] NormalizeRows(Span<float> values, int rows, int dims)
    {
        Guard.NonNegative(rows);
        Guard.Positive(dims);
        Guard.Length(values.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        Guard.Finite(values, dims, "vectors");
        var zero = new List<int>();
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            double sq = 0;
            foreach (float v in row) sq += (double)v * v;
            if (sq == 0) { zero.Add(i); continue; }
            float inv = (float)(1 / Math.Sqrt(sq));
            foreach (ref float v in row) v *= inv;
        }
        return zero.ToArray();
    }

    /// <summary>
    /// "All-but-the-top": x ← (x − μ) − Σ_{i≤D} (u_iᵀ(x − μ)) u_i for every row, where μ (1×dims) is the mean row and
    /// u_1..u_D the top <paramref name="components"/> eigenvectors of the covariance C = (1/rows) Σ (x − μ)(x − μ)ᵀ
    /// (dims×dims), i.e. the first principal directions.
    /// </summary>
    /// <remarks>
    /// J. Mu, S. Bhat and P. Viswanath (2018), "All-but-the-Top: Simple and Effective Postprocessing for Word
    /// Representations", ICLR, Algorithm 1; they suggest D ≈ dims/100. Their Algorithm 1 writes the projection
    /// coefficient with the uncentred vector (from memory); we project the centred vector, which removes the
    /// directions exactly (with the uncentred coefficient every row would move by the same −Σ (u_iᵀμ) u_i).
    /// The covariance is accumulated over blocks of 1024 rows: each block is centred and transposed (dims×block) and
    /// multiplied with itself through <see cref="Gemm.MultiplyTransposed"/>; block sums are added in double. The dims×dims
    /// eigen-decomposition uses MathNet.Numerics (symmetric EVD). Deterministic; independent of the thread count.
    /// </remarks>
    public static unsafe RemovedComponents RemoveTopComponents(Span<float> values, int rows, int dims, int components, int threads = 0)
    {
        Guard.Positive(rows);
        Guard.Positive(dims);
        Guard.NonNegative(components);
        Guard.AtMost(components, dims, "dimensions");
        Guard.NonNegative(threads);
        Guard.Length(values.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        Guard.Finite(values, dims, "vectors");

        // μ in double, then centre in place.
        var sum = new double[dims];
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++) sum[j] += row[j];
        }
        var mean = new float[dims];
        for (int j = 0; j < dims; j++) mean[j] = (float)(sum[j] / rows);
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++) row[j] -= mean[j];
        }
        if (components == 0) return new RemovedComponents(mean, [], 0, []);

        // C = (1/rows) Σ_blocks Bᵀ B with B the centred block (block×dims): Gemm of the transposed block with itself.
        const int block = 1024;
        var transposed = new float[dims * Math.Min(block, rows)];
        var partial = new float[dims * dims];
        var cov = new double[dims * dims];
        for (int first = 0; first < rows; first += block)
        {
            int m = Math.Min(block, rows - first);
            for (int r = 0; r < m; r++)
            {
                var row = values.Slice((first + r) * dims, dims);
                for (int j = 0; j < dims; j++) transposed[j * m + r] = row[j];
            }
            Gemm.MultiplyTransposed(transposed.AsSpan(0, dims * m), dims, transposed.AsSpan(0, dims * m), dims, m, partial, threads);
            for (int e = 0; e < cov.Length; e++) cov[e] += partial[e];
        }
        var c = Matrix<double>.Build.Dense(dims, dims, (i, j) => 0.5 * (cov[i * dims + j] + cov[j * dims + i]) / rows);
        var evd = c.Evd(Symmetricity.Symmetric);
        var order = Enumerable.Range(0, dims).OrderByDescending(i => evd.EigenValues[i].Real).ThenBy(i => i).ToArray();
        var directions = new float[components * dims];
        var variances = new double[components];
        for (int t = 0; t < components; t++)
        {
            int col = order[t];
            variances[t] = evd.EigenValues[col].Real;
            for (int j = 0; j < dims; j++) directions[t * dims + j] = (float)evd.EigenVectors[j, col];
        }

        // x ← x − Σ (u_iᵀx) u_i per row (x already centred); rows are independent, fixed blocks.
        int blocks = (rows + block - 1) / block;
        int workers = threads == 0 ? Environment.ProcessorCount : threads;
        fixed (float* p = values)
        {
            float* basePtr = p;
            Parallel.For(0, blocks, new ParallelOptions { MaxDegreeOfParallelism = workers }, b =>
            {
                int end = Math.Min(rows, (b + 1) * block);
                for (int i = b * block; i < end; i++)
                {
                    var row = new Span<float>(basePtr + (long)i * dims, dims);
                    for (int t = 0; t < components; t++)
                    {
                        var u = new ReadOnlySpan<float>(directions, t * dims, dims);
                        double dot = 0;
                        for (int j = 0; j < dims; j++) dot += (double)u[j] * row[j];
                        float f = (float)dot;
                        for (int j = 0; j < dims; j++) row[j] -= f * u[j];
                    }
                }
            });
        }
        return new RemovedComponents(mean, directions, components, variances);
    }
}
