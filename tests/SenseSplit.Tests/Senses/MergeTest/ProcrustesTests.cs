using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class ProcrustesTests
{
    // A random orthogonal d×d matrix: Q of the QR factorisation (MathNet.Numerics) of a Gaussian matrix.
    private static Matrix<double> RandomOrthogonal(Random rng, int d)
        => Matrix<double>.Build.Dense(d, d, (_, _) => MergeTestData.Gaussian(rng)).QR().Q;

    private static float[] Times(float[] a, int rows, int d, Matrix<double> q)
    {
        var b = new float[rows * d];
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < d; j++)
            {
                double s = 0;
                for (int k = 0; k < d; k++) s += a[i * d + k] * q[k, j];
                b[i * d + j] = (float)s;
            }
        return b;
    }

    private static double FrobeniusDistance(double[] r, Matrix<double> q)
    {
        int d = q.RowCount;
        double s = 0;
        for (int i = 0; i < d; i++) for (int j = 0; j < d; j++) { double e = r[i * d + j] - q[i, j]; s += e * e; }
        return Math.Sqrt(s);
    }

    private static double Residual(float[] a, float[] b, int rows, int d, double[] r)
    {
        var m = Matrix<double>.Build.Dense(d, d, (i, j) => r[i * d + j]);
        var ar = Times(a, rows, d, m);
        double s = 0;
        for (int i = 0; i < ar.Length; i++) { double e = ar[i] - b[i]; s += e * e; }
        return Math.Sqrt(s);
    }

    [Fact]
    public void Fit_ExactlyRotatedCopy_RecoversRotation()
    {
        // Schönemann 1966, Psychometrika 31: for B = A Q with Q orthogonal and A of full column rank, R = U Vᵀ of
        // AᵀB = U S Vᵀ equals Q. Tolerance: float inputs, d = 12, so about 1e-6 per entry; 1e-4 on the Frobenius norm.
        var rng = new Random(21);
        int rows = 200, d = 12;
        var a = MergeTestData.GaussianMatrix(rng, rows, d);
        var q = RandomOrthogonal(rng, d);
        var b = Times(a, rows, d, q);
        var fit = Procrustes.Fit(a, b, rows, d);
        Assert.True(FrobeniusDistance(fit.Rotation, q) < 1e-4, $"||R − Q|| = {FrobeniusDistance(fit.Rotation, q)}");
        Assert.True(fit.RelativeResidual < 1e-3, $"relative residual {fit.RelativeResidual}");
        Assert.True(fit.RelativeResidualBefore > 0.5);
    }

    [Fact]
    public void Fit_NoisyRotatedCopy_WithinPerturbationBoundAndNoWorseThanTruth()
    {
        // B = A Q + σE with A (n×d) and E standard Gaussian. First-order perturbation of the polar factor gives an
        // error of about σ/√n per free (skew) entry, ||R − Q||_F ≈ σ·√(d(d−1)/2)/√n ≈ 0.05·6.7/22 ≈ 0.015 for
        // n = 500, d = 10; we allow 0.05 (above 3× that). Optimality (Schönemann 1966): R fits at least as well as Q.
        var rng = new Random(8);
        int rows = 500, d = 10;
        double sigma = 0.05;
        var a = MergeTestData.GaussianMatrix(rng, rows, d);
        var q = RandomOrthogonal(rng, d);
        var b = Times(a, rows, d, q);
        for (int i = 0; i < b.Length; i++) b[i] += (float)(sigma * MergeTestData.Gaussian(rng));
        var fit = Procrustes.Fit(a, b, rows, d);
        double error = FrobeniusDistance(fit.Rotation, q);
        Assert.True(error < 0.05, $"||R − Q|| = {error}");
        var qFlat = new double[d * d];
        for (int i = 0; i < d; i++) for (int j = 0; j < d; j++) qFlat[i * d + j] = q[i, j];
        Assert.True(Residual(a, b, rows, d, fit.Rotation) <= Residual(a, b, rows, d, qFlat) * (1 + 1e-6));
        // RᵀR = I.
        var r = Matrix<double>.Build.Dense(d, d, (i, j) => fit.Rotation[i * d + j]);
        Assert.True((r.TransposeThisAndMultiply(r) - Matrix<double>.Build.DenseIdentity(d)).FrobeniusNorm() < 1e-10);
        // The reported residual uses ||A||² + ||B||² − 2 tr S; check it against the direct ||A R − B|| / ||B||.
        double normB = Math.Sqrt(b.Sum(x => (double)x * x));
        Assert.Equal(Residual(a, b, rows, d, fit.Rotation) / normB, fit.RelativeResidual, 4);
    }

    [Fact]
    public void Fit_PlanarCase_MatchesClosedFormAngle()
    {
        // In two dimensions, minimising ||A R(θ) − B|| over rotations R(θ) = [[cos θ, sin θ], [−sin θ, cos θ]]
        // (row vectors) gives tan θ = Σ(a_x b_y − a_y b_x) / Σ(a_x b_x + a_y b_y): set d/dθ of tr(R(θ)ᵀ AᵀB) to zero
        // (textbook planar Procrustes). Random targets make the optimum a proper rotation here.
        var rng = new Random(4);
        int rows = 40;
        var a = MergeTestData.GaussianMatrix(rng, rows, 2);
        var b = new float[rows * 2];
        double theta = 0.7;
        for (int i = 0; i < rows; i++)
        {
            double x = a[2 * i], y = a[2 * i + 1];
            b[2 * i] = (float)(x * Math.Cos(theta) - y * Math.Sin(theta) + 0.3 * MergeTestData.Gaussian(rng));
            b[2 * i + 1] = (float)(x * Math.Sin(theta) + y * Math.Cos(theta) + 0.3 * MergeTestData.Gaussian(rng));
        }
        double num = 0, den = 0;
        for (int i = 0; i < rows; i++)
        {
            num += (double)a[2 * i] * b[2 * i + 1] - (double)a[2 * i + 1] * b[2 * i];
            den += (double)a[2 * i] * b[2 * i] + (double)a[2 * i + 1] * b[2 * i + 1];
        }
        double best = Math.Atan2(num, den);
        var fit = Procrustes.Fit(a, b, rows, 2);
        Assert.False(fit.IsReflection);
        Assert.Equal(Math.Cos(best), fit.Rotation[0], 6);
        Assert.Equal(Math.Sin(best), fit.Rotation[1], 6);
        Assert.Equal(-Math.Sin(best), fit.Rotation[2], 6);
    }

    [Fact]
    public void Fit_MirroredCopy_ReturnsReflection()
    {
        // The orthogonal Procrustes problem ranges over all orthogonal matrices (Schönemann 1966), so a mirrored copy is
        // matched exactly by a reflection (det −1).
        var rng = new Random(2);
        int rows = 60, d = 4;
        var a = MergeTestData.GaussianMatrix(rng, rows, d);
        var mirror = Matrix<double>.Build.DenseDiagonal(d, d, i => i == d - 1 ? -1 : 1);
        var b = Times(a, rows, d, mirror);
        var fit = Procrustes.Fit(a, b, rows, d);
        Assert.True(fit.IsReflection);
        Assert.True(FrobeniusDistance(fit.Rotation, mirror) < 1e-4);
    }

    [Fact]
    public void Apply_RotatesRowsLikeDenseProduct()
    {
        var rng = new Random(6);
        int rows = 7, d = 5;
        var a = MergeTestData.GaussianMatrix(rng, rows, d);
        var q = RandomOrthogonal(rng, d);
        var fit = Procrustes.Fit(a, Times(a, rows, d, q), rows, d);
        var output = new float[rows * d];
        Procrustes.Apply(a, rows, fit, output);
        var expected = Times(a, rows, d, Matrix<double>.Build.Dense(d, d, (i, j) => fit.Rotation[i * d + j]));
        for (int i = 0; i < output.Length; i++) Assert.Equal(expected[i], output[i], 5);
    }

    [Fact]
    public void Fit_ShapeMismatchOrNaN_Throws()
    {
        Assert.Throws<ArgumentException>(() => Procrustes.Fit(new float[6], new float[5], 3, 2));
        var bad = new float[6];
        bad[3] = float.NaN;
        var ex = Assert.Throws<ArgumentException>(() => Procrustes.Fit(bad, new float[6], 3, 2));
        Assert.Contains("row 1, column 1", ex.Message);
    }
}
