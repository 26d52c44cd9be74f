using System.Runtime.CompilerServices;

namespace SenseSplit.Core.Linalg;

/// <summary>
/// Portable micro-kernel in plain scalar arithmetic: a 4×4 tile of C in 16 register accumulators. Runs on any CPU;
/// multiplies and adds are separate operations (no fused multiply-add), so it rounds differently from the SIMD paths.
/// </summary>
internal unsafe struct ScalarMicroKernel : IGemmMicroKernel
{
    public static int MR => 4;
    public static int NR => 4;
    public static int EdgeStep => 4;

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    public static void Run(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        float c00 = 0, c01 = 0, c02 = 0, c03 = 0, c10 = 0, c11 = 0, c12 = 0, c13 = 0;
        float c20 = 0, c21 = 0, c22 = 0, c23 = 0, c30 = 0, c31 = 0, c32 = 0, c33 = 0;
        float* a0 = a, a1 = a + lda, a2 = a + 2 * lda, a3 = a + 3 * lda;
        for (int p = 0; p < kc; p++)
        {
            float b0 = bp[0], b1 = bp[1], b2 = bp[2], b3 = bp[3];
            float x = a0[p];
            c00 += x * b0; c01 += x * b1; c02 += x * b2; c03 += x * b3;
            x = a1[p];
            c10 += x * b0; c11 += x * b1; c12 += x * b2; c13 += x * b3;
            x = a2[p];
            c20 += x * b0; c21 += x * b1; c22 += x * b2; c23 += x * b3;
            x = a3[p];
            c30 += x * b0; c31 += x * b1; c32 += x * b2; c33 += x * b3;
            bp += 4;
        }
        if (!accumulate)
        {
            c[0] = c00; c[1] = c01; c[2] = c02; c[3] = c03;
            c += ldc; c[0] = c10; c[1] = c11; c[2] = c12; c[3] = c13;
            c += ldc; c[0] = c20; c[1] = c21; c[2] = c22; c[3] = c23;
            c += ldc; c[0] = c30; c[1] = c31; c[2] = c32; c[3] = c33;
            return;
        }
        c[0] += c00; c[1] += c01; c[2] += c02; c[3] += c03;
        c += ldc; c[0] += c10; c[1] += c11; c[2] += c12; c[3] += c13;
        c += ldc; c[0] += c20; c[1] += c21; c[2] += c22; c[3] += c23;
        c += ldc; c[0] += c30; c[1] += c31; c[2] += c32; c[3] += c33;
    }

    public static void RunEdge(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate, int cols)
        => Run(a, lda, bp, kc, c, ldc, accumulate);
}
