using System.Runtime.Intrinsics;
using MathNet.Numerics.LinearAlgebra;

namespace SenseSplit.Core.Linalg;

/// <summary>Options of <see cref="RandomizedSvd"/>.</summary>
public sealed record RandomizedSvdOptions
{
    /// <summary>Extra sample columns p beyond the rank k (Halko et al. 2011 §4.2 suggest p = 5 or 10). Default 10.</summary>
    public int Oversample { get; init; } = 10;
    /// <summary>Power (subspace) iterations q, each with re-orthonormalisation (Halko et al. 2011, Algorithm 4.4). Default 4.</summary>
    public int PowerIterations { get; init; } = 4;
    /// <summary>Seed of the Gaussian test matrix.</summary>
    public int Seed { get; init; } = 1;
    /// <summary>Worker count; 0 = processor count. Results do not depend on it.</summary>
    public int Threads { get; init; }
}

/// <summary>
/// A truncated SVD A ≈ U Σ Vᵀ: <see cref="U"/> is Rows × K, <see cref="V"/> is Columns × K (both row-major, orthonormal
/// columns), <see cref="SingularValues"/> has K values in decreasing order. When the numerical rank found is below K,
/// <see cref="Rank"/> says so and the columns past it are zero.
/// </summary>
public sealed record TruncatedSvd(int Rows, int Columns, int K, float[] U, double[] SingularValues, float[] V, int Rank);

/// <summary>
/// Randomized truncated SVD of a sparse matrix A (m × n): the k leading singular triplets of A ≈ U Σ Vᵀ.
/// </summary>
/// <remarks>
/// Halko, Martinsson &amp; Tropp 2011, "Finding structure with randomness: probabilistic algorithms for constructing
/// approximate matrix decompositions", SIAM Review 53(2). Stage A, Algorithm 4.4 (randomized subspace iteration):
/// Ω (n × l, l = k + p) Gaussian; Y₀ = AΩ, Q₀ = orth(Y₀); for j = 1..q: Q̂ = orth(AᵀQ_{j−1}), Q_j = orth(AQ̂).
/// Stage B, Algorithm 5.1: B = QᵀA, computed as Bᵀ = AᵀQ (n × l); the small SVD of B comes from the eigen-decomposition
/// of the l × l Gram matrix B Bᵀ = W Σ² Wᵀ (accumulated in double), so U = Q W, V = Bᵀ W Σ⁻¹.
/// orth() is CholeskyQR with the Gram matrix G = YᵀY accumulated in double (one pass inside the power iterations, two
/// passes, i.e. CholeskyQR2, for the final basis); when G is numerically singular it falls back to SVQB (Stathopoulos
/// &amp; Wu 2002, "A block orthogonalization procedure with constant synchronization requirements", SIAM J. Sci.
/// Comput. 23(6)): G = W Λ Wᵀ, Y ← Y W Λ^{-1/2}, dropping directions with λ ≤ 1e-10 λ_max (numerical rank deficiency). Tall products go through <see cref="Gemm"/>; only l × l eigen-problems use
/// MathNet.Numerics. Sparse products are parallel over fixed row blocks, Gram matrices over eight fixed row ranges
/// summed in order, so the result depends on the seed only.
/// </remarks>
public static class RandomizedSvd
{
    /// <summary>Eigenvalues of a Gram matrix below this fraction of the largest are treated as zero (float data: σ below ~1e-5 σ_max is noise).</summary>
    private const double RankTolerance = 1e-10;
    private const int GramRanges = 8;

    /// <summary>The <paramref name="k"/> leading singular triplets of <paramref name="a"/>.</summary>
    /// <param name="transposed">Aᵀ in CSR form, when the caller already has it (else it is built).</param>
    public static TruncatedSvd Compute(SparseMatrix a, int k, RandomizedSvdOptions options, SparseMatrix? transposed = null,
        IProgress<string>? progress = null)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(options);
        Guard.Positive(k);
        Guard.AtMost(k, Math.Min(a.Rows, a.Columns), "min(rows, columns)");
        Guard.NonNegative(options.Oversample);
        Guard.NonNegative(options.PowerIterations);
        if (transposed is not null && (transposed.Rows != a.Columns || transposed.Columns != a.Rows))
            throw new ArgumentException($"transposed is {transposed.Rows} × {transposed.Columns}, expected {a.Columns} × {a.Rows}");
        var at = transposed ?? a.Transpose();
        int threads = options.Threads > 0 ? options.Threads : Environment.ProcessorCount;
        int m = a.Rows, n = a.Columns;

        var q = FindRange(a, at, k, options, threads, progress, out int l, out var spare);

        // Stage B (Algorithm 5.1): Bᵀ = AᵀQ, B Bᵀ = W Σ² Wᵀ. Bᵀ goes into stage A's other work buffer.
        progress?.Report("final projection");
        var bt = spare;
        at.Multiply(q, l, bt, threads);
        var h = Gram(bt, n, l, threads);
        var evd = Matrix<double>.Build.DenseOfArray(h).Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric);
        var order = Enumerable.Range(0, l).OrderByDescending(i => evd.EigenValues[i].Real).ToArray();
        double lambdaMax = Math.Max(0, evd.EigenValues[order[0]].Real);
        var sigma = new double[k];
        int rank = 0;
        var wu = new float[(long)k * l]; // row j = W column j (for U = Q W_k, Gemm takes Bᵀ-form rows)
        var wv = new float[(long)k * l]; // row j = W column j / σ_j
        for (int j = 0; j < Math.Min(k, l); j++)
        {
            double lambda = evd.EigenValues[order[j]].Real;
            if (!(lambda > RankTolerance * lambdaMax) || lambda <= 0) break;
            sigma[j] = Math.Sqrt(lambda);
            rank++;
            for (int i = 0; i < l; i++)
            {
                double w = evd.EigenVectors[i, order[j]];
                wu[(long)j * l + i] = (float)w;
                wv[(long)j * l + i] = (float)(w / sigma[j]);
            }
        }
        var u = new float[(long)m * k];
        var v = new float[(long)n * k];
        Gemm.MultiplyTransposed(q, m, wu, k, l, u, threads);
        Gemm.MultiplyTransposed(bt, n, wv, k, l, v, threads);
        FixSigns(u, m, v, n, k);
        return new TruncatedSvd(m, n, k, u, sigma, v, rank);
    }

    /// <summary>Stage A (Algorithm 4.4): an orthonormal basis Q (m × l) of the dominant range of A; l may drop below k + p on rank deficiency.</summary>
    internal static float[] FindRange(SparseMatrix a, SparseMatrix at, int k, RandomizedSvdOptions options, int threads,
        IProgress<string>? progress, out int l) => FindRange(a, at, k, options, threads, progress, out l, out _);

    /// <param name="spare">The other work buffer (max(rows, columns) × l floats), which the caller may reuse.</param>
    /// <remarks>Two work buffers of max(rows, columns) × l floats serve every step: each product reads one and writes
    /// the other, and each orthonormalisation pass does the same, so the buffer that held its input becomes the free one.</remarks>
    private static float[] FindRange(SparseMatrix a, SparseMatrix at, int k, RandomizedSvdOptions options, int threads,
        IProgress<string>? progress, out int l, out float[] spare)
    {
        int m = a.Rows, n = a.Columns;
        l = Math.Min(k + options.Oversample, Math.Min(m, n));
        long size = (long)Math.Max(m, n) * l;
        var one = new float[size];
        var two = new float[size];
        new Gaussian((ulong)(uint)options.Seed).Fill(one.AsSpan(0, n * l));
        a.Multiply(one, l, two, threads);
        // Inside the power iterations one pass of CholeskyQR (orthonormal to ~ε·κ²) is enough to keep the basis from
        // collapsing; the last basis gets a second pass (CholeskyQR2) so Q is orthonormal to working precision.
        var q = Orthonormalize(two, one, m, ref l, options.PowerIterations == 0 ? 2 : 1, threads);
        for (int it = 0; it < options.PowerIterations; it++)
        {
            progress?.Report($"power iteration {it + 1} of {options.PowerIterations}");
            var free = q == one ? two : one;
            at.Multiply(q, l, free, threads);
            var zq = Orthonormalize(free, q, n, ref l, 1, threads);
            free = zq == one ? two : one;
            a.Multiply(zq, l, free, threads);
            q = Orthonormalize(free, zq, m, ref l, it == options.PowerIterations - 1 ? 2 : 1, threads);
        }
        spare = q == one ? two : one;
        return q;
    }

    /// <summary>Orthonormal basis of the columns of Y (rows × l), by <paramref name="passes"/> passes of CholeskyQR
    /// (SVQB where the Gram matrix is numerically singular). Works in place between <paramref name="y"/> and
    /// <paramref name="scratch"/> and returns the one holding the result; l may shrink.</summary>
    internal static float[] Orthonormalize(float[] y, float[] scratch, int rows, ref int l, int passes, int threads)
    {
        var from = y;
        var to = scratch;
        for (int p = 0; p < passes; p++)
        {
            bool dropped = OrthonormalizePass(from, to, rows, ref l, threads);
            (from, to) = (to, from);
            if (dropped && p == passes - 1) passes++; // a rank drop deserves one clean pass more
            if (passes > 3) break;
        }
        return from;
    }

    /// <summary>One pass Q = Y·M with QᵀQ ≈ I. Gram G = YᵀY in double; Cholesky G = L Lᵀ gives M = L⁻ᵀ (CholeskyQR,
    /// Fukaya et al. 2014, "CholeskyQR2: a simple and communication-avoiding algorithm for computing a tall-skinny QR
    /// factorization", ScalA). When G is numerically singular (a pivot below 1e-10 of the largest diagonal entry), the
    /// eigen-decomposition G = W Λ Wᵀ gives M = W Λ^{-1/2} over the eigenvalues above the tolerance (SVQB) and l shrinks.
    /// Returns true when directions were dropped.</summary>
    private static bool OrthonormalizePass(float[] y, float[] q, int rows, ref int l, int threads)
    {
        int cols = l;
        var g = Gram(y, rows, cols, threads);
        var mt = CholeskyInverse(g, cols);
        if (mt is not null)
        {
            Gemm.MultiplyTransposed(y.AsSpan(0, rows * cols), rows, mt, cols, cols, q.AsSpan(0, rows * cols), threads);
            return false;
        }
        var evd = Matrix<double>.Build.DenseOfArray(g).Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric);
        var order = Enumerable.Range(0, cols).OrderByDescending(i => evd.EigenValues[i].Real).ToArray();
        double lambdaMax = evd.EigenValues[order[0]].Real;
        int kept = 0;
        while (kept < cols && lambdaMax > 0 && evd.EigenValues[order[kept]].Real > RankTolerance * lambdaMax) kept++;
        if (kept == 0) throw new ArgumentException("the matrix is zero (or numerically zero): no singular vectors to find");
        // Y ← Y M with M = W_kept Λ^{-1/2}; Gemm wants Mᵀ (kept × cols) row-major.
        var m = new float[(long)kept * cols];
        for (int j = 0; j < kept; j++)
        {
            double scale = 1.0 / Math.Sqrt(evd.EigenValues[order[j]].Real);
            for (int i = 0; i < cols; i++) m[(long)j * cols + i] = (float)(evd.EigenVectors[i, order[j]] * scale);
        }
        Gemm.MultiplyTransposed(y.AsSpan(0, rows * cols), rows, m, kept, cols, q.AsSpan(0, rows * kept), threads);
        l = kept;
        return kept < cols;
    }

    /// <summary>L⁻¹ (row-major, as float) of the Cholesky factor of G = L Lᵀ, or null when a pivot is not safely positive.</summary>
    private static float[]? CholeskyInverse(double[,] g, int n)
    {
        var lower = new double[n, n];
        double maxDiagonal = 0;
        for (int i = 0; i < n; i++) maxDiagonal = Math.Max(maxDiagonal, g[i, i]);
        if (!(maxDiagonal > 0)) return null;
        for (int j = 0; j < n; j++)
        {
            double d = g[j, j];
            for (int t = 0; t < j; t++) d -= lower[j, t] * lower[j, t];
            if (!(d > RankTolerance * maxDiagonal)) return null;
            double ljj = Math.Sqrt(d);
            lower[j, j] = ljj;
            for (int i = j + 1; i < n; i++)
            {
                double v = g[i, j];
                for (int t = 0; t < j; t++) v -= lower[i, t] * lower[j, t];
                lower[i, j] = v / ljj;
            }
        }
        // Forward substitution for L X = I, column by column (X lower triangular).
        var inv = new float[(long)n * n];
        var x = new double[n];
        for (int c = 0; c < n; c++)
        {
            for (int i = 0; i < c; i++) x[i] = 0;
            for (int i = c; i < n; i++)
            {
                double v = i == c ? 1 : 0;
                for (int t = c; t < i; t++) v -= lower[i, t] * x[t];
                x[i] = v / lower[i, i];
            }
            for (int i = c; i < n; i++) inv[(long)i * n + c] = (float)x[i];
        }
        return inv;
    }

    /// <summary>G = YᵀY (l × l, double) of a row-major rows × l float matrix, over eight fixed row ranges summed in order.</summary>
    public static double[,] Gram(float[] y, int rows, int l, int threads)
    {
        ArgumentNullException.ThrowIfNull(y);
        Guard.Positive(l);
        Guard.NonNegative(rows);
        Guard.AtLeastLength(y.Length, (long)rows * l, "Y");
        if (threads <= 0) threads = Environment.ProcessorCount;
        var partial = new double[GramRanges][];
        Parallel.For(0, GramRanges, new ParallelOptions { MaxDegreeOfParallelism = threads }, r =>
        {
            int start = (int)((long)rows * r / GramRanges), end = (int)((long)rows * (r + 1) / GramRanges);
            var acc = new double[(long)l * l];
            GramRange(y, start, end, l, acc);
            partial[r] = acc;
        });
        var g = new double[l, l];
        for (int i = 0; i < l; i++)
        {
            for (int j = i; j < l; j++)
            {
                double s = 0;
                for (int r = 0; r < GramRanges; r++) s += partial[r][(long)i * l + j];
                g[i, j] = s;
                g[j, i] = s;
            }
        }
        return g;
    }

    /// <summary>Upper triangle of Σ_rows y yᵀ into acc (l × l, row-major), eight rows at a time (rank-8 updates in double,
    /// 256-bit FMA), then one row at a time. Scalar twin: <see cref="GramRangeScalar"/>.</summary>
    internal static unsafe void GramRange(float[] y, int start, int end, int l, double[] acc)
    {
        const int R = 8;
        var d = new double[R * l];
        int row = start;
        fixed (double* pd = d, pg = acc)
        {
            for (; row + R <= end; row += R)
            {
                for (int r = 0; r < R; r++) Widen(y, row + r, l, d.AsSpan(r * l, l));
                for (int i = 0; i < l; i++)
                {
                    double* g = pg + (long)i * l;
                    var v0 = Vector256.Create(pd[i]); var v1 = Vector256.Create(pd[l + i]);
                    var v2 = Vector256.Create(pd[2 * l + i]); var v3 = Vector256.Create(pd[3 * l + i]);
                    var v4 = Vector256.Create(pd[4 * l + i]); var v5 = Vector256.Create(pd[5 * l + i]);
                    var v6 = Vector256.Create(pd[6 * l + i]); var v7 = Vector256.Create(pd[7 * l + i]);
                    int j = i;
                    for (; j + 4 <= l; j += 4)
                    {
                        var s = Vector256.Load(g + j);
                        var s2 = Vector256.FusedMultiplyAdd(v1, Vector256.Load(pd + l + j), Vector256.Multiply(v0, Vector256.Load(pd + j)));
                        var s3 = Vector256.FusedMultiplyAdd(v3, Vector256.Load(pd + 3 * l + j), Vector256.Multiply(v2, Vector256.Load(pd + 2 * l + j)));
                        var s4 = Vector256.FusedMultiplyAdd(v5, Vector256.Load(pd + 5 * l + j), Vector256.Multiply(v4, Vector256.Load(pd + 4 * l + j)));
                        var s5 = Vector256.FusedMultiplyAdd(v7, Vector256.Load(pd + 7 * l + j), Vector256.Multiply(v6, Vector256.Load(pd + 6 * l + j)));
                        (s + ((s2 + s3) + (s4 + s5))).Store(g + j);
                    }
                    for (; j < l; j++)
                    {
                        double s2 = pd[i] * pd[j] + pd[l + i] * pd[l + j];
                        double s3 = pd[2 * l + i] * pd[2 * l + j] + pd[3 * l + i] * pd[3 * l + j];
                        double s4 = pd[4 * l + i] * pd[4 * l + j] + pd[5 * l + i] * pd[5 * l + j];
                        double s5 = pd[6 * l + i] * pd[6 * l + j] + pd[7 * l + i] * pd[7 * l + j];
                        g[j] += (s2 + s3) + (s4 + s5);
                    }
                }
            }
        }
        for (; row < end; row++)
        {
            Widen(y, row, l, d.AsSpan(0, l));
            for (int i = 0; i < l; i++)
            {
                double a0 = d[i];
                for (int j = i; j < l; j++) acc[(long)i * l + j] += a0 * d[j];
            }
        }
    }

    /// <summary>Scalar reference of <see cref="GramRange"/> (tests): plain double sums, row by row.</summary>
    internal static void GramRangeScalar(float[] y, int start, int end, int l, double[] acc)
    {
        for (int row = start; row < end; row++)
            for (int i = 0; i < l; i++)
                for (int j = i; j < l; j++) acc[(long)i * l + j] += (double)y[(long)row * l + i] * y[(long)row * l + j];
    }

    private static void Widen(float[] y, int row, int l, Span<double> d)
    {
        var src = y.AsSpan((int)((long)row * l), l);
        for (int i = 0; i < l; i++) d[i] = src[i];
    }

    /// <summary>Makes each component's sign reproducible: the entry of V's column with the largest magnitude is positive.</summary>
    private static void FixSigns(float[] u, int m, float[] v, int n, int k)
    {
        for (int j = 0; j < k; j++)
        {
            float best = 0;
            for (int i = 0; i < n; i++) { float x = v[(long)i * k + j]; if (Math.Abs(x) > Math.Abs(best)) best = x; }
            if (best >= 0) continue;
            for (int i = 0; i < n; i++) v[(long)i * k + j] = -v[(long)i * k + j];
            for (int i = 0; i < m; i++) u[(long)i * k + j] = -u[(long)i * k + j];
        }
    }
}

/// <summary>Seeded standard normal numbers: xoshiro256** (Blackman &amp; Vigna 2021, "Scrambled linear pseudorandom
/// number generators", ACM TOMS 47(4)) seeded by SplitMix64, Box-Muller transform. Same sequence on every platform.</summary>
internal sealed class Gaussian
{
    private ulong _s0, _s1, _s2, _s3;

    public Gaussian(ulong seed)
    {
        ulong x = seed;
        _s0 = SplitMix(ref x); _s1 = SplitMix(ref x); _s2 = SplitMix(ref x); _s3 = SplitMix(ref x);
    }

    private static ulong SplitMix(ref ulong x)
    {
        ulong z = x += 0x9E3779B97F4A7C15UL;
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    public ulong NextUInt64()
    {
        ulong result = System.Numerics.BitOperations.RotateLeft(_s1 * 5, 7) * 9;
        ulong t = _s1 << 17;
        _s2 ^= _s0; _s3 ^= _s1; _s1 ^= _s2; _s0 ^= _s3; _s2 ^= t;
        _s3 = System.Numerics.BitOperations.RotateLeft(_s3, 45);
        return result;
    }

    /// <summary>Uniform in (0, 1].</summary>
    public double NextUnit() => ((NextUInt64() >> 11) + 1) * (1.0 / (1UL << 53));

    public void Fill(Span<float> values)
    {
        int i = 0;
        for (; i + 2 <= values.Length; i += 2)
        {
            double r = Math.Sqrt(-2 * Math.Log(NextUnit())), t = 2 * Math.PI * NextUnit();
            values[i] = (float)(r * Math.Cos(t));
            values[i + 1] = (float)(r * Math.Sin(t));
        }
        if (i < values.Length) values[i] = (float)(Math.Sqrt(-2 * Math.Log(NextUnit())) * Math.Cos(2 * Math.PI * NextUnit()));
    }
}
