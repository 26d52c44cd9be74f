using System.Numerics.Tensors;
using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.Vectors;

/// <summary>Row preprocessing of an embedding before sparse coding.</summary>
public static class VectorPreprocessing
{
    /// <summary>Scales every row (rows×dims, row-major) to unit Euclidean norm in place (common practice before
    /// coding word vectors). Zero rows are left as they are; returns how many there were.</summary>
    public static int NormalizeRows(Span<float> values, int rows, int dims)
    {
        Guard.NonNegative(rows); Guard.Positive(dims);
        Guard.Length(values.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        int zero = 0;
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            double norm = Math.Sqrt(TensorPrimitives.Dot(row, row));
            if (norm == 0) { zero++; continue; }
            TensorPrimitives.Multiply(row, (float)(1.0 / norm), row);
        }
        return zero;
    }

    /// <summary>
    /// "All-but-the-top": x ← (x − μ) − Σ_{k≤D} (u_kᵀ(x − μ)) u_k, where μ is the mean row and u_1..u_D are the top
    /// eigenvectors of the covariance of the centred rows (d×d). Mu &amp; Viswanath 2018, ICLR, "All-but-the-Top: Simple
    /// and Effective Postprocessing for Word Representations", Algorithm 1. In place; rows×dims row-major.
    /// </summary>
    /// <remarks>The covariance Xᵀ X is accumulated in double over blocks of transposed rows through <see cref="Gemm"/>;
    /// the small d×d symmetric eigen-decomposition is MathNet.Numerics'.</remarks>
    public static void RemoveTopComponents(Span<float> values, int rows, int dims, int components, int threads = 0)
    {
        Guard.Positive(rows); Guard.Positive(dims); Guard.NonNegative(components);
        Guard.Below(components, dims, "dimensions");
        Guard.Length(values.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        Guard.Finite(values, dims, "vectors");
        var mean = new double[dims];
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            for (int j = 0; j < dims; j++) mean[j] += row[j];
        }
        var meanF = new float[dims];
        for (int j = 0; j < dims; j++) meanF[j] = (float)(mean[j] / rows);
        for (int i = 0; i < rows; i++) TensorPrimitives.Subtract(values.Slice(i * dims, dims), meanF, values.Slice(i * dims, dims));
        if (components == 0) return;

        const int block = 1024;
        var transposed = new float[dims * block];
        var partial = new float[dims * dims];
        var cov = new double[dims * dims];
        for (int start = 0; start < rows; start += block)
        {
            int n = Math.Min(block, rows - start);
            for (int i = 0; i < n; i++)
                for (int j = 0; j < dims; j++)
                    transposed[j * n + i] = values[(start + i) * dims + j];
            Gemm.MultiplyTransposed(transposed.AsSpan(0, dims * n), dims, transposed.AsSpan(0, dims * n), dims, n, partial, threads);
            for (int j = 0; j < cov.Length; j++) cov[j] += partial[j];
        }
        var matrix = Matrix<double>.Build.Dense(dims, dims, (r, c) => cov[r * dims + c]);
        var evd = matrix.Evd(Symmetricity.Symmetric);
        // MathNet returns eigenvalues in ascending order for symmetric matrices; take the last D columns.
        var top = new float[components * dims];
        for (int k = 0; k < components; k++)
        {
            var u = evd.EigenVectors.Column(dims - 1 - k);
            for (int j = 0; j < dims; j++) top[k * dims + j] = (float)u[j];
        }
        for (int i = 0; i < rows; i++)
        {
            var row = values.Slice(i * dims, dims);
            for (int k = 0; k < components; k++)
            {
                var u = top.AsSpan(k * dims, dims);
                float p = TensorPrimitives.Dot(row, u);
                TensorPrimitives.MultiplyAdd(u, -p, row, row);
            }
        }
    }
}
