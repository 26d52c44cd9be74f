using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Cli.Commands;

namespace SenseSplit.Tests.Cli;

/// <summary>The row preparation the atoms command runs before learning (a stand-in until Core's VectorPreprocessing lands).</summary>
public class AtomsPreparationTests
{
    [Fact]
    public void NormalizeRows_UnitLengthAndZeroRowsCounted()
    {
        float[] v = [3, 4, 0, 0, 0, 0, -1, 0, 0, 1e-20f, 2e-20f, 0];
        int zero = AtomsCommand.Preparation.NormalizeRows(v, 4, 3);
        Assert.Equal(1, zero);
        Assert.Equal([0.6f, 0.8f, 0f], v[..3]);
        Assert.Equal([0f, 0f, 0f], v[3..6]);
        Assert.Equal([-1f, 0f, 0f], v[6..9]);
        Assert.Equal(1.0, Math.Sqrt(v[9..].Sum(x => (double)x * x)), 6); // tiny row: norm taken in double, no underflow
    }

    [Fact]
    public void RemoveMeanAndTopComponents_ResultHasZeroMeanAndIsOrthogonalToTopSingularVectors()
    {
        // Reference: MathNet.Numerics 5.0 SVD of the centred matrix; the leading right singular vectors of the centred
        // data are the leading principal directions (Mu and Viswanath 2018, Algorithm 1, steps 1-3).
        int rows = 1500, dims = 12, remove = 3;
        var rnd = new Random(5);
        var values = new float[rows * dims];
        for (int i = 0; i < rows; i++)
            for (int j = 0; j < dims; j++)
                values[i * dims + j] = (float)(rnd.NextDouble() * (j < 3 ? 10 - 3 * j : 1) + (j == 0 ? 5 : 0)); // strong leading directions, non-zero mean
        var centred = Matrix<double>.Build.Dense(rows, dims, (i, j) => values[i * dims + j]);
        var mean = centred.ColumnSums() / rows;
        for (int i = 0; i < rows; i++) centred.SetRow(i, centred.Row(i) - mean);
        var top = centred.Svd(computeVectors: true).VT.SubMatrix(0, remove, 0, dims);

        AtomsCommand.Preparation.RemoveMeanAndTopComponents(values, rows, dims, remove, threads: 1);
        var result = Matrix<double>.Build.Dense(rows, dims, (i, j) => values[i * dims + j]);
        var projections = result * top.Transpose();
        // float32 data of magnitude ~10: projections are rounding-sized (1e-3 leaves room for float accumulation).
        Assert.True(projections.Enumerate().All(x => Math.Abs(x) < 1e-3), $"largest projection {projections.Enumerate().Max(Math.Abs)}");
        Assert.True((result.ColumnSums() / rows).Enumerate().All(x => Math.Abs(x) < 1e-4));
        // The rest of the data is kept: the remaining variance equals the centred total minus the removed part.
        var kept = centred - centred * top.Transpose() * top;
        Assert.Equal(kept.FrobeniusNorm(), result.FrobeniusNorm(), 2);
    }
}
