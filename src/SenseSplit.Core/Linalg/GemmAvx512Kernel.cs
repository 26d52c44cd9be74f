using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SenseSplit.Core.Linalg;

/// <summary>AVX-512 micro-kernel: 6×64 tile of C in 24 zmm accumulators; per k step 4 panel loads, 6 broadcasts, 24 FMAs.</summary>
internal unsafe struct Avx512MicroKernel : IGemmMicroKernel
{
    public static bool IsSupported => Avx512F.IsSupported;
    public static int MR => 6;
    public static int NR => 64;
    public static int EdgeStep => 16;

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    public static void Run(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector512<float>.Zero; var c01 = Vector512<float>.Zero; var c02 = Vector512<float>.Zero; var c03 = Vector512<float>.Zero;
        var c10 = Vector512<float>.Zero; var c11 = Vector512<float>.Zero; var c12 = Vector512<float>.Zero; var c13 = Vector512<float>.Zero;
        var c20 = Vector512<float>.Zero; var c21 = Vector512<float>.Zero; var c22 = Vector512<float>.Zero; var c23 = Vector512<float>.Zero;
        var c30 = Vector512<float>.Zero; var c31 = Vector512<float>.Zero; var c32 = Vector512<float>.Zero; var c33 = Vector512<float>.Zero;
        var c40 = Vector512<float>.Zero; var c41 = Vector512<float>.Zero; var c42 = Vector512<float>.Zero; var c43 = Vector512<float>.Zero;
        var c50 = Vector512<float>.Zero; var c51 = Vector512<float>.Zero; var c52 = Vector512<float>.Zero; var c53 = Vector512<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector512.Load(bp); var b1 = Vector512.Load(bp + 16); var b2 = Vector512.Load(bp + 32); var b3 = Vector512.Load(bp + 48);
            var x0 = Vector512.Create(a0[p]);
            c00 = Avx512F.FusedMultiplyAdd(x0, b0, c00); c01 = Avx512F.FusedMultiplyAdd(x0, b1, c01); c02 = Avx512F.FusedMultiplyAdd(x0, b2, c02); c03 = Avx512F.FusedMultiplyAdd(x0, b3, c03);
            var x1 = Vector512.Create(a1[p]);
            c10 = Avx512F.FusedMultiplyAdd(x1, b0, c10); c11 = Avx512F.FusedMultiplyAdd(x1, b1, c11); c12 = Avx512F.FusedMultiplyAdd(x1, b2, c12); c13 = Avx512F.FusedMultiplyAdd(x1, b3, c13);
            var x2 = Vector512.Create(a2[p]);
            c20 = Avx512F.FusedMultiplyAdd(x2, b0, c20); c21 = Avx512F.FusedMultiplyAdd(x2, b1, c21); c22 = Avx512F.FusedMultiplyAdd(x2, b2, c22); c23 = Avx512F.FusedMultiplyAdd(x2, b3, c23);
            var x3 = Vector512.Create(a3[p]);
            c30 = Avx512F.FusedMultiplyAdd(x3, b0, c30); c31 = Avx512F.FusedMultiplyAdd(x3, b1, c31); c32 = Avx512F.FusedMultiplyAdd(x3, b2, c32); c33 = Avx512F.FusedMultiplyAdd(x3, b3, c33);
            var x4 = Vector512.Create(a4[p]);
            c40 = Avx512F.FusedMultiplyAdd(x4, b0, c40); c41 = Avx512F.FusedMultiplyAdd(x4, b1, c41); c42 = Avx512F.FusedMultiplyAdd(x4, b2, c42); c43 = Avx512F.FusedMultiplyAdd(x4, b3, c43);
            var x5 = Vector512.Create(a5[p]);
            c50 = Avx512F.FusedMultiplyAdd(x5, b0, c50); c51 = Avx512F.FusedMultiplyAdd(x5, b1, c51); c52 = Avx512F.FusedMultiplyAdd(x5, b2, c52); c53 = Avx512F.FusedMultiplyAdd(x5, b3, c53);
            bp += 64;
        }
        if (accumulate)
        {
            Acc(c, c00); Acc(c + 16, c01); Acc(c + 32, c02); Acc(c + 48, c03);
            Acc(c + 1 * ldc, c10); Acc(c + 1 * ldc + 16, c11); Acc(c + 1 * ldc + 32, c12); Acc(c + 1 * ldc + 48, c13);
            Acc(c + 2 * ldc, c20); Acc(c + 2 * ldc + 16, c21); Acc(c + 2 * ldc + 32, c22); Acc(c + 2 * ldc + 48, c23);
            Acc(c + 3 * ldc, c30); Acc(c + 3 * ldc + 16, c31); Acc(c + 3 * ldc + 32, c32); Acc(c + 3 * ldc + 48, c33);
            Acc(c + 4 * ldc, c40); Acc(c + 4 * ldc + 16, c41); Acc(c + 4 * ldc + 32, c42); Acc(c + 4 * ldc + 48, c43);
            Acc(c + 5 * ldc, c50); Acc(c + 5 * ldc + 16, c51); Acc(c + 5 * ldc + 32, c52); Acc(c + 5 * ldc + 48, c53);
        }
        else
        {
            c00.Store(c); c01.Store(c + 16); c02.Store(c + 32); c03.Store(c + 48);
            c10.Store(c + 1 * ldc); c11.Store(c + 1 * ldc + 16); c12.Store(c + 1 * ldc + 32); c13.Store(c + 1 * ldc + 48);
            c20.Store(c + 2 * ldc); c21.Store(c + 2 * ldc + 16); c22.Store(c + 2 * ldc + 32); c23.Store(c + 2 * ldc + 48);
            c30.Store(c + 3 * ldc); c31.Store(c + 3 * ldc + 16); c32.Store(c + 3 * ldc + 32); c33.Store(c + 3 * ldc + 48);
            c40.Store(c + 4 * ldc); c41.Store(c + 4 * ldc + 16); c42.Store(c + 4 * ldc + 32); c43.Store(c + 4 * ldc + 48);
            c50.Store(c + 5 * ldc); c51.Store(c + 5 * ldc + 16); c52.Store(c + 5 * ldc + 32); c53.Store(c + 5 * ldc + 48);
        }
    }

    /// <summary>Edge panel: only the first <paramref name="cols"/> (&lt; 64) columns exist; computes the MR×⌈cols/16⌉·16 tile from the same packed [kc][64] panel.</summary>
    public static void RunEdge(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate, int cols)
    {
        switch ((cols + 15) / 16)
        {
            case 1: Run16(a, lda, bp, kc, c, ldc, accumulate); break;
            case 2: Run32(a, lda, bp, kc, c, ldc, accumulate); break;
            case 3: Run48(a, lda, bp, kc, c, ldc, accumulate); break;
            default: Run(a, lda, bp, kc, c, ldc, accumulate); break;
        }
    }

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static void Run16(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector512<float>.Zero;
        var c10 = Vector512<float>.Zero;
        var c20 = Vector512<float>.Zero;
        var c30 = Vector512<float>.Zero;
        var c40 = Vector512<float>.Zero;
        var c50 = Vector512<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector512.Load(bp);
            var x0 = Vector512.Create(a0[p]);
            c00 = Avx512F.FusedMultiplyAdd(x0, b0, c00);
            var x1 = Vector512.Create(a1[p]);
            c10 = Avx512F.FusedMultiplyAdd(x1, b0, c10);
            var x2 = Vector512.Create(a2[p]);
            c20 = Avx512F.FusedMultiplyAdd(x2, b0, c20);
            var x3 = Vector512.Create(a3[p]);
            c30 = Avx512F.FusedMultiplyAdd(x3, b0, c30);
            var x4 = Vector512.Create(a4[p]);
            c40 = Avx512F.FusedMultiplyAdd(x4, b0, c40);
            var x5 = Vector512.Create(a5[p]);
            c50 = Avx512F.FusedMultiplyAdd(x5, b0, c50);
            bp += 64;
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

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static void Run32(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector512<float>.Zero; var c01 = Vector512<float>.Zero;
        var c10 = Vector512<float>.Zero; var c11 = Vector512<float>.Zero;
        var c20 = Vector512<float>.Zero; var c21 = Vector512<float>.Zero;
        var c30 = Vector512<float>.Zero; var c31 = Vector512<float>.Zero;
        var c40 = Vector512<float>.Zero; var c41 = Vector512<float>.Zero;
        var c50 = Vector512<float>.Zero; var c51 = Vector512<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector512.Load(bp); var b1 = Vector512.Load(bp + 16);
            var x0 = Vector512.Create(a0[p]);
            c00 = Avx512F.FusedMultiplyAdd(x0, b0, c00); c01 = Avx512F.FusedMultiplyAdd(x0, b1, c01);
            var x1 = Vector512.Create(a1[p]);
            c10 = Avx512F.FusedMultiplyAdd(x1, b0, c10); c11 = Avx512F.FusedMultiplyAdd(x1, b1, c11);
            var x2 = Vector512.Create(a2[p]);
            c20 = Avx512F.FusedMultiplyAdd(x2, b0, c20); c21 = Avx512F.FusedMultiplyAdd(x2, b1, c21);
            var x3 = Vector512.Create(a3[p]);
            c30 = Avx512F.FusedMultiplyAdd(x3, b0, c30); c31 = Avx512F.FusedMultiplyAdd(x3, b1, c31);
            var x4 = Vector512.Create(a4[p]);
            c40 = Avx512F.FusedMultiplyAdd(x4, b0, c40); c41 = Avx512F.FusedMultiplyAdd(x4, b1, c41);
            var x5 = Vector512.Create(a5[p]);
            c50 = Avx512F.FusedMultiplyAdd(x5, b0, c50); c51 = Avx512F.FusedMultiplyAdd(x5, b1, c51);
            bp += 64;
        }
        if (accumulate)
        {
            Acc(c, c00); Acc(c + 16, c01);
            Acc(c + 1 * ldc, c10); Acc(c + 1 * ldc + 16, c11);
            Acc(c + 2 * ldc, c20); Acc(c + 2 * ldc + 16, c21);
            Acc(c + 3 * ldc, c30); Acc(c + 3 * ldc + 16, c31);
            Acc(c + 4 * ldc, c40); Acc(c + 4 * ldc + 16, c41);
            Acc(c + 5 * ldc, c50); Acc(c + 5 * ldc + 16, c51);
        }
        else
        {
            c00.Store(c); c01.Store(c + 16);
            c10.Store(c + 1 * ldc); c11.Store(c + 1 * ldc + 16);
            c20.Store(c + 2 * ldc); c21.Store(c + 2 * ldc + 16);
            c30.Store(c + 3 * ldc); c31.Store(c + 3 * ldc + 16);
            c40.Store(c + 4 * ldc); c41.Store(c + 4 * ldc + 16);
            c50.Store(c + 5 * ldc); c51.Store(c + 5 * ldc + 16);
        }
    }

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static void Run48(float* a, nint lda, float* bp, int kc, float* c, nint ldc, bool accumulate)
    {
        var c00 = Vector512<float>.Zero; var c01 = Vector512<float>.Zero; var c02 = Vector512<float>.Zero;
        var c10 = Vector512<float>.Zero; var c11 = Vector512<float>.Zero; var c12 = Vector512<float>.Zero;
        var c20 = Vector512<float>.Zero; var c21 = Vector512<float>.Zero; var c22 = Vector512<float>.Zero;
        var c30 = Vector512<float>.Zero; var c31 = Vector512<float>.Zero; var c32 = Vector512<float>.Zero;
        var c40 = Vector512<float>.Zero; var c41 = Vector512<float>.Zero; var c42 = Vector512<float>.Zero;
        var c50 = Vector512<float>.Zero; var c51 = Vector512<float>.Zero; var c52 = Vector512<float>.Zero;
        float* a0 = a; float* a1 = a + 1 * lda; float* a2 = a + 2 * lda; float* a3 = a + 3 * lda; float* a4 = a + 4 * lda; float* a5 = a + 5 * lda;
        for (int p = 0; p < kc; p++)
        {
            var b0 = Vector512.Load(bp); var b1 = Vector512.Load(bp + 16); var b2 = Vector512.Load(bp + 32);
            var x0 = Vector512.Create(a0[p]);
            c00 = Avx512F.FusedMultiplyAdd(x0, b0, c00); c01 = Avx512F.FusedMultiplyAdd(x0, b1, c01); c02 = Avx512F.FusedMultiplyAdd(x0, b2, c02);
            var x1 = Vector512.Create(a1[p]);
            c10 = Avx512F.FusedMultiplyAdd(x1, b0, c10); c11 = Avx512F.FusedMultiplyAdd(x1, b1, c11); c12 = Avx512F.FusedMultiplyAdd(x1, b2, c12);
            var x2 = Vector512.Create(a2[p]);
            c20 = Avx512F.FusedMultiplyAdd(x2, b0, c20); c21 = Avx512F.FusedMultiplyAdd(x2, b1, c21); c22 = Avx512F.FusedMultiplyAdd(x2, b2, c22);
            var x3 = Vector512.Create(a3[p]);
            c30 = Avx512F.FusedMultiplyAdd(x3, b0, c30); c31 = Avx512F.FusedMultiplyAdd(x3, b1, c31); c32 = Avx512F.FusedMultiplyAdd(x3, b2, c32);
            var x4 = Vector512.Create(a4[p]);
            c40 = Avx512F.FusedMultiplyAdd(x4, b0, c40); c41 = Avx512F.FusedMultiplyAdd(x4, b1, c41); c42 = Avx512F.FusedMultiplyAdd(x4, b2, c42);
            var x5 = Vector512.Create(a5[p]);
            c50 = Avx512F.FusedMultiplyAdd(x5, b0, c50); c51 = Avx512F.FusedMultiplyAdd(x5, b1, c51); c52 = Avx512F.FusedMultiplyAdd(x5, b2, c52);
            bp += 64;
        }
        if (accumulate)
        {
            Acc(c, c00); Acc(c + 16, c01); Acc(c + 32, c02);
            Acc(c + 1 * ldc, c10); Acc(c + 1 * ldc + 16, c11); Acc(c + 1 * ldc + 32, c12);
            Acc(c + 2 * ldc, c20); Acc(c + 2 * ldc + 16, c21); Acc(c + 2 * ldc + 32, c22);
            Acc(c + 3 * ldc, c30); Acc(c + 3 * ldc + 16, c31); Acc(c + 3 * ldc + 32, c32);
            Acc(c + 4 * ldc, c40); Acc(c + 4 * ldc + 16, c41); Acc(c + 4 * ldc + 32, c42);
            Acc(c + 5 * ldc, c50); Acc(c + 5 * ldc + 16, c51); Acc(c + 5 * ldc + 32, c52);
        }
        else
        {
            c00.Store(c); c01.Store(c + 16); c02.Store(c + 32);
            c10.Store(c + 1 * ldc); c11.Store(c + 1 * ldc + 16); c12.Store(c + 1 * ldc + 32);
            c20.Store(c + 2 * ldc); c21.Store(c + 2 * ldc + 16); c22.Store(c + 2 * ldc + 32);
            c30.Store(c + 3 * ldc); c31.Store(c + 3 * ldc + 16); c32.Store(c + 3 * ldc + 32);
            c40.Store(c + 4 * ldc); c41.Store(c + 4 * ldc + 16); c42.Store(c + 4 * ldc + 32);
            c50.Store(c + 5 * ldc); c51.Store(c + 5 * ldc + 16); c52.Store(c + 5 * ldc + 32);
        }
    }

    [MethodImpl(MethodImplOptions.AggressiveInlining)]
    private static void Acc(float* c, Vector512<float> v) => (Vector512.Load(c) + v).Store(c);
}
