using SenseSplit.Core.Linalg;

namespace SenseSplit.Tests.Linalg;

public class GemmTransposeTests
{
    [Fact]
    public unsafe void Transpose16_DistinctValues_LandMirrored()
    {
        if (!GemmTranspose.IsSupported) return; // the scalar mirror is checked through Gemm.Gram on every CPU
        const int ld = 37, ldd = 23; // row strides that are not multiples of 16, and differ
        var src = new float[16 * ld];
        var dst = Enumerable.Repeat(-1f, 16 * ldd).ToArray();
        for (int r = 0; r < 16; r++)
            for (int s = 0; s < ld; s++) src[r * ld + s] = r * 100 + s;
        fixed (float* ps = src)
        fixed (float* pd = dst)
            GemmTranspose.Transpose16(ps + 2, ld, pd + 5, ldd);
        for (int s = 0; s < 16; s++)
        {
            for (int r = 0; r < 16; r++) Assert.Equal(r * 100 + s + 2, dst[s * ldd + 5 + r]);
            for (int x = 0; x < ldd; x++)
                if (x < 5 || x >= 21) Assert.Equal(-1f, dst[s * ldd + x]); // nothing written outside the block
        }
    }
}
