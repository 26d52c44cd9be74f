using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class MixtureFitTests
{
    [Fact]
    public void Fit_ExactCombination_RecoversWeights()
    {
        var rng = new Random(1);
        var v1 = MergeTestData.UnitVector(rng, 30);
        var v2 = MergeTestData.UnitVector(rng, 30);
        var v = v1.Zip(v2, (x, y) => (float)(0.7 * x + 0.2 * y)).ToArray();
        var fit = MixtureFit.Fit(v, v1, v2);
        Assert.False(fit.IsDegenerate);
        Assert.Equal(0.7, fit.Alpha, 5);
        Assert.Equal(0.2, fit.Beta, 5);
        Assert.Equal(1, fit.CosineToSpan, 6);
        Assert.True(fit.RelativeResidual < 1e-5);
    }

    [Fact]
    public void Fit_RandomVectors_MatchesMathNetQrLeastSquares()
    {
        // Reference: MathNet.Numerics' QR least-squares solve of [v1 v2] x ≈ v (Householder QR, numerically
        // independent of our normal equations). Agreement to 1e-6 covers float inputs with well-separated columns.
        var rng = new Random(9);
        for (int trial = 0; trial < 20; trial++)
        {
            int d = 10 + trial * 7;
            var v1 = MergeTestData.GaussianMatrix(rng, 1, d);
            var v2 = MergeTestData.GaussianMatrix(rng, 1, d);
            var v = MergeTestData.GaussianMatrix(rng, 1, d);
            var x = Matrix<double>.Build.Dense(d, 2, (i, j) => j == 0 ? v1[i] : v2[i]);
            var y = Vector<double>.Build.Dense(d, i => v[i]);
            var solution = x.QR().Solve(y);
            var fit = MixtureFit.Fit(v, v1, v2);
            Assert.Equal(solution[0], fit.Alpha, 6);
            Assert.Equal(solution[1], fit.Beta, 6);
            var projection = x * solution;
            double cos = projection.DotProduct(y) / (projection.L2Norm() * y.L2Norm());
            Assert.Equal(cos, fit.CosineToSpan, 6);
            Assert.Equal((y - projection).L2Norm() / y.L2Norm(), fit.RelativeResidual, 6);
        }
    }

    [Fact]
    public void Fit_ComponentOutsideSpan_CosineIsNormRatio()
    {
        // v = p + w with w ⊥ span(v1, v2): cos(v, span) = ||p|| / sqrt(||p||² + ||w||²) (Pythagoras).
        float[] v1 = [1, 0, 0, 0], v2 = [0, 1, 0, 0], v = [3, 4, 0, 12];
        var fit = MixtureFit.Fit(v, v1, v2);
        Assert.Equal(3, fit.Alpha, 10);
        Assert.Equal(4, fit.Beta, 10);
        Assert.Equal(5.0 / 13, fit.CosineToSpan, 10);
        Assert.Equal(12.0 / 13, fit.RelativeResidual, 10);
    }

    [Fact]
    public void Fit_ParallelWords_DegenerateWithCosineToLine()
    {
        float[] v1 = [1, 2, 3], v2 = [2, 4, 6], v = [1, 2, 4];
        var fit = MixtureFit.Fit(v, v1, v2);
        Assert.True(fit.IsDegenerate);
        Assert.True(double.IsNaN(fit.Alpha) && double.IsNaN(fit.Beta) && double.IsNaN(fit.WeightRatio));
        Assert.Contains("parallel", fit.Diagnostic);
        Assert.Equal(17 / (Math.Sqrt(14) * Math.Sqrt(21)), fit.CosineToSpan, 6);
    }

    [Fact]
    public void Fit_ZeroMergedVector_Degenerate()
    {
        var fit = MixtureFit.Fit([0, 0, 0], [1, 0, 0], [0, 1, 0]);
        Assert.True(fit.IsDegenerate);
        Assert.Contains("merged vector is zero", fit.Diagnostic);
        Assert.True(double.IsNaN(fit.CosineToSpan));
    }

    [Fact]
    public void Fit_LengthMismatchOrInfinite_Throws()
    {
        Assert.Throws<ArgumentException>(() => MixtureFit.Fit([1, 2], [1, 2, 3], [1, 2]));
        Assert.Throws<ArgumentException>(() => MixtureFit.Fit([1, float.PositiveInfinity], [1, 2], [2, 1]));
    }
}
