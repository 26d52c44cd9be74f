using System.Numerics.Tensors;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.SparseCoding;

/// <summary>
/// Sparse coding of many vectors over one dictionary: for every row x (1×dims) of the vectors matrix (rows×dims),
/// approximately solve  minimise ||x − Σ_k a_k d_k||²  subject to at most <c>sparsity</c> non-zero weights a_k, where
/// the atoms d_k are the unit rows of the dictionary (atomCount×dims).
/// </summary>
/// <remarks>
/// Method: Batch-OMP, Algorithm 2 of R. Rubinstein, M. Zibulevsky and M. Elad (2008), "Efficient implementation of the
/// K-SVD algorithm using batch orthogonal matching pursuit", Technion CS-2008-08. Orthogonal matching pursuit
/// (Pati, Rezaiifar and Krishnaprasad 1993) is run without forming residual vectors: with the Gram matrix G = D·Dᵀ
/// (atomCount×atomCount) and the initial correlations α⁰ = D·x (computed blockwise for many vectors at once through
/// <see cref="Gemm.MultiplyTransposed"/>), the correlations of the residual after selecting the support I with least-squares
/// weights γ_I are α = α⁰ − G_{:,I} γ_I, and γ_I solves G_II γ_I = α⁰_I through a Cholesky factor L of G_II that grows by one
/// row per selected atom (report §3, eq. 3.2–3.4).
/// Deviations: the report's stopping rule for a target error is replaced by two exact-arithmetic stops (linear dependence,
/// exactly representable vector, see the comments in <c>CodeOne</c>); the weights are kept in selection order.
/// Rows are coded in fixed blocks that do not depend on the thread count; the per-row arithmetic does not depend on which
/// worker runs a block, so results are bitwise identical for any <c>threads</c>.
/// </remarks>
public static class BatchOmp
{
    /// <summary>Codes each row of <paramref name="vectors"/> (rows×dims) with at most <paramref name="sparsity"/> atoms of
    /// <paramref name="atoms"/> (atomCount×dims, unit rows). <paramref name="gram"/> (atomCount×atomCount) is computed when null.</summary>
    public static CodingResult Encode(ReadOnlySpan<float> vectors, int rows, int dims, ReadOnlySpan<float> atoms, int atomCount,
        int sparsity, int threads = 0, float[]? gram = null)
        => Encode(vectors, rows, dims, atoms, atomCount, sparsity, CancellationToken.None, threads, gram);

    /// <summary>As <see cref="Encode(ReadOnlySpan{float}, int, int, ReadOnlySpan{float}, int, int, int, float[])"/>;
    /// <paramref name="cancellation"/> is honoured between blocks of rows.</summary>
    public static CodingResult Encode(ReadOnlySpan<float> vectors, int rows, int dims, ReadOnlySpan<float> atoms, int atomCount,
        int sparsity, CancellationToken cancellation, int threads = 0, float[]? gram = null)
    {
        Guard.NonNegative(rows);
        Guard.Positive(dims);
        Guard.Positive(atomCount);
        Guard.Positive(sparsity);
        Guard.AtMost(sparsity, atomCount, "atoms");
        Guard.AtMost(sparsity, dims, "dimensions");
        Guard.NonNegative(threads);
        Guard.Length(vectors.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        Guard.Length(atoms.Length, (long)atomCount * dims, $"atoms ({atomCount}×{dims})");
        Guard.Finite(vectors, dims, "vectors");
        Guard.Finite(atoms, dims, "atoms");
        CheckUnitRows(atoms, atomCount, dims);
        if (gram is not null)
        {
            Guard.Length(gram.Length, (long)atomCount * atomCount, $"Gram matrix ({atomCount}×{atomCount})");
            Guard.Finite(gram, atomCount, "Gram matrix");
        }
        else
        {
            gram = ComputeGram(atoms, atomCount, dims, threads);
        }

        var codes = new SparseCodes(rows, sparsity, new int[rows * sparsity], new float[rows * sparsity]);
        var residualNorms = new float[rows];
        EncodeInto(vectors, rows, dims, atoms, atomCount, sparsity, gram, codes.AtomIds, codes.Weights, residualNorms,
            threads, cancellation);
        return new CodingResult(codes, residualNorms);
    }

    /// <summary>G = D·Dᵀ (atomCount×atomCount) for unit atoms D (atomCount×dims).</summary>
    public static float[] ComputeGram(ReadOnlySpan<float> atoms, int atomCount, int dims, int threads = 0)
    {
        Guard.Positive(atomCount);
        Guard.Positive(dims);
        Guard.Length(atoms.Length, (long)atomCount * dims, $"atoms ({atomCount}×{dims})");
        var gram = new float[atomCount * atomCount];
        Gemm.MultiplyTransposed(atoms, atomCount, atoms, atomCount, dims, gram, threads);
        return gram;
    }

    /// <summary>Atoms must have unit length: OMP picks the atom of largest |correlation|, which is only the atom that
    /// reduces the residual most when all atoms have the same norm. 1e-3 allows for float rounding in the caller's
    /// normalisation of rows of up to millions of entries (relative rounding ~ 6e-8 · √dims).</summary>
    internal static void CheckUnitRows(ReadOnlySpan<float> atoms, int atomCount, int dims)
    {
        for (int k = 0; k < atomCount; k++)
        {
            double sq = 0;
            foreach (float v in atoms.Slice(k * dims, dims)) sq += (double)v * v;
            double norm = Math.Sqrt(sq);
            if (Math.Abs(norm - 1.0) > 1e-3)
                throw new ArgumentException(
                    $"atoms: row {k} has length {norm.ToString("G6", System.Globalization.CultureInfo.InvariantCulture)} (atoms must have unit length)",
                    nameof(atoms));
        }
    }

    /// <summary>Rows per correlation block. Depends on nothing but the row count, so the partition of the rows (and
    /// hence every bit of the result) is independent of the thread count. 1024 rows × 2000 atoms is 8 MB of
    /// correlations per worker.</summary>
    internal static int BlockRows(int rows) => Math.Clamp((rows + 7) / 8, 16, 1024);

    internal static int ResolveThreads(int threads) => threads == 0 ? Environment.ProcessorCount : threads;

    /// <summary>Trusted core of <see cref="Encode(ReadOnlySpan{float}, int, int, ReadOnlySpan{float}, int, int, int, float[])"/>:
    /// arguments already validated; writes codes and residual norms into the given arrays. <paramref name="scratch"/>
    /// (from <see cref="CreateScratch"/> for the same sizes) is reused when given, so repeated calls allocate nothing.</summary>
    internal static unsafe void EncodeInto(ReadOnlySpan<float> vectors, int rows, int dims, ReadOnlySpan<float> atoms,
        int atomCount, int sparsity, float[] gram, int[] atomIds, float[] weights, float[] residualNorms,
        int threads, CancellationToken cancellation, Scratch[]? scratch = null)
    {
        if (rows == 0) return;
        int blockRows = BlockRows(rows);
        int blocks = (rows + blockRows - 1) / blockRows;
        int workers = Math.Min(ResolveThreads(threads), blocks);
        scratch ??= CreateScratch(rows, dims, atomCount, sparsity, workers);
        fixed (float* xPtr = vectors)
        fixed (float* dPtr = atoms)
        {
            var job = new Job(xPtr, dPtr, rows, dims, atomCount, sparsity, gram, atomIds, weights, residualNorms, blockRows);
            int next = -1;
            void Work(int worker)
            {
                var own = scratch[worker];
                int b;
                while (!cancellation.IsCancellationRequested && (b = Interlocked.Increment(ref next)) < blocks)
                    job.CodeBlock(b, own);
            }
            if (workers <= 1) Work(0);
            else Parallel.For(0, workers, new ParallelOptions { MaxDegreeOfParallelism = workers }, Work);
        }
        cancellation.ThrowIfCancellationRequested();
    }

    /// <summary>One scratch set per worker for coding <paramref name="rows"/> rows with <paramref name="threads"/> workers.</summary>
    internal static Scratch[] CreateScratch(int rows, int dims, int atomCount, int sparsity, int threads)
    {
        int blockRows = BlockRows(Math.Max(rows, 1));
        int workers = Math.Max(1, Math.Min(ResolveThreads(threads), (rows + blockRows - 1) / blockRows));
        var pool = new Scratch[workers];
        for (int w = 0; w < workers; w++) pool[w] = new Scratch(blockRows, atomCount, sparsity, dims);
        return pool;
    }

    /// <summary>Per-worker scratch, allocated once per call and reused for every block and row.</summary>
    internal sealed class Scratch
    {
        public readonly float[] Correlations; // blockRows×atomCount: α⁰ of each row of the block
        public readonly float[] NegGamma;     // sparsity: −γ_I as float for the selection kernel
        public readonly nint[] RowPointers;   // sparsity: addresses of the selected rows of G
        public readonly double[] Chol;        // sparsity×sparsity lower-triangular L with L·Lᵀ = G_II
        public readonly double[] Gamma;       // sparsity: least-squares weights γ_I
        public readonly double[] Work;        // sparsity: w = L⁻¹ G_{I,k}, then the forward-substitution result
        public readonly int[] Support;        // sparsity: selected atoms, in selection order
        public readonly float[] Residual;     // dims: x − D_I γ_I for the exact residual norm

        public Scratch(int blockRows, int atomCount, int sparsity, int dims)
        {
            Correlations = new float[blockRows * atomCount];
            NegGamma = new float[sparsity];
            RowPointers = new nint[sparsity];
            Chol = new double[sparsity * sparsity];
            Gamma = new double[sparsity];
            Work = new double[sparsity];
            Support = new int[sparsity];
            Residual = new float[dims];
        }
    }

    internal sealed unsafe class Job(float* x, float* d, int rows, int dims, int atomCount, int sparsity, float[] gram,
        int[] atomIds, float[] weights, float[] residualNorms, int blockRows)
    {
        /// <summary>Stop on linear dependence when the new atom's squared distance to the span of the selected atoms,
        /// G_kk − wᵀw with w = L⁻¹ G_{I,k} (the new diagonal entry of L squared), is at most this. For unit atoms that is an
        /// angle below 1e-3 rad; the float Gram entries carry ~1e-7 rounding, so a smaller value could not be trusted
        /// and the Cholesky factor would become ill-conditioned (condition number ~ 1/√threshold).</summary>
        internal const double DependenceThreshold = 1e-6;

        /// <summary>Stop when the residual energy ε = ||x||² − γᵀα⁰_I is at most this times ||x||². ε comes from a
        /// difference of two numbers of size ||x||² built from float correlations, so its own rounding is ~1e-7·||x||²;
        /// below 1e-6·||x||² (relative residual norm 1e-3) the vector counts as exactly representable and further atoms
        /// would only fit rounding noise.</summary>
        internal const double ExactThreshold = 1e-6;

        public void CodeBlock(int block, Scratch s)
        {
            int first = block * blockRows;
            int count = Math.Min(blockRows, rows - first);
            var xs = new ReadOnlySpan<float>(x + (long)first * dims, count * dims);
            var ds = new ReadOnlySpan<float>(d, atomCount * dims);
            var corr = s.Correlations.AsSpan(0, count * atomCount);
            // α⁰ = D·x for every row of the block at once (Rubinstein et al. 2008, §3: the batch step).
            Gemm.MultiplyTransposed(xs, count, ds, atomCount, dims, corr, threads: 1);
            for (int r = 0; r < count; r++)
                CodeOne(first + r, corr.Slice(r * atomCount, atomCount), s);
        }

        /// <summary>Batch-OMP for one row given its correlations α⁰ (Rubinstein et al. 2008, Algorithm 2).</summary>
        public void CodeOne(int row, ReadOnlySpan<float> alpha0, Scratch s)
        {
            var xRow = new ReadOnlySpan<float>(x + (long)row * dims, dims);
            var ids = atomIds.AsSpan(row * sparsity, sparsity);
            var ws = weights.AsSpan(row * sparsity, sparsity);
            ids.Fill(-1);
            ws.Clear();

            double xx = OmpKernels.SquaredNorm(xRow);
            if (xx == 0) { residualNorms[row] = 0; return; } // zero row: empty code, zero residual

            var L = s.Chol;
            var gamma = s.Gamma;
            var w = s.Work;
            var support = s.Support;
            int n = 0;
            fixed (float* g = gram)
            fixed (float* a0 = alpha0)
            fixed (float* negGamma = s.NegGamma)
            fixed (nint* rowPtrs = s.RowPointers)
            {
                float** rowsOfG = (float**)rowPtrs;
                while (n < sparsity)
                {
                    // k = argmax |α| with α = α⁰ − G_{:,I} γ_I (report eq. 3.4), fused into one pass (OmpKernels);
                    // G is symmetric, so column I_r is the contiguous row I_r.
                    int k = OmpKernels.ArgMaxAbsUpdated(a0, atomCount, rowsOfG, negGamma, n, out float bestAbs);
                    // All residual correlations zero: the residual is orthogonal to every atom, nothing left to fit.
                    // In exact arithmetic α_I = 0; if a selected atom still wins, every |α_k| is at rounding level.
                    if (bestAbs == 0f || support[..n].Contains(k)) break;
                    double gkk = g[(long)k * atomCount + k];
                    if (n == 0)
                    {
                        L[0] = Math.Sqrt(gkk);
                    }
                    else
                    {
                        // Progressive Cholesky (report eq. 3.3): solve L w = G_{I,k}; the new row of L is
                        // [wᵀ, √(G_kk − wᵀw)]. G_{I_r,k} is read as G_{k,I_r} (symmetry): one row, already cached.
                        float* gk = g + (long)k * atomCount;
                        double ww = 0;
                        for (int r = 0; r < n; r++)
                        {
                            double sum = gk[support[r]];
                            for (int c = 0; c < r; c++) sum -= L[r * sparsity + c] * w[c];
                            w[r] = sum / L[r * sparsity + r];
                            ww += w[r] * w[r];
                        }
                        double diag2 = gkk - ww;
                        // Linear dependence: d_k (almost) lies in the span of the selected atoms; adding it would make
                        // G_II singular. Stop with the current support (see DependenceThreshold).
                        if (diag2 <= DependenceThreshold * gkk) break;
                        for (int c = 0; c < n; c++) L[n * sparsity + c] = w[c];
                        L[n * sparsity + n] = Math.Sqrt(diag2);
                    }
                    support[n] = k;
                    rowsOfG[n] = g + (long)k * atomCount;
                    n++;

                    // γ_I solves L Lᵀ γ = α⁰_I: forward substitution into w, then back substitution into γ.
                    for (int r = 0; r < n; r++)
                    {
                        double sum = a0[support[r]];
                        for (int c = 0; c < r; c++) sum -= L[r * sparsity + c] * w[c];
                        w[r] = sum / L[r * sparsity + r];
                    }
                    for (int r = n - 1; r >= 0; r--)
                    {
                        double sum = w[r];
                        for (int c = r + 1; c < n; c++) sum -= L[c * sparsity + r] * gamma[c];
                        gamma[r] = sum / L[r * sparsity + r];
                    }
                    if (n == sparsity) break;

                    // Residual energy: ||x − D_I γ||² = ||x||² − γᵀα⁰_I because G_II γ = α⁰_I (normal equations).
                    double fit = 0;
                    for (int r = 0; r < n; r++) fit += gamma[r] * a0[support[r]];
                    if (xx - fit <= ExactThreshold * xx) break; // exactly representable (see ExactThreshold)
                    for (int r = 0; r < n; r++) negGamma[r] = (float)-gamma[r];
                }
            }

            // Exact residual norm from the residual vector itself (the energy formula above loses precision when the
            // fit is good): r = x − Σ γ_r d_{I_r}, accumulated in double.
            var res = s.Residual.AsSpan();
            xRow.CopyTo(res);
            for (int r = 0; r < n; r++)
            {
                ids[r] = support[r];
                ws[r] = (float)gamma[r];
                TensorPrimitives.MultiplyAdd(new ReadOnlySpan<float>(d + (long)support[r] * dims, dims), -ws[r], res, res);
            }
            residualNorms[row] = (float)Math.Sqrt(OmpKernels.SquaredNorm(res));
        }
    }
}
