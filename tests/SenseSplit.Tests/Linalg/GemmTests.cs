using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Tests.Linalg;

public class GemmTests
{
    public static TheoryData<GemmKernel> Paths => new() { GemmKernel.Avx512, GemmKernel.Avx2, GemmKernel.Scalar };

    // Odd shapes: 1×1×1, register-block edges (MR = 6 or 4, NR = 64, 16 or 4, plus and minus one), the embedding
    // width k = 300, tall-thin and wide-short (the column partition), k above the 512-deep slice (two slices), and
    // last panels 16, 32 or 48 (AVX-512) and 8 (AVX2) columns wide, which take the narrow edge kernels.
    public static TheoryData<GemmKernel, int, int, int> PathsAndShapes()
    {
        var shapes = new (int M, int N, int K)[]
        {
            (1, 1, 1), (7, 13, 5), (67, 129, 300), (301, 65, 17), (5, 63, 300), (6, 64, 300), (7, 65, 300),
            (3, 15, 8), (4, 16, 8), (5, 17, 9), (12, 128, 1), (13, 127, 2), (2, 1030, 300), (11, 70, 1100),
            (1, 600, 40), (600, 1, 40), (12, 80, 300), (6, 96, 7), (18, 112, 33), (6, 40, 9), (13, 2000, 20),
        };
        var data = new TheoryData<GemmKernel, int, int, int>();
        foreach (var path in new[] { GemmKernel.Avx512, GemmKernel.Avx2, GemmKernel.Scalar })
            foreach (var (m, n, k) in shapes) data.Add(path, m, n, k);
        return data;
    }

    [Theory]
    [MemberData(nameof(PathsAndShapes))]
    public void MultiplyTransposed_OddShapes_MatchesDoubleReferenceWithinInnerProductBound(GemmKernel path, int m, int n, int k)
    {
        if (!SupportedOrThrows(path)) return;
        var a = RandomMatrix(m, k, seed: 11 + m);
        var b = RandomMatrix(n, k, seed: 29 + n);
        var c = new float[m * n];
        Gemm.MultiplyTransposed(a, m, b, n, k, c, threads: 2, kernel: path);
        AssertWithinInnerProductBound(a, b, m, n, k, c);
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void MultiplyTransposed_LeadingDimensions_MatchesDenseCopy(GemmKernel path)
    {
        if (!SupportedOrThrows(path)) return;
        const int m = 19, n = 70, k = 33, lda = 40, ldb = 35, ldc = 75;
        var a = RandomMatrix(m, lda, seed: 3);
        var b = RandomMatrix(n, ldb, seed: 4);
        var c = Enumerable.Repeat(-7f, m * ldc).ToArray();
        Gemm.MultiplyTransposed(a, m, lda, b, n, ldb, c, ldc, k, threads: 1, kernel: path);

        var aDense = new float[m * k];
        var bDense = new float[n * k];
        for (int i = 0; i < m; i++) Array.Copy(a, i * lda, aDense, i * k, k);
        for (int j = 0; j < n; j++) Array.Copy(b, j * ldb, bDense, j * k, k);
        var expected = new float[m * n];
        Gemm.MultiplyTransposed(aDense, m, bDense, n, k, expected, threads: 1, kernel: path);
        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j < n; j++) Assert.Equal(expected[i * n + j], c[i * ldc + j]);
            for (int j = n; j < ldc; j++) Assert.Equal(-7f, c[i * ldc + j]); // padding past column n is untouched
        }
    }

    [Theory]
    [InlineData(GemmKernel.Avx512, 130, 150, 300)] // split by rows
    [InlineData(GemmKernel.Avx512, 20, 700, 100)]  // split by columns
    [InlineData(GemmKernel.Avx512, 50, 60, 1100)]  // two k-slices
    [InlineData(GemmKernel.Avx2, 130, 150, 300)]
    [InlineData(GemmKernel.Avx2, 20, 700, 100)]
    [InlineData(GemmKernel.Scalar, 130, 150, 300)]
    [InlineData(GemmKernel.Scalar, 20, 700, 100)]
    public void MultiplyTransposed_OneOrTwoOrThreeThreads_BitwiseIdentical(GemmKernel path, int m, int n, int k)
    {
        if (!SupportedOrThrows(path)) return;
        var a = RandomMatrix(m, k, seed: 5);
        var b = RandomMatrix(n, k, seed: 6);
        var c1 = new float[m * n];
        var c2 = new float[m * n];
        var c3 = new float[m * n];
        Gemm.MultiplyTransposed(a, m, b, n, k, c1, threads: 1, kernel: path);
        Gemm.MultiplyTransposed(a, m, b, n, k, c2, threads: 2, kernel: path);
        Gemm.MultiplyTransposed(a, m, b, n, k, c3, threads: 3, kernel: path);
        Assert.Equal(c1, c2);
        Assert.Equal(c1, c3);
        AssertWithinInnerProductBound(a, b, m, n, k, c1);
    }

    [Theory]
    [InlineData(GemmKernel.Avx512, 150, 300)]
    [InlineData(GemmKernel.Avx512, 70, 600)]
    [InlineData(GemmKernel.Avx2, 150, 300)]
    [InlineData(GemmKernel.Scalar, 150, 300)]
    public void MultiplyTransposed_GramOfOneMatrix_BitwiseSymmetric(GemmKernel path, int rows, int k)
    {
        if (!SupportedOrThrows(path)) return;
        var a = RandomMatrix(rows, k, seed: 8);
        var g = new float[rows * rows];
        Gemm.MultiplyTransposed(a, rows, a, rows, k, g, threads: 2, kernel: path);
        // Each entry is one multiply-add chain over p in order and a·b = b·a exactly, so G[i,j] and G[j,i] agree bit for bit.
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < i; j++) Assert.Equal(g[i * rows + j], g[j * rows + i]);
        for (int i = 0; i < rows; i++) Assert.True(g[i * rows + i] > 0f, $"diagonal {i} of a Gram matrix must be positive");
    }

    public static TheoryData<GemmKernel, int, int> PathsAndGramShapes()
    {
        var shapes = new (int M, int K)[] { (1, 1), (5, 17), (6, 300), (7, 3), (64, 300), (65, 300), (130, 40), (301, 300), (97, 600) };
        var data = new TheoryData<GemmKernel, int, int>();
        foreach (var path in new[] { GemmKernel.Avx512, GemmKernel.Avx2, GemmKernel.Scalar })
            foreach (var (m, k) in shapes) data.Add(path, m, k);
        return data;
    }

    [Theory]
    [MemberData(nameof(PathsAndGramShapes))]
    public void Gram_OddSizes_BitwiseEqualsFullProductForAnyThreadCount(GemmKernel path, int m, int k)
    {
        if (!SupportedOrThrows(path)) return;
        var a = RandomMatrix(m, k, seed: 40 + m);
        var full = new float[m * m];
        Gemm.MultiplyTransposed(a, m, a, m, k, full, threads: 1, kernel: path);
        AssertWithinInnerProductBound(a, a, m, m, k, full);
        foreach (int threads in new[] { 1, 2, 3 })
        {
            var g = Enumerable.Repeat(float.NaN, m * m).ToArray();
            Gemm.Gram(a, m, k, g, threads, path);
            Assert.Equal(full, g);
        }
    }

    [Fact]
    public void Gram_ZeroSizes_WritesNothingOrZeros()
    {
        var g = new[] { float.NaN, float.NaN, float.NaN, float.NaN };
        Gemm.Gram([], 0, 5, g);
        Assert.All(g, v => Assert.True(float.IsNaN(v)));
        Gemm.Gram([], 2, 0, g);
        Assert.All(g, v => Assert.Equal(0f, v));
        Assert.Throws<ArgumentException>(() => Gemm.Gram(new float[6], 2, 3, new float[3]));
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void MultiplyTransposed_ZeroSizes_WritesNothingOrZeros(GemmKernel path)
    {
        if (!SupportedOrThrows(path)) return;
        var sentinel = new[] { float.NaN, float.NaN, float.NaN, float.NaN, float.NaN, float.NaN };
        var c = (float[])sentinel.Clone();
        Gemm.MultiplyTransposed([], 0, new float[3 * 4], 3, 4, c, kernel: path);
        Assert.Equal(sentinel, c);
        Gemm.MultiplyTransposed(new float[2 * 4], 2, [], 0, 4, c, kernel: path);
        Assert.Equal(sentinel, c);
        // k = 0: every entry is an empty sum, so C becomes all zeros.
        Gemm.MultiplyTransposed([], 2, [], 3, 0, c, kernel: path);
        Assert.All(c, v => Assert.Equal(0f, v));
    }

    [Fact]
    public void MultiplyTransposed_AgainstMathNetManagedMultiply_AgreesWithinTwiceTheBound()
    {
        // Reference library: MathNet.Numerics 5.0.0 (package pinned in SenseSplit.Core.csproj), managed linear-algebra
        // provider, single precision: Matrix<float> A * Bᵀ.
        const int m = 45, n = 83, k = 300;
        var a = RandomMatrix(m, k, seed: 21);
        var b = RandomMatrix(n, k, seed: 22);
        MathNet.Numerics.Control.UseManaged();
        var reference = Matrix<float>.Build.DenseOfRowMajor(m, k, a) * Matrix<float>.Build.DenseOfRowMajor(n, k, b).Transpose();
        var c = new float[m * n];
        Gemm.MultiplyTransposed(a, m, b, n, k, c);
        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j < n; j++)
            {
                // Both results obey the inner-product bound against the exact value, so they differ by at most twice it.
                double bound = 2 * Gamma(k) * AbsDot(a, b, i, j, k) + 1e-30;
                Assert.True(Math.Abs(c[i * n + j] - reference[i, j]) <= bound,
                    $"C[{i},{j}] = {c[i * n + j]} vs MathNet {reference[i, j]} (bound {bound})");
            }
        }
    }

    [Theory]
    [MemberData(nameof(Paths))]
    public void MultiplyTransposed_NaNInOneRowOfA_PropagatesToThatRowOnly(GemmKernel path)
    {
        if (!SupportedOrThrows(path)) return;
        // IEEE 754 arithmetic (common practice for BLAS-style kernels): no finiteness check in the hot product;
        // a NaN in row 3 of A must reach every entry of row 3 of C and no other entry (padding must not leak it).
        const int m = 13, n = 70, k = 9;
        var a = RandomMatrix(m, k, seed: 50);
        var b = RandomMatrix(n, k, seed: 51);
        a[3 * k + 4] = float.NaN;
        var c = new float[m * n];
        Gemm.MultiplyTransposed(a, m, b, n, k, c, kernel: path);
        for (int i = 0; i < m; i++)
            for (int j = 0; j < n; j++)
                Assert.Equal(i == 3, float.IsNaN(c[i * n + j]));
    }

    [Fact]
    public void MultiplyTransposed_ShortBuffers_ThrowWithLengths()
    {
        var ex = Assert.Throws<ArgumentException>(() => Gemm.MultiplyTransposed(new float[5], 2, new float[6], 2, 3, new float[4]));
        Assert.Contains("5", ex.Message);
        Assert.Throws<ArgumentException>(() => Gemm.MultiplyTransposed(new float[6], 2, new float[6], 2, 3, new float[3]));
        Assert.Throws<ArgumentOutOfRangeException>(() => Gemm.MultiplyTransposed(new float[6], -1, new float[6], 2, 3, new float[4]));
        Assert.Throws<ArgumentOutOfRangeException>(() => Gemm.MultiplyTransposed(new float[6], 2, new float[6], 2, 3, new float[4], kernel: (GemmKernel)99));
    }

    [Fact]
    public void Resolve_Auto_PicksASupportedPath()
    {
        var path = Gemm.Resolve(GemmKernel.Auto);
        Assert.NotEqual(GemmKernel.Auto, path);
        Assert.True(Gemm.IsSupported(path));
        if (Gemm.IsSupported(GemmKernel.Avx512)) Assert.Equal(GemmKernel.Avx512, path);
    }

    /// <summary>True when the path runs here; otherwise checks that forcing it fails clearly, and returns false.</summary>
    private static bool SupportedOrThrows(GemmKernel path)
    {
        if (Gemm.IsSupported(path)) return true;
        var ex = Assert.Throws<NotSupportedException>(() => Gemm.MultiplyTransposed(new float[1], 1, new float[1], 1, 1, new float[1], kernel: path));
        Assert.Contains(path.ToString(), ex.Message);
        return false;
    }

    private static float[] RandomMatrix(int rows, int cols, int seed)
    {
        var random = new Random(seed);
        var values = new float[rows * cols];
        for (int i = 0; i < values.Length; i++) values[i] = (float)(random.NextDouble() * 2 - 1);
        return values;
    }

    /// <summary>
    /// γ_n = n·u/(1 − n·u) with unit roundoff u = 2⁻²⁴: a floating-point inner product of length n satisfies
    /// |fl(xᵀy) − xᵀy| ≤ γ_n·|x|ᵀ|y| (Higham 2002, Accuracy and Stability of Numerical Algorithms, 2nd ed., eq. 3.5),
    /// for any summation order, with or without fused multiply-adds.
    /// </summary>
    private static double Gamma(int n)
    {
        double nu = n * Math.Pow(2, -24);
        return nu / (1 - nu);
    }

    private static double AbsDot(float[] a, float[] b, int i, int j, int k)
    {
        double s = 0;
        for (int p = 0; p < k; p++) s += Math.Abs((double)a[i * k + p] * b[j * k + p]);
        return s;
    }

    /// <summary>Checks every entry against a double-accumulated reference (the scalar twin of the kernels).</summary>
    private static void AssertWithinInnerProductBound(float[] a, float[] b, int m, int n, int k, float[] c)
    {
        for (int i = 0; i < m; i++)
        {
            for (int j = 0; j < n; j++)
            {
                double exact = 0;
                for (int p = 0; p < k; p++) exact += (double)a[i * k + p] * b[j * k + p];
                // k+1: one more rounding when a second k-slice is added to the stored first; the double reference
                // itself is off by about k·2⁻⁵³ of the same sum, far below this bound.
                double bound = Gamma(k + 1) * AbsDot(a, b, i, j, k) + 1e-30;
                double error = Math.Abs(c[i * n + j] - exact);
                Assert.True(error <= bound, $"C[{i},{j}] = {c[i * n + j]} but reference {exact} (error {error}, bound {bound}; m={m} n={n} k={k})");
            }
        }
    }
}
