using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.Vectors;

public class VectorPreprocessingTests
{
    private static double Normal(Random rng)
    {
        double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }

    /// <summary>rows×dims with a non-zero mean and a spectrum of well-separated variances along random orthogonal
    /// directions (scale of direction j: 10·0.8^j), so the top principal directions are well defined.</summary>
    private static float[] Anisotropic(int rows, int dims, int seed)
    {
        var rng = new Random(seed);
        var basis = Matrix<double>.Build.Dense(dims, dims, (_, _) => Normal(rng)).QR().Q;
        var x = new float[rows * dims];
        var shift = Enumerable.Range(0, dims).Select(_ => 3 * Normal(rng)).ToArray();
        for (int i = 0; i < rows; i++)
            for (int c = 0; c < dims; c++)
            {
                double z = 10 * Math.Pow(0.8, c) * Normal(rng);
                for (int j = 0; j < dims; j++) x[i * dims + j] += (float)(z * basis[j, c]);
            }
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < dims; j++) x[i * dims + j] += (float)shift[j];
        return x;
    }

    [Fact]
    public void NormalizeRows_MixedRows_UnitNormsAndZeroRowsReported()
    {
        float[] x = [3, 4, 0, 0, 0, 0, -1, 1, 1e-20f, 0, 0, 0];
        var zero = VectorPreprocessing.NormalizeRows(x, 4, 3);
        Assert.Equal([1, 3], zero);
        // 3-4-5 triangle (worked by hand): (3, 4, 0)/5.
        Assert.Equal([0.6f, 0.8f, 0f], x[..3]);
        Assert.Equal([0f, 0f, 0f], x[3..6]);
        Assert.Equal(1.0, Math.Sqrt(x[6] * x[6] + x[7] * x[7] + x[8] * x[8]), 1e-6);
        Assert.Equal(x[7], x[6] * -1); // direction kept
    }

    [Fact]
    public void NormalizeRows_TinyValues_NoUnderflow()
    {
        // ||(1e-30, 1e-30)||² = 2e-60 underflows in float but not in double.
        float[] x = [1e-30f, 1e-30f];
        Assert.Empty(VectorPreprocessing.NormalizeRows(x, 1, 2));
        Assert.Equal(1 / Math.Sqrt(2), x[0], 1e-6);
    }

    [Theory]
    [InlineData(500, 12, 3)]
    [InlineData(2500, 30, 1)]  // more rows than one covariance block
    [InlineData(64, 8, 8)]     // all components: nothing but rounding remains
    public void RemoveTopComponents_RandomAnisotropicData_MatchesMathNetSvd(int rows, int dims, int components)
    {
        // Reference: the principal directions are the right singular vectors of the centred matrix (common practice;
        // Mu, Bhat and Viswanath 2018, Algorithm 1), computed here by MathNet.Numerics 5.0.0 SVD in double precision;
        // expected result Xc − Xc·V_D·V_Dᵀ and variances σ_i²/rows. Tolerance 1e-4 of the data scale: the method
        // works in float (entries ~10, float rounding ~1e-6 relative, accumulated over ~dims terms).
        var x = Anisotropic(rows, dims, seed: rows + dims);
        var reference = Matrix<double>.Build.Dense(rows, dims, (i, j) => x[i * dims + j]);
        var mean = reference.ColumnSums() / rows;
        for (int i = 0; i < rows; i++) reference.SetRow(i, reference.Row(i) - mean);
        var svd = reference.Svd(computeVectors: true);
        var vd = svd.VT.SubMatrix(0, components, 0, dims).Transpose();
        var expected = reference - reference * vd * vd.Transpose();

        var removed = VectorPreprocessing.RemoveTopComponents(x, rows, dims, components);

        double scale = reference.Enumerate().Max(Math.Abs);
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < dims; j++)
                Assert.True(Math.Abs(x[i * dims + j] - expected[i, j]) <= 1e-4 * scale,
                    $"[{i},{j}]: {x[i * dims + j]} vs {expected[i, j]}");
        for (int j = 0; j < dims; j++) Assert.Equal(mean[j], removed.Mean[j], 1e-4 * scale);
        Assert.Equal(components, removed.Count);
        for (int t = 0; t < components; t++)
        {
            double sigma2 = svd.S[t] * svd.S[t] / rows;
            Assert.Equal(sigma2, removed.Variances[t], 1e-4 * sigma2);
            // Same direction up to sign (signs of singular vectors are arbitrary).
            double dot = 0;
            for (int j = 0; j < dims; j++) dot += removed.Directions[t * dims + j] * svd.VT[t, j];
            Assert.Equal(1.0, Math.Abs(dot), 1e-4);
        }
    }

    [Fact]
    public void RemoveTopComponents_Result_CentredAndOrthogonalToRemovedDirections()
    {
        const int rows = 400, dims = 20, components = 2;
        var x = Anisotropic(rows, dims, seed: 5);
        var removed = VectorPreprocessing.RemoveTopComponents(x, rows, dims, components, threads: 2);
        for (int j = 0; j < dims; j++)
        {
            double m = 0;
            for (int i = 0; i < rows; i++) m += x[i * dims + j];
            Assert.True(Math.Abs(m / rows) < 1e-4, $"column {j} mean {m / rows}");
        }
        for (int i = 0; i < rows; i++)
            for (int t = 0; t < components; t++)
            {
                double dot = 0;
                for (int j = 0; j < dims; j++) dot += x[i * dims + j] * removed.Directions[t * dims + j];
                Assert.True(Math.Abs(dot) < 1e-4, $"row {i} direction {t}: {dot}");
            }
    }

    [Fact]
    public void RemoveTopComponents_ZeroComponents_OnlyCentres()
    {
        float[] x = [1, 2, 3, 6];
        var removed = VectorPreprocessing.RemoveTopComponents(x, 2, 2, 0);
        Assert.Equal([2f, 4f], removed.Mean);
        Assert.Equal([-1f, -2f, 1f, 2f], x);
        Assert.Empty(removed.Directions);
    }

    [Fact]
    public void RemoveTopComponents_OneAndTwoThreads_BitwiseEqual()
    {
        var a = Anisotropic(3000, 16, seed: 9);
        var b = (float[])a.Clone();
        VectorPreprocessing.RemoveTopComponents(a, 3000, 16, 3, threads: 1);
        VectorPreprocessing.RemoveTopComponents(b, 3000, 16, 3, threads: 2);
        Assert.Equal(a, b);
    }

    [Fact]
    public void BadArguments_MessagesGiveNumbers()
    {
        var x = new float[12];
        var e1 = Assert.Throws<ArgumentOutOfRangeException>(() => VectorPreprocessing.RemoveTopComponents(x, 3, 4, 5));
        Assert.Contains("components (5) must not exceed dimensions (4)", e1.Message);
        var e2 = Assert.Throws<ArgumentException>(() => VectorPreprocessing.NormalizeRows(x, 4, 4));
        Assert.Contains("length 12 does not match the expected 16", e2.Message);
        x[7] = float.NaN;
        var e3 = Assert.Throws<ArgumentException>(() => VectorPreprocessing.NormalizeRows(x, 3, 4));
        Assert.Contains("row 1, column 3", e3.Message);
    }
}
