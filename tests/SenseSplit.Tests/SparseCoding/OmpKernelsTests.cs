using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Tests.SparseCoding;

public unsafe class OmpKernelsTests
{
    [Theory]
    [InlineData(1, 0)]
    [InlineData(15, 2)]
    [InlineData(16, 3)]
    [InlineData(17, 1)]
    [InlineData(31, 4)]
    [InlineData(32, 4)]
    [InlineData(33, 5)]
    [InlineData(2000, 5)]
    public void ArgMaxAbsUpdated_RandomInputs_SameAsScalarTwin(int atoms, int n)
    {
        // Reference: the scalar twin (house style: every SIMD loop keeps its scalar version as the test reference).
        // Both paths form each entry with the same fused multiply-adds in the same order, so indices and values
        // must agree exactly; sizes cover the vector width ±1 and the two-vector unroll ±1.
        var rng = new Random(atoms * 31 + n);
        var alpha0 = new float[atoms];
        var g = new float[Math.Max(n, 1) * atoms];
        var negGamma = new float[Math.Max(n, 1)];
        var rows = stackalloc float*[Math.Max(n, 1)];
        for (int trial = 0; trial < 50; trial++)
        {
            for (int i = 0; i < alpha0.Length; i++) alpha0[i] = (float)(rng.NextDouble() * 2 - 1);
            for (int i = 0; i < g.Length; i++) g[i] = (float)(rng.NextDouble() * 2 - 1);
            for (int i = 0; i < negGamma.Length; i++) negGamma[i] = (float)(rng.NextDouble() * 2 - 1);
            if (trial % 5 == 0) // ties: repeated values, the first index must win everywhere
                for (int i = 0; i < alpha0.Length; i++) alpha0[i] = (float)Math.Round(alpha0[i] * 2) / 2;
            fixed (float* a = alpha0)
            fixed (float* gp = g)
            fixed (float* ng = negGamma)
            {
                for (int r = 0; r < n; r++) rows[r] = gp + r * atoms;
                int want = OmpKernels.ArgMaxAbsUpdatedScalar(a, atoms, rows, ng, n, out float wantAbs, 0, -1, -1f);
                int got = OmpKernels.ArgMaxAbsUpdated(a, atoms, rows, ng, n, out float gotAbs);
                int got256 = OmpKernels.ArgMaxAbsUpdatedVector256(a, atoms, rows, ng, n, out float got256Abs);
                Assert.Equal(want, got);
                Assert.Equal(wantAbs, gotAbs);
                Assert.Equal(want, got256);
                Assert.Equal(wantAbs, got256Abs);
            }
        }
    }

    [Fact]
    public void ArgMaxAbsUpdatedScalar_HandWorkedCase_FirstLargestMagnitude()
    {
        // α⁰ = (1, −3, 2, 3), one row G = (0, 1, 0, 1), γ = 1: α = (1, −4, 2, 2); worked by hand.
        float[] alpha0 = [1, -3, 2, 3];
        float[] row = [0, 1, 0, 1];
        float[] negGamma = [-1];
        fixed (float* a = alpha0)
        fixed (float* r = row)
        fixed (float* ng = negGamma)
        {
            var rows = stackalloc float*[1];
            rows[0] = r;
            Assert.Equal(1, OmpKernels.ArgMaxAbsUpdatedScalar(a, 4, rows, ng, 1, out float abs, 0, -1, -1f));
            Assert.Equal(4f, abs);
            Assert.Equal(1, OmpKernels.ArgMaxAbsUpdatedScalar(a, 4, rows, ng, 0, out abs, 0, -1, -1f)); // ties −3, 3: first
            Assert.Equal(3f, abs);
        }
    }

    [Theory]
    [InlineData(0)]
    [InlineData(15)]
    [InlineData(16)]
    [InlineData(17)]
    [InlineData(300)]
    public void SquaredNorm_RandomVectors_MatchesScalarTwin(int length)
    {
        var rng = new Random(length);
        var x = new float[length];
        for (int i = 0; i < length; i++) x[i] = (float)(rng.NextDouble() * 2 - 1);
        double want = OmpKernels.SquaredNormScalar(x);
        // Different summation order in double: agreement to double rounding (~1e-16 relative per term).
        Assert.Equal(want, OmpKernels.SquaredNorm(x), 1e-12 * Math.Max(1, want));
    }
}
