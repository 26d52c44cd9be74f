using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Tests.Linalg;

public class RandomizedSvdTests
{
    /// <summary>A = U diag(σ) Vᵀ with random orthonormal U (m × r), V (n × r) from MathNet QR of Gaussian matrices.</summary>
    private static Matrix<double> WithSpectrum(int m, int n, double[] sigma, int seed)
    {
        var rng = new Random(seed);
        var dist = new MathNet.Numerics.Distributions.Normal(0, 1, rng);
        int r = sigma.Length;
        var u = Matrix<double>.Build.Random(m, r, dist).QR().Q.SubMatrix(0, m, 0, r);
        var v = Matrix<double>.Build.Random(n, r, dist).QR().Q.SubMatrix(0, n, 0, r);
        return u * Matrix<double>.Build.DenseOfDiagonalArray(sigma) * v.Transpose();
    }

    private static SparseMatrix ToSparse(Matrix<double> a)
    {
        var dense = new float[a.RowCount * a.ColumnCount];
        for (int i = 0; i < a.RowCount; i++) for (int j = 0; j < a.ColumnCount; j++) dense[i * a.ColumnCount + j] = (float)a[i, j];
        return SparseMatrix.FromDense(dense, a.RowCount, a.ColumnCount);
    }

    /// <summary>The float matrix actually decomposed, back in double (so the reference sees the same input).</summary>
    private static Matrix<double> AsDouble(SparseMatrix s)
    {
        var d = s.ToDense();
        return Matrix<double>.Build.Dense(s.Rows, s.Columns, (i, j) => d[i * s.Columns + j]);
    }

    private static Matrix<double> Factor(float[] values, int rows, int k) => Matrix<double>.Build.Dense(rows, k, (i, j) => values[i * k + j]);

    private static void AssertOrthonormalColumns(float[] values, int rows, int k, double tolerance)
    {
        var f = Factor(values, rows, k);
        var gram = f.TransposeThisAndMultiply(f);
        for (int i = 0; i < k; i++)
            for (int j = 0; j < k; j++)
                Assert.True(Math.Abs(gram[i, j] - (i == j ? 1 : 0)) <= tolerance, $"FᵀF[{i},{j}] = {gram[i, j]}");
    }

    [Theory]
    [InlineData(90, 70, 10, 1)]
    [InlineData(70, 90, 8, 2)]
    [InlineData(130, 64, 16, 3)]
    public void Compute_DecayingSpectrum_MatchesMathNetFullSvd(int m, int n, int k, int seed)
    {
        // Reference: MathNet.Numerics 5.0 dense SVD (LAPACK-style Golub-Kahan) of the same float matrix, in double.
        var sigma = Enumerable.Range(0, Math.Min(m, n)).Select(j => Math.Pow(0.85, j)).ToArray();
        var sparse = ToSparse(WithSpectrum(m, n, sigma, seed));
        var reference = AsDouble(sparse).Svd(computeVectors: true);
        var svd = RandomizedSvd.Compute(sparse, k, new RandomizedSvdOptions { Seed = seed });
        Assert.Equal(k, svd.Rank);
        for (int j = 0; j < k; j++)
        {
            double expected = reference.S[j];
            // Tolerance 1e-4 relative (the task's requirement); the input is float, so ~1e-6 is the floor.
            Assert.True(Math.Abs(svd.SingularValues[j] - expected) <= 1e-4 * expected, $"σ_{j} = {svd.SingularValues[j]}, MathNet {expected}");
            // Singular vectors agree up to sign (the spectrum has distinct values, gap ratio 0.85).
            double uDot = 0, vDot = 0;
            for (int i = 0; i < m; i++) uDot += svd.U[i * k + j] * reference.U[i, j];
            for (int i = 0; i < n; i++) vDot += svd.V[i * k + j] * reference.VT[j, i];
            Assert.True(Math.Abs(Math.Abs(uDot) - 1) < 1e-3, $"|u_{j}·u_ref| = {Math.Abs(uDot)}");
            Assert.True(Math.Abs(Math.Abs(vDot) - 1) < 1e-3, $"|v_{j}·v_ref| = {Math.Abs(vDot)}");
        }
        AssertOrthonormalColumns(svd.U, m, k, 1e-4);
        AssertOrthonormalColumns(svd.V, n, k, 1e-4);
    }

    [Fact]
    public void Compute_SketchCoversAllColumns_IsExactForRandomSparseMatrix()
    {
        // With k + p ≥ min(m, n) the sketch spans the whole range: the values must match MathNet's to float precision.
        var rng = new Random(9);
        int m = 60, n = 25;
        var dense = new float[m * n];
        for (int i = 0; i < dense.Length; i++) dense[i] = rng.Next(4) == 0 ? (float)rng.NextDouble() : 0;
        var sparse = SparseMatrix.FromDense(dense, m, n);
        var reference = AsDouble(sparse).Svd(false);
        var svd = RandomizedSvd.Compute(sparse, 15, new RandomizedSvdOptions { Oversample = 10, PowerIterations = 0 });
        for (int j = 0; j < 15; j++) Assert.True(Math.Abs(svd.SingularValues[j] - reference.S[j]) <= 1e-4 * reference.S[j]);
    }

    [Theory]
    [InlineData(0)]
    [InlineData(1)]
    public void FindRange_SpectralError_WithinHalkoBound(int q)
    {
        // Halko, Martinsson & Tropp 2011, SIAM Review 53(2), Theorem 10.6 (q = 0) and Corollary 10.10 (power scheme),
        // from memory: E‖(I − QQᵀ)A‖ ≤ [(1 + √(k/(p−1))) σ_{k+1}^{2q+1} + (e√(k+p)/p) (Σ_{j>k} σ_j^{2(2q+1)})^{1/2}]^{1/(2q+1)}.
        // Checked on the mean over 20 seeds (an expectation bound), spectrum σ_j = j^{-1.5}.
        int m = 160, n = 120, k = 10, p = 6;
        var sigma = Enumerable.Range(1, n).Select(j => Math.Pow(j, -1.5)).ToArray();
        var a = WithSpectrum(m, n, sigma, 17);
        var sparse = ToSparse(a);
        var ad = AsDouble(sparse);
        double exponent = 2 * q + 1;
        double tail = Math.Sqrt(sigma.Skip(k).Sum(s => Math.Pow(s, 2 * exponent)));
        double bound = Math.Pow((1 + Math.Sqrt(k / (p - 1.0))) * Math.Pow(sigma[k], exponent) + Math.E * Math.Sqrt(k + p) / p * tail, 1 / exponent);
        double sum = 0;
        int seeds = 20;
        for (int s = 0; s < seeds; s++)
        {
            var options = new RandomizedSvdOptions { Oversample = p, PowerIterations = q, Seed = 100 + s };
            var qf = RandomizedSvd.FindRange(sparse, sparse.Transpose(), k, options, 2, null, out int l);
            Assert.Equal(k + p, l);
            var qm = Factor(qf, m, l);
            sum += (ad - qm * (qm.TransposeThisAndMultiply(ad))).L2Norm();
        }
        double mean = sum / seeds;
        Assert.True(mean <= bound, $"mean spectral error {mean:E4} exceeds the bound {bound:E4} (σ_(k+1) = {sigma[k]:E4})");
        // Lower limit (Eckart-Young): no basis of rank k + p does better than σ_{k+p+1}, so the error cannot be tiny.
        Assert.True(mean >= sigma[k + p] * (1 - 1e-3));
    }

    [Fact]
    public void Compute_ThreadCount_DoesNotChangeResult()
    {
        var sigma = Enumerable.Range(0, 50).Select(j => 1.0 / (1 + j)).ToArray();
        var sparse = ToSparse(WithSpectrum(300, 200, sigma, 5));
        var one = RandomizedSvd.Compute(sparse, 12, new RandomizedSvdOptions { Threads = 1, Seed = 3 });
        var two = RandomizedSvd.Compute(sparse, 12, new RandomizedSvdOptions { Threads = 2, Seed = 3 });
        Assert.Equal(one.SingularValues, two.SingularValues);
        Assert.Equal(one.U, two.U);
        Assert.Equal(one.V, two.V);
    }

    [Fact]
    public void Compute_RankDeficient_ReportsRankAndExactValues()
    {
        double[] sigma = [5, 2, 1];
        var sparse = ToSparse(WithSpectrum(50, 40, sigma, 8));
        var svd = RandomizedSvd.Compute(sparse, 6, new RandomizedSvdOptions());
        Assert.Equal(3, svd.Rank);
        for (int j = 0; j < 3; j++) Assert.Equal(sigma[j], svd.SingularValues[j], 4);
        for (int j = 3; j < 6; j++) Assert.Equal(0, svd.SingularValues[j]);
        AssertOrthonormalColumns(svd.U.Chunk(6).SelectMany(r => r.Take(3)).ToArray(), 50, 3, 1e-4);
    }

    [Fact]
    public void Compute_FactorsReproduceMatrix()
    {
        // Exact rank-8 matrix, k = 8: U Σ Vᵀ must give A back (up to float rounding).
        var sigma = Enumerable.Range(0, 8).Select(j => 10.0 - j).ToArray();
        var a = WithSpectrum(70, 45, sigma, 12);
        var sparse = ToSparse(a);
        var svd = RandomizedSvd.Compute(sparse, 8, new RandomizedSvdOptions());
        var rebuilt = Factor(svd.U, 70, 8) * Matrix<double>.Build.DenseOfDiagonalArray(svd.SingularValues) * Factor(svd.V, 45, 8).Transpose();
        Assert.True((rebuilt - AsDouble(sparse)).FrobeniusNorm() <= 1e-4 * a.FrobeniusNorm());
    }

    [Fact]
    public void Gram_MatchesScalarTwin()
    {
        // The vectorised rank-8 kernel against its scalar twin (plain double sums), on awkward sizes (vector width 4 ± 1).
        var rng = new Random(2);
        foreach (var (rows, l) in new[] { (1, 1), (7, 3), (9, 5), (33, 17), (100, 31), (17, 4) })
        {
            var y = Enumerable.Range(0, rows * l).Select(_ => (float)(rng.NextDouble() - 0.5)).ToArray();
            var g = RandomizedSvd.Gram(y, rows, l, 2);
            var reference = new double[l * l];
            RandomizedSvd.GramRangeScalar(y, 0, rows, l, reference);
            for (int i = 0; i < l; i++)
                for (int j = i; j < l; j++)
                {
                    Assert.Equal(reference[i * l + j], g[i, j], 10);
                    Assert.Equal(g[i, j], g[j, i]);
                }
        }
    }
}
