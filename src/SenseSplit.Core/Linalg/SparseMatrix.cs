using System.Runtime.Intrinsics;

namespace SenseSplit.Core.Linalg;

/// <summary>
/// A rows × columns single-precision matrix in compressed sparse row form: row i holds the entries
/// ColumnIndices[k], Values[k] for k in [RowPointers[i], RowPointers[i + 1]), columns strictly increasing.
/// </summary>
public sealed class SparseMatrix
{
    /// <summary>Rows per work item of the parallel products (fixed, so results do not depend on the thread count).</summary>
    private const int RowBlock = 256;

    public SparseMatrix(int rows, int columns, int[] rowPointers, int[] columnIndices, float[] values)
    {
        Guard.NonNegative(rows);
        Guard.NonNegative(columns);
        ArgumentNullException.ThrowIfNull(rowPointers);
        ArgumentNullException.ThrowIfNull(columnIndices);
        ArgumentNullException.ThrowIfNull(values);
        Guard.Length(rowPointers.Length, (long)rows + 1, "row pointers");
        Guard.Length(values.Length, columnIndices.Length, "values");
        if (rowPointers[0] != 0 || rowPointers[rows] != columnIndices.Length)
            throw new ArgumentException($"row pointers must run from 0 to the entry count ({columnIndices.Length}); got {rowPointers[0]}..{rowPointers[rows]}");
        for (int i = 0; i < rows; i++)
        {
            if (rowPointers[i + 1] < rowPointers[i]) throw new ArgumentException($"row pointers decrease at row {i}");
            for (int k = rowPointers[i]; k < rowPointers[i + 1]; k++)
            {
                int c = columnIndices[k];
                if ((uint)c >= (uint)columns) throw new ArgumentException($"row {i}: column {c} is outside 0..{columns - 1}");
                if (k > rowPointers[i] && c <= columnIndices[k - 1]) throw new ArgumentException($"row {i}: columns are not strictly increasing at column {c}");
            }
        }
        Guard.Finite(values, 0, "sparse matrix values");
        Rows = rows;
        Columns = columns;
        RowPointers = rowPointers;
        ColumnIndices = columnIndices;
        Values = values;
    }

    public int Rows { get; }
    public int Columns { get; }
    public int[] RowPointers { get; }
    public int[] ColumnIndices { get; }
    public float[] Values { get; }
    public int NonZeros => ColumnIndices.Length;
    public long Bytes => (long)NonZeros * 8 + (long)(Rows + 1) * 4;

    /// <summary>The non-zero entries of a row-major dense matrix.</summary>
    public static SparseMatrix FromDense(ReadOnlySpan<float> dense, int rows, int columns)
    {
        Guard.Length(dense.Length, (long)rows * columns, "dense matrix");
        var ptr = new int[rows + 1];
        var cols = new List<int>();
        var vals = new List<float>();
        for (int i = 0; i < rows; i++)
        {
            for (int j = 0; j < columns; j++)
            {
                float v = dense[i * columns + j];
                if (v != 0) { cols.Add(j); vals.Add(v); }
            }
            ptr[i + 1] = cols.Count;
        }
        return new SparseMatrix(rows, columns, ptr, cols.ToArray(), vals.ToArray());
    }

    /// <summary>Row-major dense copy.</summary>
    public float[] ToDense()
    {
        var dense = new float[(long)Rows * Columns];
        for (int i = 0; i < Rows; i++)
            for (int k = RowPointers[i]; k < RowPointers[i + 1]; k++) dense[(long)i * Columns + ColumnIndices[k]] = Values[k];
        return dense;
    }

    /// <summary>The transpose, Aᵀ (columns × rows), in CSR form (counting sort by column; rows stay ordered).</summary>
    public SparseMatrix Transpose()
    {
        var ptr = new int[Columns + 1];
        foreach (int c in ColumnIndices) ptr[c + 1]++;
        for (int c = 0; c < Columns; c++) ptr[c + 1] += ptr[c];
        var next = (int[])ptr.Clone();
        var cols = new int[NonZeros];
        var vals = new float[NonZeros];
        for (int i = 0; i < Rows; i++)
        {
            for (int k = RowPointers[i]; k < RowPointers[i + 1]; k++)
            {
                int at = next[ColumnIndices[k]]++;
                cols[at] = i;
                vals[at] = Values[k];
            }
        }
        return new SparseMatrix(Columns, Rows, ptr, cols, vals);
    }

    /// <summary>Y = A·X: X is Columns × <paramref name="width"/>, Y is Rows × width, both row-major (Y overwritten).</summary>
    /// <param name="threads">Worker count; 0 = processor count. Rows are computed independently, so the result does not depend on it.</param>
    public void Multiply(ReadOnlySpan<float> x, int width, Span<float> y, int threads = 0)
    {
        Guard.Positive(width);
        Guard.AtLeastLength(x.Length, (long)Columns * width, "X");
        Guard.AtLeastLength(y.Length, (long)Rows * width, "Y");
        int blocks = (Rows + RowBlock - 1) / RowBlock;
        int degree = threads > 0 ? threads : Environment.ProcessorCount;
        unsafe
        {
            fixed (float* px = x, py = y)
            {
                nint xAddress = (nint)px, yAddress = (nint)py;
                Parallel.For(0, blocks, new ParallelOptions { MaxDegreeOfParallelism = degree }, b =>
                {
                    int start = b * RowBlock, end = Math.Min(Rows, start + RowBlock);
                    MultiplyRows(start, end, (float*)xAddress, width, (float*)yAddress);
                });
            }
        }
    }

    private unsafe void MultiplyRows(int start, int end, float* x, int width, float* y)
    {
        var ptr = RowPointers;
        var cols = ColumnIndices;
        var vals = Values;
        int strips = Vector512.IsHardwareAccelerated ? width / 64 : 0;
        for (int i = start; i < end; i++)
        {
            float* yi = y + (long)i * width;
            int k0 = ptr[i], k1 = ptr[i + 1];
            int done = 0;
            // Strips of 64 columns kept in four 512-bit accumulators; one pass over the row's entries per strip.
            for (int s = 0; s < strips; s++, done += 64)
            {
                var a0 = Vector512<float>.Zero; var a1 = a0; var a2 = a0; var a3 = a0;
                for (int k = k0; k < k1; k++)
                {
                    var v = Vector512.Create(vals[k]);
                    float* xr = x + (long)cols[k] * width + done;
                    a0 = Vector512.FusedMultiplyAdd(v, Vector512.Load(xr), a0);
                    a1 = Vector512.FusedMultiplyAdd(v, Vector512.Load(xr + 16), a1);
                    a2 = Vector512.FusedMultiplyAdd(v, Vector512.Load(xr + 32), a2);
                    a3 = Vector512.FusedMultiplyAdd(v, Vector512.Load(xr + 48), a3);
                }
                a0.Store(yi + done); a1.Store(yi + done + 16); a2.Store(yi + done + 32); a3.Store(yi + done + 48);
            }
            if (done < width) MultiplyRowTail(k0, k1, x, width, yi, done);
        }
    }

    /// <summary>Columns [from, width) of one output row: 16-wide vectors, then scalars. Same sum order as the strips.</summary>
    private unsafe void MultiplyRowTail(int k0, int k1, float* x, int width, float* yi, int from)
    {
        var cols = ColumnIndices;
        var vals = Values;
        int j = from;
        if (Vector512.IsHardwareAccelerated)
        {
            for (; j + 16 <= width; j += 16)
            {
                var acc = Vector512<float>.Zero;
                for (int k = k0; k < k1; k++)
                    acc = Vector512.FusedMultiplyAdd(Vector512.Create(vals[k]), Vector512.Load(x + (long)cols[k] * width + j), acc);
                acc.Store(yi + j);
            }
        }
        for (; j < width; j++)
        {
            float acc = 0;
            for (int k = k0; k < k1; k++) acc = MathF.FusedMultiplyAdd(vals[k], x[(long)cols[k] * width + j], acc);
            yi[j] = acc;
        }
    }

    /// <summary>Scalar reference of <see cref="Multiply"/> (kept for the tests): same sums in the same order.</summary>
    internal void MultiplyScalar(ReadOnlySpan<float> x, int width, Span<float> y)
    {
        for (int i = 0; i < Rows; i++)
        {
            for (int j = 0; j < width; j++)
            {
                float acc = 0;
                for (int k = RowPointers[i]; k < RowPointers[i + 1]; k++) acc = MathF.FusedMultiplyAdd(Values[k], x[ColumnIndices[k] * width + j], acc);
                y[i * width + j] = acc;
            }
        }
    }
}
