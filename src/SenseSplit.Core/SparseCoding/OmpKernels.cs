using System.Runtime.Intrinsics;

namespace SenseSplit.Core.SparseCoding;

/// <summary>Inner kernels of <see cref="BatchOmp"/>: SIMD versions with their scalar twins (the tests' reference).</summary>
internal static unsafe class OmpKernels
{
    /// <summary>
    /// Selection step of Batch-OMP: with the residual correlations α = α⁰ − Σ_r γ_r G_{I_r,:} (Rubinstein, Zibulevsky
    /// and Elad 2008, Algorithm 2, "α ← α⁰ − β"), returns argmax_k |α_k| (the first index on ties) and writes |α_k| to
    /// <paramref name="bestAbs"/>. α is never stored: one pass over the atoms reads α⁰ and the selected Gram rows and
    /// keeps a running maximum, instead of n + 1 passes (n row updates plus the arg-max). Each α_k is formed by fused
    /// multiply-adds in the order r = 0..n−1, identically in every path, so all paths return the same index.
    /// </summary>
    /// <param name="alpha0">α⁰, length atomCount.</param>
    /// <param name="rows">Pointers to the n selected rows of G (each of length atomCount).</param>
    /// <param name="negGamma">−γ_r as float, length n.</param>
    public static int ArgMaxAbsUpdated(float* alpha0, int atomCount, float** rows, float* negGamma, int n, out float bestAbs)
    {
        if (Vector512.IsHardwareAccelerated && atomCount >= Vector512<float>.Count)
            return ArgMaxAbsUpdated512(alpha0, atomCount, rows, negGamma, n, out bestAbs);
        if (Vector256.IsHardwareAccelerated && atomCount >= Vector256<float>.Count)
            return ArgMaxAbsUpdated256(alpha0, atomCount, rows, negGamma, n, out bestAbs);
        return ArgMaxAbsUpdatedScalar(alpha0, atomCount, rows, negGamma, n, out bestAbs, 0, -1, -1f);
    }

    /// <summary>Scalar twin of <see cref="ArgMaxAbsUpdated"/> over atoms [start, atomCount), continuing from a running
    /// best (<paramref name="best"/>, <paramref name="bestValue"/>; −1 for none).</summary>
    public static int ArgMaxAbsUpdatedScalar(float* alpha0, int atomCount, float** rows, float* negGamma, int n,
        out float bestAbs, int start, int best, float bestValue)
    {
        for (int k = start; k < atomCount; k++)
        {
            float v = alpha0[k];
            for (int r = 0; r < n; r++) v = MathF.FusedMultiplyAdd(rows[r][k], negGamma[r], v);
            float a = MathF.Abs(v);
            if (a > bestValue) { bestValue = a; best = k; } // strict: the first index wins ties
        }
        bestAbs = bestValue;
        return best;
    }

    private static int ArgMaxAbsUpdated512(float* alpha0, int atomCount, float** rows, float* negGamma, int n, out float bestAbs)
    {
        const int W = 16; // Vector512<float>.Count
        // Two independent running maxima (indices ≡ lane mod 32 in the first, ≡ 16 + lane mod 32 in the second) so the
        // compare-and-select chains of consecutive vectors overlap.
        var bestA = Vector512.Create(-1f);
        var bestB = Vector512.Create(-1f);
        var idxBestA = Vector512<int>.Zero;
        var idxBestB = Vector512<int>.Zero;
        var idxA = Vector512<int>.Indices;
        var idxB = idxA + Vector512.Create(W);
        var step = Vector512.Create(2 * W);
        int end = atomCount - atomCount % (2 * W);
        for (int k = 0; k < end; k += 2 * W)
        {
            var va = Vector512.Load(alpha0 + k);
            var vb = Vector512.Load(alpha0 + k + W);
            for (int r = 0; r < n; r++)
            {
                var c = Vector512.Create(negGamma[r]);
                va = Vector512.FusedMultiplyAdd(Vector512.Load(rows[r] + k), c, va);
                vb = Vector512.FusedMultiplyAdd(Vector512.Load(rows[r] + k + W), c, vb);
            }
            var aa = Vector512.Abs(va);
            var ab = Vector512.Abs(vb);
            var gta = Vector512.GreaterThan(aa, bestA);
            var gtb = Vector512.GreaterThan(ab, bestB);
            bestA = Vector512.ConditionalSelect(gta, aa, bestA);
            bestB = Vector512.ConditionalSelect(gtb, ab, bestB);
            idxBestA = Vector512.ConditionalSelect(gta.AsInt32(), idxA, idxBestA);
            idxBestB = Vector512.ConditionalSelect(gtb.AsInt32(), idxB, idxBestB);
            idxA += step;
            idxB += step;
        }
        // Each lane holds the first maximum of its residue class; the overall first maximum is the smallest index
        // among the lanes with the largest value.
        int bi = -1;
        float bv = -1f;
        for (int l = 0; l < W; l++)
        {
            Merge(bestA.GetElement(l), idxBestA.GetElement(l), ref bv, ref bi);
            Merge(bestB.GetElement(l), idxBestB.GetElement(l), ref bv, ref bi);
        }
        return ArgMaxAbsUpdatedScalar(alpha0, atomCount, rows, negGamma, n, out bestAbs, end, bi, bv);
    }

    private static void Merge(float v, int i, ref float bv, ref int bi)
    {
        if (v > bv || (v == bv && i < bi)) { bv = v; bi = i; }
    }

    private static int ArgMaxAbsUpdated256(float* alpha0, int atomCount, float** rows, float* negGamma, int n, out float bestAbs)
    {
        const int W = 8; // Vector256<float>.Count
        var best = Vector256.Create(-1f);
        var bestIdx = Vector256<int>.Zero;
        var idx = Vector256<int>.Indices;
        var step = Vector256.Create(W);
        int end = atomCount - atomCount % W;
        for (int k = 0; k < end; k += W)
        {
            var v = Vector256.Load(alpha0 + k);
            for (int r = 0; r < n; r++)
                v = Vector256.FusedMultiplyAdd(Vector256.Load(rows[r] + k), Vector256.Create(negGamma[r]), v);
            var a = Vector256.Abs(v);
            var gt = Vector256.GreaterThan(a, best);
            best = Vector256.ConditionalSelect(gt, a, best);
            bestIdx = Vector256.ConditionalSelect(gt.AsInt32(), idx, bestIdx);
            idx += step;
        }
        int bi = -1;
        float bv = -1f;
        for (int l = 0; l < W; l++) Merge(best.GetElement(l), bestIdx.GetElement(l), ref bv, ref bi);
        return ArgMaxAbsUpdatedScalar(alpha0, atomCount, rows, negGamma, n, out bestAbs, end, bi, bv);
    }

    /// <summary>Σ x_j² accumulated in double (SIMD: float lanes widened to double, four independent sums).</summary>
    public static double SquaredNorm(ReadOnlySpan<float> x)
    {
        int i = 0;
        double sum = 0;
        if (Vector256.IsHardwareAccelerated && x.Length >= 16)
        {
            fixed (float* p = x)
            {
                var s0 = Vector256<double>.Zero;
                var s1 = Vector256<double>.Zero;
                var s2 = Vector256<double>.Zero;
                var s3 = Vector256<double>.Zero;
                for (; i <= x.Length - 16; i += 16)
                {
                    var a = Vector256.Load(p + i);
                    var b = Vector256.Load(p + i + 8);
                    var (a0, a1) = Vector256.Widen(a);
                    var (b0, b1) = Vector256.Widen(b);
                    s0 = Vector256.FusedMultiplyAdd(a0, a0, s0);
                    s1 = Vector256.FusedMultiplyAdd(a1, a1, s1);
                    s2 = Vector256.FusedMultiplyAdd(b0, b0, s2);
                    s3 = Vector256.FusedMultiplyAdd(b1, b1, s3);
                }
                sum = Vector256.Sum((s0 + s1) + (s2 + s3));
            }
        }
        for (; i < x.Length; i++) sum += (double)x[i] * x[i];
        return sum;
    }

    /// <summary>Scalar twin of <see cref="SquaredNorm"/> (sequential double sum).</summary>
    public static double SquaredNormScalar(ReadOnlySpan<float> x)
    {
        double sum = 0;
        foreach (float v in x) sum += (double)v * v;
        return sum;
    }

    /// <summary>Which path <see cref="ArgMaxAbsUpdated"/> takes on this machine (for test names and benchmark output).</summary>
    public static string Path =>
        Vector512.IsHardwareAccelerated ? "Vector512" : Vector256.IsHardwareAccelerated ? "Vector256" : "scalar";

    /// <summary>Test hook: the 256-bit path even where 512-bit vectors exist.</summary>
    internal static int ArgMaxAbsUpdatedVector256(float* alpha0, int atomCount, float** rows, float* negGamma, int n, out float bestAbs)
        => Vector256.IsHardwareAccelerated && atomCount >= 8
            ? ArgMaxAbsUpdated256(alpha0, atomCount, rows, negGamma, n, out bestAbs)
            : ArgMaxAbsUpdatedScalar(alpha0, atomCount, rows, negGamma, n, out bestAbs, 0, -1, -1f);
}
