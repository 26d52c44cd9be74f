using SenseSplit.Core.Linalg;

namespace SenseSplit.Tests.Linalg;

public class SparseMatrixTests
{
    [Theory]
    [InlineData(1)]
    [InlineData(15)]
    [InlineData(16)]
    [InlineData(17)]
    [InlineData(63)]
    [InlineData(64)]
    [InlineData(65)]
    [InlineData(310)]
    public void Multiply_Simd_MatchesScalarTwin(int width)
    {
        var rng = new Random(width);
        int rows = 300, cols = 90;
        var dense = new float[rows * cols];
        for (int i = 0; i < dense.Length; i++) dense[i] = rng.Next(5) == 0 ? (float)(rng.NextDouble() - 0.3) : 0;
        var a = SparseMatrix.FromDense(dense, rows, cols);
        var x = Enumerable.Range(0, cols * width).Select(_ => (float)(rng.NextDouble() - 0.5)).ToArray();
        var fast = new float[rows * width];
        var slow = new float[rows * width];
        a.Multiply(x, width, fast, 2);
        a.MultiplyScalar(x, width, slow);
        // Same terms, same order, fused multiply-adds in both: equal up to rounding of the lane-wise FMA (exact here).
        for (int i = 0; i < fast.Length; i++) Assert.True(Math.Abs(fast[i] - slow[i]) <= 1e-5f, $"{i}: {fast[i]} vs {slow[i]}");
    }

    [Fact]
    public void Transpose_TwiceIsIdentity_AndMatchesDense()
    {
        float[] dense = [0, 1, 0, 2, 3, 0, 0, 0, 4];
        var a = SparseMatrix.FromDense(dense, 3, 3);
        Assert.Equal([0f, 2, 0, 1, 3, 0, 0, 0, 4], a.Transpose().ToDense());
        Assert.Equal(dense, a.Transpose().Transpose().ToDense());
    }

    [Fact]
    public void Constructor_UnsortedColumns_Throws()
    {
        Assert.Throws<ArgumentException>(() => new SparseMatrix(1, 3, [0, 2], [2, 1], [1f, 1f]));
    }
}
