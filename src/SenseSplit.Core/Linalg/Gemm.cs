namespace SenseSplit.Core.Linalg;

/// <summary>Which inner kernel a product runs on. <see cref="Auto"/> picks the widest the CPU supports.</summary>
public enum GemmKernel { Auto, Avx512, Avx2, Scalar }

/// <summary>
/// Single-precision products of two row-major matrices whose rows share their inner dimension:
/// C (m×n) = A (m×k) · Bᵀ where B is n×k, i.e. C[i, j] = Σ_p A[i, p]·B[j, p]. This is the shape of every hot product
/// in SenseSplit: correlations of vectors with atoms (X·Dᵀ), Gram matrices (D·Dᵀ), and randomized-SVD sketches.
/// </summary>
/// <remarks>
/// Method: the blocked layered product of Goto and van de Geijn (2008), "Anatomy of high-performance matrix
/// multiplication", ACM TOMS 34(3), as restructured in BLIS by Van Zee and van de Geijn (2015), "BLIS: A framework for
/// rapidly instantiating BLAS functionality", ACM TOMS 41(3): B is packed once into column panels of NR columns stored
/// [k][NR]; a register-blocked micro-kernel computes an MR×NR tile of C as a sum of rank-1 updates over the k
/// dimension. Deviations from the BLIS loop nest: A is not packed (its MR rows are read where they lie, which costs
/// no copy and keeps an MR×KC sliver in L1), and inside a block the loop runs over slivers of A outer and B panels
/// inner, so the sliver stays in L1 while the packed B block (KC×NC floats, NC = 2048) streams from L2/L3; with
/// NC ≥ n every row of A is read from memory once. Register blocks: AVX-512 6×64 (24 zmm accumulators), AVX2 6×16
/// (12 ymm), scalar 4×4; a last panel narrower than NR runs a kernel with fewer vectors per row.
/// <para>Determinism: every element of C is one fused multiply-add chain over p = 0..k-1 in increasing order, cut
/// into KC-blocks that depend on k only, so results are bitwise identical for any thread count, any position of the
/// element inside a tile, and C[i, j] and C[j, i] of a Gram product A·Aᵀ are bitwise equal. Different
/// <see cref="GemmKernel"/> paths differ in rounding (the scalar path multiplies and adds separately).</para>
/// <para>Inputs are checked for shape and length, not for finiteness: this is the innermost product, called on every
/// batch, and IEEE arithmetic already carries a NaN or infinity of row i of A (or row j of B) into row i (column j)
/// of C and nowhere else; finiteness is checked where matrices enter the pipeline.</para>
/// </remarks>
public static class Gemm
{
    /// <summary>C = A·Bᵀ (overwrites C). A is m×k, B is n×k, C is m×n, all row-major and dense.</summary>
    /// <param name="threads">Worker count; 0 means Environment.ProcessorCount. Results do not depend on it.</param>
    /// <param name="kernel">Forces an instruction-set path; <see cref="NotSupportedException"/> when the CPU lacks it.</param>
    public static void MultiplyTransposed(ReadOnlySpan<float> a, int m, ReadOnlySpan<float> b, int n, int k,
        Span<float> c, int threads = 0, GemmKernel kernel = GemmKernel.Auto)
        => MultiplyTransposed(a, m, k, b, n, k, c, n, k, threads, kernel);

    /// <summary>
    /// C = A·Bᵀ with leading dimensions: row i of A starts at a[i·lda], row j of B at b[j·ldb], row i of C at
    /// c[i·ldc]; only the first k entries of an A or B row and the first n of a C row are read or written.
    /// </summary>
    public static unsafe void MultiplyTransposed(ReadOnlySpan<float> a, int m, int lda, ReadOnlySpan<float> b, int n,
        int ldb, Span<float> c, int ldc, int k, int threads = 0, GemmKernel kernel = GemmKernel.Auto)
    {
        Guard.NonNegative(m); Guard.NonNegative(n); Guard.NonNegative(k); Guard.NonNegative(threads);
        Guard.AtMost(k, lda, "lda"); Guard.AtMost(k, ldb, "ldb"); Guard.AtMost(n, ldc, "ldc");
        if (m > 0) Guard.AtLeastLength(a.Length, (long)(m - 1) * lda + k, "A");
        if (n > 0) Guard.AtLeastLength(b.Length, (long)(n - 1) * ldb + k, "B");
        if (m > 0) Guard.AtLeastLength(c.Length, (long)(m - 1) * ldc + n, "C");
        var path = Resolve(kernel);
        if (m == 0 || n == 0) return;
        if (k == 0)
        {
            for (int i = 0; i < m; i++) c.Slice(i * ldc, n).Clear();
            return;
        }
        if (threads == 0) threads = Environment.ProcessorCount;
        fixed (float* pa = a)
        fixed (float* pb = b)
        fixed (float* pc = c)
        {
            var job = new GemmJob(pa, lda, m, pb, ldb, n, k, pc, ldc);
            switch (path)
            {
                case GemmKernel.Avx512: GemmDriver<Avx512MicroKernel>.Run(job, threads); break;
                case GemmKernel.Avx2: GemmDriver<Avx2MicroKernel>.Run(job, threads); break;
                default: GemmDriver<ScalarMicroKernel>.Run(job, threads); break;
            }
        }
    }

    /// <summary>
    /// G = A·Aᵀ (overwrites G): the Gram matrix G[i, j] = Σ_p A[i, p]·A[j, p] of the m rows of A (m×k), G m×m,
    /// both row-major and dense. Computes the tiles on and below the diagonal and copies the lower triangle onto the
    /// upper, so it does about half the work of <see cref="MultiplyTransposed(ReadOnlySpan{float}, int, ReadOnlySpan{float}, int, int, Span{float}, int, GemmKernel)"/>
    /// with A for B, and returns bitwise the same matrix (every entry is the same fused multiply-add chain).
    /// </summary>
    public static unsafe void Gram(ReadOnlySpan<float> a, int m, int k, Span<float> g, int threads = 0,
        GemmKernel kernel = GemmKernel.Auto)
    {
        Guard.NonNegative(m); Guard.NonNegative(k); Guard.NonNegative(threads);
        Guard.AtLeastLength(a.Length, (long)m * k, "A");
        Guard.AtLeastLength(g.Length, (long)m * m, "G");
        var path = Resolve(kernel);
        if (m == 0) return;
        if (k == 0)
        {
            g[..(m * m)].Clear();
            return;
        }
        if (threads == 0) threads = Environment.ProcessorCount;
        fixed (float* pa = a)
        fixed (float* pg = g)
        {
            var job = new GemmJob(pa, k, m, pa, k, m, k, pg, m);
            switch (path)
            {
                case GemmKernel.Avx512: GemmDriver<Avx512MicroKernel>.Run(job, threads, lowerTriangle: true); break;
                case GemmKernel.Avx2: GemmDriver<Avx2MicroKernel>.Run(job, threads, lowerTriangle: true); break;
                default: GemmDriver<ScalarMicroKernel>.Run(job, threads, lowerTriangle: true); break;
            }
        }
    }

    /// <summary>Whether this CPU can run <paramref name="kernel"/> (<see cref="GemmKernel.Auto"/> and Scalar always).</summary>
    public static bool IsSupported(GemmKernel kernel) => kernel switch
    {
        GemmKernel.Avx512 => Avx512MicroKernel.IsSupported,
        GemmKernel.Avx2 => Avx2MicroKernel.IsSupported,
        _ => true,
    };

    /// <summary>The path <see cref="GemmKernel.Auto"/> resolves to on this CPU.</summary>
    public static GemmKernel Resolve(GemmKernel kernel)
    {
        switch (kernel)
        {
            case GemmKernel.Auto:
                return Avx512MicroKernel.IsSupported ? GemmKernel.Avx512
                    : Avx2MicroKernel.IsSupported ? GemmKernel.Avx2 : GemmKernel.Scalar;
            case GemmKernel.Avx512 when !Avx512MicroKernel.IsSupported:
                throw new NotSupportedException("GEMM kernel Avx512 needs AVX-512F with 512-bit vector acceleration, which this CPU or runtime does not provide");
            case GemmKernel.Avx2 when !Avx2MicroKernel.IsSupported:
                throw new NotSupportedException("GEMM kernel Avx2 needs AVX2 and FMA, which this CPU or runtime does not provide");
            case GemmKernel.Avx512 or GemmKernel.Avx2 or GemmKernel.Scalar:
                return kernel;
            default:
                throw new ArgumentOutOfRangeException(nameof(kernel), kernel, $"unknown GEMM kernel ({(int)kernel})");
        }
    }
}
