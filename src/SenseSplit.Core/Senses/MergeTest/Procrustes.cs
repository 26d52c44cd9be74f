using System.Numerics.Tensors;
using MathNet.Numerics.LinearAlgebra;

namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>The orthogonal map R (dims×dims, row-major) of <see cref="Procrustes.Fit"/> and how well it aligns.</summary>
/// <param name="Rotation">R, row-major dims×dims, orthogonal (RᵀR = I; det R may be −1).</param>
/// <param name="RelativeResidual">||A R − B||_F / ||B||_F after alignment.</param>
/// <param name="RelativeResidualBefore">||A − B||_F / ||B||_F without alignment.</param>
public sealed record ProcrustesResult(double[] Rotation, int Dimensions, double RelativeResidual, double RelativeResidualBefore, bool IsReflection);

/// <summary>
/// Orthogonal Procrustes: R = argmin over orthogonal R of ||A R − B||_F, for A and B of rows×dims (row-major; row i of
/// both is the same word in two embeddings). Used to bring a re-trained embedding into the coordinates of the
/// original one before comparing vectors.
/// </summary>
/// <remarks>
/// Schönemann 1966, "A generalized solution of the orthogonal Procrustes problem", Psychometrika 31(1): with the SVD
/// AᵀB = U S Vᵀ, the minimiser is R = U Vᵀ. The residual uses ||A R − B||² = ||A||² + ||B||² − 2 tr(S) (same paper).
/// Reflections are allowed (the problem is over all orthogonal matrices; a word embedding's axes have no handedness).
/// AᵀB accumulates in double; the d×d SVD is MathNet.Numerics'.
/// </remarks>
public static class Procrustes
{
    public static ProcrustesResult Fit(ReadOnlySpan<float> source, ReadOnlySpan<float> target, int rows, int dims)
    {
        Guard.Positive(rows);
        Guard.Positive(dims);
        Guard.Length(source.Length, (long)rows * dims, "source (rows×dims)");
        Guard.Length(target.Length, (long)rows * dims, "target (rows×dims)");
        Guard.Finite(source, dims, "source");
        Guard.Finite(target, dims, "target");

        // M = AᵀB as a sum of rank-one updates M[j,:] += A[i,j] · B[i,:], one pass over the rows.
        var m = new double[dims * dims];
        var brow = new double[dims];
        double normA = 0, normB = 0, crossBefore = 0;
        for (int i = 0; i < rows; i++)
        {
            var a = source.Slice(i * dims, dims);
            var b = target.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++)
            {
                brow[j] = b[j];
                normA += (double)a[j] * a[j];
                normB += (double)b[j] * b[j];
                crossBefore += (double)a[j] * b[j];
            }
            for (int j = 0; j < dims; j++)
            {
                double aij = a[j];
                if (aij == 0) continue;
                var mj = m.AsSpan(j * dims, dims);
                TensorPrimitives.MultiplyAdd(brow, aij, mj, mj);
            }
        }
        if (!(normB > 0)) throw new ArgumentException("target rows are all zero", nameof(target));

        var svd = Matrix<double>.Build.Dense(dims, dims, (r, c) => m[r * dims + c]).Svd(computeVectors: true);
        var rotation = svd.U * svd.VT;
        var flat = new double[dims * dims];
        for (int r = 0; r < dims; r++)
            for (int c = 0; c < dims; c++) flat[r * dims + c] = rotation[r, c];

        double traceS = svd.S.Sum();
        double after = Math.Max(0, normA + normB - 2 * traceS);
        double before = Math.Max(0, normA + normB - 2 * crossBefore);
        return new ProcrustesResult(flat, dims, Math.Sqrt(after / normB), Math.Sqrt(before / normB), rotation.Determinant() < 0);
    }

    /// <summary>Writes X R into <paramref name="output"/> (rows×dims) for X rows×dims; accumulates in double.</summary>
    public static void Apply(ReadOnlySpan<float> vectors, int rows, ProcrustesResult fit, Span<float> output)
    {
        ArgumentNullException.ThrowIfNull(fit);
        int dims = fit.Dimensions;
        Guard.NonNegative(rows);
        Guard.Length(vectors.Length, (long)rows * dims, "vectors (rows×dims)");
        Guard.Length(output.Length, (long)rows * dims, "output (rows×dims)");
        var acc = new double[dims];
        var rot = fit.Rotation;
        for (int i = 0; i < rows; i++)
        {
            Array.Clear(acc);
            var x = vectors.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++)
            {
                double xj = x[j];
                if (xj == 0) continue;
                TensorPrimitives.MultiplyAdd(rot.AsSpan(j * dims, dims), xj, acc, acc);
            }
            var o = output.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++) o[j] = (float)acc[j];
        }
    }
}
