namespace SenseSplit.Core.Cooccurrence;

/// <summary>
/// Symmetric word-word co-occurrence matrix X (words × words), X_ij = Σ over occurrences of i and j at distance
/// d ≤ window inside one context segment of 1/d. Stored as its upper triangle, row by row: row r holds the columns
/// c ≥ r in increasing order with value X_rc for c &gt; r and X_rr / 2 on the diagonal (a pair of equal words is stored
/// once but counts in both directions). Rows are spread over partitions: row r is local row r / P of partition r mod P.
/// </summary>
public sealed class CooccurrenceCounts
{
    private readonly int[][] _rowStart;
    private readonly int[][] _columns;
    private readonly float[][] _values;

    internal CooccurrenceCounts(int words, int[][] rowStart, int[][] columns, float[][] values, long[] wordCounts, long tokens)
    {
        Words = words;
        _rowStart = rowStart;
        _columns = columns;
        _values = values;
        WordCounts = wordCounts;
        Tokens = tokens;
        long nnz = 0;
        foreach (var p in rowStart) nnz += p[^1];
        UpperNonZeros = nnz;
    }

    public int Words { get; }
    /// <summary>Occurrences of each word id in the counted stream.</summary>
    public long[] WordCounts { get; }
    /// <summary>Tokens of the counted stream (including words not kept).</summary>
    public long Tokens { get; }
    /// <summary>Stored entries (upper triangle with diagonal).</summary>
    public long UpperNonZeros { get; }
    /// <summary>Bytes held by the stored entries.</summary>
    public long Bytes => UpperNonZeros * 8 + (long)Words * 4;

    /// <summary>Columns c ≥ <paramref name="row"/> and stored values of one row of the upper triangle.</summary>
    public void GetRow(int row, out ReadOnlySpan<int> columns, out ReadOnlySpan<float> values)
    {
        int p = row % _rowStart.Length, local = row / _rowStart.Length;
        int start = _rowStart[p][local], end = _rowStart[p][local + 1];
        columns = _columns[p].AsSpan(start, end - start);
        values = _values[p].AsSpan(start, end - start);
    }

    /// <summary>X_ij of the full symmetric matrix (diagonal: both directions).</summary>
    public double Get(int i, int j)
    {
        int r = Math.Min(i, j), c = Math.Max(i, j);
        GetRow(r, out var cols, out var vals);
        int at = cols.BinarySearch(c);
        if (at < 0) return 0;
        return r == c ? 2.0 * vals[at] : vals[at];
    }

    /// <summary>Row sums of the full symmetric matrix, Σ_j X_ij, in double.</summary>
    public double[] RowSums()
    {
        var sums = new double[Words];
        for (int r = 0; r < Words; r++)
        {
            GetRow(r, out var cols, out var vals);
            for (int t = 0; t < cols.Length; t++)
            {
                int c = cols[t];
                if (c == r) sums[r] += 2.0 * vals[t];
                else { sums[r] += vals[t]; sums[c] += vals[t]; }
            }
        }
        return sums;
    }
}
