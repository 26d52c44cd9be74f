namespace SenseSplit.Core.Linalg;

/// <summary>Which inner kernel a product runs on. <see cref="Auto"/> picks the widest the CPU supports.</summary>
public enum GemmKernel { Auto, Avx512, Avx2, Scalar }

/// <summary>
/// Single-precision products of two row-major matrices whose rows share their inner dimension:
/// C (m×n) = A (m×k) · Bᵀ where B is n×k. This is the shape of every hot product in SenseSplit:
/// correlations of vectors with atoms (X·Dᵀ), Gram matrices (D·Dᵀ), and randomized-SVD sketches.
/// </summary>
public static class Gemm
{
    /// <summary>C = A·Bᵀ (overwrites C). A is m×k, B is n×k, C is m×n, all row-major and dense.</summary>
    /// <param name="threads">Worker count; 0 means Environment.ProcessorCount. Results do not depend on it.</param>
    public static void MultiplyTransposed(ReadOnlySpan<float> a, int m, ReadOnlySpan<float> b, int n, int k,
        Span<float> c, int threads = 0, GemmKernel kernel = GemmKernel.Auto)
    {
        Guard.NonNegative(m); Guard.NonNegative(n); Guard.NonNegative(k);
        Guard.AtLeastLength(a.Length, (long)m * k, "A");
        Guard.AtLeastLength(b.Length, (long)n * k, "B");
        Guard.AtLeastLength(c.Length, (long)m * n, "C");
        // Placeholder: naive reference until the blocked kernel lands.
        for (int i = 0; i < m; i++)
        {
            var ai = a.Slice(i * k, k);
            for (int j = 0; j < n; j++)
                c[i * n + j] = System.Numerics.Tensors.TensorPrimitives.Dot(ai, b.Slice(j * k, k));
        }
    }
}
