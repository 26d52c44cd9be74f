using System.Buffers;

namespace SenseSplit.Core.Linalg;

/// <summary>
/// A register-blocked micro-kernel: C[0..MR, 0..NR] (=|+=) Σ_{p&lt;kc} A[r, p]·Bp[p, 0..NR], where A's MR rows start
/// lda floats apart and Bp is a packed panel stored [kc][NR]. Implementations are structs, so the generic driver
/// is compiled once per path with direct calls; kernels are not inlined, so their accumulators own the registers.
/// </summary>
internal unsafe interface IGemmMicroKernel
{
    static abstract int MR { get; }
    static abstract int NR { get; }

    /// <summary><see cref="RunEdge"/> writes ⌈cols/EdgeStep⌉·EdgeStep columns of the tile.</summary>
    static abstract int EdgeStep { get; }

    static abstract void Run(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate);

    /// <summary>The same product for a panel of which only the first <paramref name="cols"/> columns exist: skips
    /// whole vectors past them. Each element's multiply-add chain is the one <see cref="Run"/> computes.</summary>
    static abstract void RunEdge(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate, int cols);
}

/// <summary>Pointers and shapes of one product C = A·Bᵀ (see <see cref="Gemm"/>); pinned by the caller.</summary>
internal readonly unsafe struct GemmJob(float* a, int lda, int m, float* b, int ldb, int n, int k, float* c, int ldc)
{
    public readonly float* A = a, B = b, C = c;
    public readonly int Lda = lda, Ldb = ldb, Ldc = ldc, M = m, N = n, K = k;
}

/// <summary>
/// The blocked loop nest around a micro-kernel (Goto and van de Geijn 2008; Van Zee and van de Geijn 2015):
/// B is packed once into [k][NR] panels shared by all workers; each worker owns a fixed rectangle of C (a share of
/// the rows, or of the columns when C is wider than tall) and walks it as NC-column blocks → KC-deep slices of k →
/// MR-row slivers of A → NR-column panels of B.
/// </summary>
internal static unsafe class GemmDriver<TKernel> where TKernel : struct, IGemmMicroKernel
{
    /// <summary>Deepest k-slice: 512 keeps k = 300 (the embedding width) in one slice, so C is written once.</summary>
    internal const int KcMax = 512;

    /// <summary>
    /// Columns per block. Measured on the 2-core EPYC (see docs/performance.md): a block that fits L2 (512 columns)
    /// was slower than 2048 columns streamed from L3, because every block re-reads all of A; 2048 covers the 2000
    /// atoms in one block, and a packed 2048×300 block (2.4 MB) sits in L3.
    /// </summary>
    internal const int NcBlock = 2048;

    /// <summary>Below this many multiply-adds one worker is faster than waking a second (results are the same).</summary>
    private const long SerialBelow = 1L << 20;

    /// <param name="lowerTriangle">A·Aᵀ: compute only tiles that reach the diagonal or below it, then copy the lower
    /// triangle onto the upper one (A and B are the same matrix, so the copies are the values the tiles would give).</param>
    public static void Run(in GemmJob job, int threads, bool lowerTriangle = false)
    {
        int mr = TKernel.MR, nr = TKernel.NR;
        int m = job.M, n = job.N, k = job.K;
        int rowUnits = (m + mr - 1) / mr, colUnits = (n + nr - 1) / nr;
        bool byRows = lowerTriangle || rowUnits >= colUnits;
        int units = byRows ? rowUnits : colUnits;
        int parts = (long)m * n * k < SerialBelow ? 1 : Math.Max(1, Math.Min(threads, units));

        long packLength = (long)colUnits * nr * k;
        if (packLength > Array.MaxLength)
            throw new ArgumentException($"B ({n}×{k}) is too large to pack ({packLength} floats)");
        float[] pack = ArrayPool<float>.Shared.Rent((int)packLength);
        try
        {
            fixed (float* packed = pack)
            {
                var local = job;
                nint bp = (nint)packed;
                if (parts == 1)
                {
                    PackB(local, (float*)bp, 0, colUnits);
                    Block(local, (float*)bp, 0, m, 0, n, lowerTriangle);
                    if (lowerTriangle) MirrorLower(local, 0, (m + MirrorBlock - 1) / MirrorBlock);
                }
                else
                {
                    var options = new ParallelOptions { MaxDegreeOfParallelism = parts };
                    Parallel.For(0, parts, options, part =>
                        PackB(local, (float*)bp, Share(colUnits, parts, part), Share(colUnits, parts, part + 1)));
                    Parallel.For(0, parts, options, part =>
                    {
                        int u0 = Share(units, parts, part, lowerTriangle), u1 = Share(units, parts, part + 1, lowerTriangle);
                        if (byRows) Block(local, (float*)bp, u0 * mr, Math.Min(m, u1 * mr), 0, n, lowerTriangle);
                        else Block(local, (float*)bp, 0, m, u0 * nr, Math.Min(n, u1 * nr), false);
                    });
                    if (lowerTriangle)
                    {
                        int blocks = (m + MirrorBlock - 1) / MirrorBlock;
                        Parallel.For(0, parts, options, part =>
                            MirrorLower(local, Share(blocks, parts, part, true), Share(blocks, parts, part + 1, true)));
                    }
                }
            }
        }
        finally
        {
            ArrayPool<float>.Shared.Return(pack);
        }
    }

    /// <summary>First unit of share <paramref name="part"/> when <paramref name="units"/> are cut into equal shares.</summary>
    private static int Share(int units, int parts, int part) => (int)((long)units * part / parts);

    /// <summary>First unit of share <paramref name="part"/>; for a triangle, unit u costs ∝ u + 1, so shares of
    /// equal area start at units·√(part/parts).</summary>
    private static int Share(int units, int parts, int part, bool triangle)
        => triangle ? (part >= parts ? units : (int)Math.Round(units * Math.Sqrt((double)part / parts))) : Share(units, parts, part);

    /// <summary>Rows per mirror block: 16 floats = one cache line and one zmm register.</summary>
    private const int MirrorBlock = 16;

    /// <summary>
    /// C[j, i] = C[i, j] for j &lt; i, for the rows of 16-row blocks b0..b1-1: every 16×16 block below the diagonal
    /// is transposed onto its mirror image (whole cache lines in and out; AVX-512 in registers, else scalar), and
    /// the diagonal block copies its strictly lower part.
    /// </summary>
    private static void MirrorLower(in GemmJob job, int b0, int b1)
    {
        const int w = MirrorBlock;
        float* c = job.C;
        long ldc = job.Ldc;
        int m = job.M;
        for (int bi = b0; bi < b1; bi++)
        {
            int i = bi * w, rows = Math.Min(w, m - i);
            for (int j = 0; j < i; j += w)
            {
                if (rows == w && GemmTranspose.IsSupported)
                {
                    GemmTranspose.Transpose16(c + i * ldc + j, ldc, c + j * ldc + i, ldc);
                    continue;
                }
                for (int s = 0; s < w; s++)
                    for (int r = 0; r < rows; r++) c[(j + s) * ldc + i + r] = c[(i + r) * ldc + j + s];
            }
            for (int r = 1; r < rows; r++)
                for (int s = 0; s < r; s++) c[(i + s) * ldc + i + r] = c[(i + r) * ldc + i + s];
        }
    }

    /// <summary>Packs B rows into panels q0..q1: panel q holds rows q·NR.. as [k][NR], zero-padded past row n;
    /// 16×16 blocks go through the in-register transpose when NR is a multiple of 16.</summary>
    private static void PackB(in GemmJob job, float* packed, int q0, int q1)
    {
        int nr = TKernel.NR, k = job.K;
        bool blocks = nr % 16 == 0 && GemmTranspose.IsSupported;
        for (int q = q0; q < q1; q++)
        {
            float* dst = packed + (long)q * nr * k;
            int rows = Math.Min(nr, job.N - q * nr);
            int r0 = 0;
            if (blocks)
            {
                for (; r0 + 16 <= rows; r0 += 16)
                {
                    float* src = job.B + (long)(q * nr + r0) * job.Ldb;
                    int p = 0;
                    for (; p + 16 <= k; p += 16) GemmTranspose.Transpose16(src + p, job.Ldb, dst + p * nr + r0, nr);
                    for (; p < k; p++)
                        for (int r = 0; r < 16; r++) dst[p * nr + r0 + r] = src[r * job.Ldb + p];
                }
            }
            for (int r = r0; r < rows; r++)
            {
                float* src = job.B + (long)(q * nr + r) * job.Ldb;
                for (int p = 0; p < k; p++) dst[p * nr + r] = src[p];
            }
            for (int r = rows; r < nr; r++)
                for (int p = 0; p < k; p++) dst[p * nr + r] = 0f;
        }
    }

    /// <summary>Computes C[i0..i1, j0..j1]; i0 is a multiple of MR (or 0) and j0 a multiple of NR.</summary>
    private static void Block(in GemmJob job, float* packed, int i0, int i1, int j0, int j1, bool lowerTriangle)
    {
        int mr = TKernel.MR, nr = TKernel.NR, k = job.K;
        // k-slices depend on k only, so the summation order of every element is fixed (see Gemm remarks).
        int slices = (k + KcMax - 1) / KcMax;
        int kcFull = (k + slices - 1) / slices;
        float* edgeA = stackalloc float[mr * kcFull];
        float* edgeC = stackalloc float[mr * nr];
        for (int jc = j0; jc < j1; jc += NcBlock)
        {
            int jcEnd = Math.Min(jc + NcBlock, j1);
            for (int p0 = 0; p0 < k; p0 += kcFull)
            {
                int kc = Math.Min(kcFull, k - p0);
                bool accumulate = p0 > 0;
                for (int i = i0; i < i1; i += mr)
                {
                    int rows = Math.Min(mr, i1 - i);
                    float* ap = job.A + (long)i * job.Lda + p0;
                    nint lda = job.Lda;
                    if (rows < mr)
                    {
                        // Partial sliver: copy the rows that exist, zero the rest (their products are discarded).
                        for (int r = 0; r < mr; r++)
                            for (int p = 0; p < kc; p++)
                                edgeA[r * kc + p] = r < rows ? ap[r * lda + p] : 0f;
                        ap = edgeA;
                        lda = kc;
                    }
                    for (int j = jc; j < jcEnd; j += nr)
                    {
                        if (lowerTriangle && j >= i + rows) break; // this tile and the rest lie above the diagonal
                        int cols = Math.Min(nr, jcEnd - j);
                        float* bp = packed + (long)(j / nr) * nr * k + (long)p0 * nr;
                        float* cp = job.C + (long)i * job.Ldc + j;
                        if (rows == mr && cols == nr)
                        {
                            TKernel.Run(ap, lda, bp, kc, cp, job.Ldc, accumulate);
                            continue;
                        }
                        if (rows == mr && cols % TKernel.EdgeStep == 0)
                        {
                            TKernel.RunEdge(ap, lda, bp, kc, cp, job.Ldc, accumulate, cols);
                            continue;
                        }
                        // Edge tile: run the full kernel on a scratch tile and copy back the part that exists.
                        if (accumulate)
                            for (int r = 0; r < rows; r++)
                                for (int s = 0; s < cols; s++) edgeC[r * nr + s] = cp[r * job.Ldc + s];
                        TKernel.RunEdge(ap, lda, bp, kc, edgeC, nr, accumulate, cols);
                        for (int r = 0; r < rows; r++)
                            for (int s = 0; s < cols; s++) cp[r * job.Ldc + s] = edgeC[r * nr + s];
                    }
                }
            }
        }
    }
}
