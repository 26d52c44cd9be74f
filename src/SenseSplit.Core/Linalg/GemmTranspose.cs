using System.Runtime.CompilerServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace SenseSplit.Core.Linalg;

/// <summary>In-register transposes used to mirror the lower triangle of a Gram matrix onto the upper one.</summary>
internal static unsafe class GemmTranspose
{
    public static bool IsSupported => Avx512F.IsSupported;

    /// <summary>
    /// dst[s·ldd + r] = src[r·lds + s] for a 16×16 block (r, s &lt; 16); the blocks must not overlap. Four rounds of
    /// shuffles: 32-bit interleave of row pairs, 64-bit shuffles within 128-bit lanes, then two 128-bit-lane shuffles
    /// (the usual in-register transpose, e.g. Intel 64 and IA-32 Optimization Reference Manual, "matrix transposition").
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static void Transpose16(float* src, long lds, float* dst, long ldd)
    {
        var r0 = Vector512.Load(src); var r1 = Vector512.Load(src + lds);
        var r2 = Vector512.Load(src + 2 * lds); var r3 = Vector512.Load(src + 3 * lds);
        var r4 = Vector512.Load(src + 4 * lds); var r5 = Vector512.Load(src + 5 * lds);
        var r6 = Vector512.Load(src + 6 * lds); var r7 = Vector512.Load(src + 7 * lds);
        var r8 = Vector512.Load(src + 8 * lds); var r9 = Vector512.Load(src + 9 * lds);
        var r10 = Vector512.Load(src + 10 * lds); var r11 = Vector512.Load(src + 11 * lds);
        var r12 = Vector512.Load(src + 12 * lds); var r13 = Vector512.Load(src + 13 * lds);
        var r14 = Vector512.Load(src + 14 * lds); var r15 = Vector512.Load(src + 15 * lds);

        // Round 1: interleave 32-bit elements of row pairs.
        var t0 = Avx512F.UnpackLow(r0, r1); var t1 = Avx512F.UnpackHigh(r0, r1);
        var t2 = Avx512F.UnpackLow(r2, r3); var t3 = Avx512F.UnpackHigh(r2, r3);
        var t4 = Avx512F.UnpackLow(r4, r5); var t5 = Avx512F.UnpackHigh(r4, r5);
        var t6 = Avx512F.UnpackLow(r6, r7); var t7 = Avx512F.UnpackHigh(r6, r7);
        var t8 = Avx512F.UnpackLow(r8, r9); var t9 = Avx512F.UnpackHigh(r8, r9);
        var t10 = Avx512F.UnpackLow(r10, r11); var t11 = Avx512F.UnpackHigh(r10, r11);
        var t12 = Avx512F.UnpackLow(r12, r13); var t13 = Avx512F.UnpackHigh(r12, r13);
        var t14 = Avx512F.UnpackLow(r14, r15); var t15 = Avx512F.UnpackHigh(r14, r15);

        // Round 2: 64-bit pairs within each 128-bit lane, giving 4×4 transposed sub-blocks.
        r0 = Avx512F.Shuffle(t0, t2, 0x44); r1 = Avx512F.Shuffle(t0, t2, 0xEE);
        r2 = Avx512F.Shuffle(t1, t3, 0x44); r3 = Avx512F.Shuffle(t1, t3, 0xEE);
        r4 = Avx512F.Shuffle(t4, t6, 0x44); r5 = Avx512F.Shuffle(t4, t6, 0xEE);
        r6 = Avx512F.Shuffle(t5, t7, 0x44); r7 = Avx512F.Shuffle(t5, t7, 0xEE);
        r8 = Avx512F.Shuffle(t8, t10, 0x44); r9 = Avx512F.Shuffle(t8, t10, 0xEE);
        r10 = Avx512F.Shuffle(t9, t11, 0x44); r11 = Avx512F.Shuffle(t9, t11, 0xEE);
        r12 = Avx512F.Shuffle(t12, t14, 0x44); r13 = Avx512F.Shuffle(t12, t14, 0xEE);
        r14 = Avx512F.Shuffle(t13, t15, 0x44); r15 = Avx512F.Shuffle(t13, t15, 0xEE);

        // Rounds 3 and 4: move 128-bit lanes so that lane q of output row s comes from input rows 4q..4q+3.
        t0 = Avx512F.Shuffle4x128(r0, r4, 0x88); t1 = Avx512F.Shuffle4x128(r1, r5, 0x88);
        t2 = Avx512F.Shuffle4x128(r2, r6, 0x88); t3 = Avx512F.Shuffle4x128(r3, r7, 0x88);
        t4 = Avx512F.Shuffle4x128(r0, r4, 0xDD); t5 = Avx512F.Shuffle4x128(r1, r5, 0xDD);
        t6 = Avx512F.Shuffle4x128(r2, r6, 0xDD); t7 = Avx512F.Shuffle4x128(r3, r7, 0xDD);
        t8 = Avx512F.Shuffle4x128(r8, r12, 0x88); t9 = Avx512F.Shuffle4x128(r9, r13, 0x88);
        t10 = Avx512F.Shuffle4x128(r10, r14, 0x88); t11 = Avx512F.Shuffle4x128(r11, r15, 0x88);
        t12 = Avx512F.Shuffle4x128(r8, r12, 0xDD); t13 = Avx512F.Shuffle4x128(r9, r13, 0xDD);
        t14 = Avx512F.Shuffle4x128(r10, r14, 0xDD); t15 = Avx512F.Shuffle4x128(r11, r15, 0xDD);

        Avx512F.Shuffle4x128(t0, t8, 0x88).Store(dst); Avx512F.Shuffle4x128(t1, t9, 0x88).Store(dst + ldd);
        Avx512F.Shuffle4x128(t2, t10, 0x88).Store(dst + 2 * ldd); Avx512F.Shuffle4x128(t3, t11, 0x88).Store(dst + 3 * ldd);
        Avx512F.Shuffle4x128(t4, t12, 0x88).Store(dst + 4 * ldd); Avx512F.Shuffle4x128(t5, t13, 0x88).Store(dst + 5 * ldd);
        Avx512F.Shuffle4x128(t6, t14, 0x88).Store(dst + 6 * ldd); Avx512F.Shuffle4x128(t7, t15, 0x88).Store(dst + 7 * ldd);
        Avx512F.Shuffle4x128(t0, t8, 0xDD).Store(dst + 8 * ldd); Avx512F.Shuffle4x128(t1, t9, 0xDD).Store(dst + 9 * ldd);
        Avx512F.Shuffle4x128(t2, t10, 0xDD).Store(dst + 10 * ldd); Avx512F.Shuffle4x128(t3, t11, 0xDD).Store(dst + 11 * ldd);
        Avx512F.Shuffle4x128(t4, t12, 0xDD).Store(dst + 12 * ldd); Avx512F.Shuffle4x128(t5, t13, 0xDD).Store(dst + 13 * ldd);
        Avx512F.Shuffle4x128(t6, t14, 0xDD).Store(dst + 14 * ldd); Avx512F.Shuffle4x128(t7, t15, 0xDD).Store(dst + 15 * ldd);
    }
}
