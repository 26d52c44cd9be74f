using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SenseSplit.Core.Linalg;

/// <summary>AVX2+FMA micro-kernel: 6×16 tile of C in 12 ymm accumulators (16 ymm registers in all).</summary>
internal unsafe struct Avx2MicroKernel : IGemmMicroKernel
{
    public static bool IsSupported => Avx2.IsSupported && Fma.IsSupported;
    public static int MR => 6;
    public static int NR => 16;
    public static int EdgeStep => 8;

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    public static void Run(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector256<float>.Zero; var c01 = Vector256<float>.Zero;
        var c10 = Vector256<float>.Zero; var c11 = Vector256<float>.Zero;
        var c20 = Vector256<float>.Zero; var c21 = Vector256<float>.Zero;
        var c30 = Vector256<float>.Zero; var c31 = Vector256<float>.Zero;
        var c40 = Vector256<float>.Zero; var c41 = Vector256<float>.Zero;
        var c50 = Vector256<float>.Zero; var c51 = Vector256<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector256.Load(bp); var b1 = Vector256.Load(bp + 8);
            var x0 = Vector256.Create(a0[p]);
            c00 = Fma.MultiplyAdd(x0, b0, c00); c01 = Fma.MultiplyAdd(x0, b1, c01);
            var x1 = Vector256.Create(a1[p]);
            c10 = Fma.MultiplyAdd(x1, b0, c10); c11 = Fma.MultiplyAdd(x1, b1, c11);
            var x2 = Vector256.Create(a2[p]);
            c20 = Fma.MultiplyAdd(x2, b0, c20); c21 = Fma.MultiplyAdd(x2, b1, c21);
            var x3 = Vector256.Create(a3[p]);
            c30 = Fma.MultiplyAdd(x3, b0, c30); c31 = Fma.MultiplyAdd(x3, b1, c31);
            var x4 = Vector256.Create(a4[p]);
            c40 = Fma.MultiplyAdd(x4, b0, c40); c41 = Fma.MultiplyAdd(x4, b1, c41);
            var x5 = Vector256.Create(a5[p]);
            c50 = Fma.MultiplyAdd(x5, b0, c50); c51 = Fma.MultiplyAdd(x5, b1, c51);
            bp += 16;
        }
        if (accumulate)
        {
            Acc(c, c00); Acc(c + 8, c01);
            Acc(c + 1 * ldc, c10); Acc(c + 1 * ldc + 8, c11);
            Acc(c + 2 * ldc, c20); Acc(c + 2 * ldc + 8, c21);
            Acc(c + 3 * ldc, c30); Acc(c + 3 * ldc + 8, c31);
            Acc(c + 4 * ldc, c40); Acc(c + 4 * ldc + 8, c41);
            Acc(c + 5 * ldc, c50); Acc(c + 5 * ldc + 8, c51);
        }
        else
        {
            c00.Store(c); c01.Store(c + 8);
            c10.Store(c + 1 * ldc); c11.Store(c + 1 * ldc + 8);
            c20.Store(c + 2 * ldc); c21.Store(c + 2 * ldc + 8);
            c30.Store(c + 3 * ldc); c31.Store(c + 3 * ldc + 8);
            c40.Store(c + 4 * ldc); c41.Store(c + 4 * ldc + 8);
            c50.Store(c + 5 * ldc); c51.Store(c + 5 * ldc + 8);
        }
    }

    /// <summary>Edge panel: only the first <paramref name="cols"/> (&lt; 16) columns exist; computes the MR×⌈cols/8⌉·8 tile from the same packed [kc][16] panel.</summary>
    public static void RunEdge(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate, int cols)
    {
        switch ((cols + 7) / 8)
        {
            case 1: Run8(a, lda, bp, kc, c, ldc, accumulate); break;
            default: Run(a, lda, bp, kc, c, ldc, accumulate); break;
        }
    }

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static void Run8(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector256<float>.Zero;
        var c10 = Vector256<float>.Zero;
        var c20 = Vector256<float>.Zero;
        var c30 = Vector256<float>.Zero;
        var c40 = Vector256<float>.Zero;
        var c50 = Vector256<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector256.Load(bp);
            var x0 = Vector256.Create(a0[p]);
            c00 = Fma.MultiplyAdd(x0, b0, c00);
            var x1 = Vector256.Create(a1[p]);
            c10 = Fma.MultiplyAdd(x1, b0, c10);
            var x2 = Vector256.Create(a2[p]);
            c20 = Fma.MultiplyAdd(x2, b0, c20);
            var x3 = Vector256.Create(a3[p]);
            c30 = Fma.MultiplyAdd(x3, b0, c30);
            var x4 = Vector256.Create(a4[p]);
            c40 = Fma.MultiplyAdd(x4, b0, c40);
            var x5 = Vector256.Create(a5[p]);
            c50 = Fma.MultiplyAdd(x5, b0, c50);
            bp += 16;
        }
        if (accumulate)
        {
            Acc(c, c00);
            Acc(c + 1 * ldc, c10);
            Acc(c + 2 * ldc, c20);
            Acc(c + 3 * ldc, c30);
            Acc(c + 4 * ldc, c40);
            Acc(c + 5 * ldc, c50);
        }
        else
        {
            c00.Store(c);
            c10.Store(c + 1 * ldc);
            c20.Store(c + 2 * ldc);
            c30.Store(c + 3 * ldc);
            c40.Store(c + 4 * ldc);
            c50.Store(c + 5 * ldc);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Acc(float* c, Vector256<float> v) => (Vector256.Load(c) + v).Store(c);
}
