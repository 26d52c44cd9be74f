using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.Cooccurrence;

/// <summary>Options of <see cref="Ppmi"/>.</summary>
public sealed record PpmiOptions
{
    /// <summary>Context-distribution smoothing exponent α (1 = none). Default 0.75 (Levy, Goldberg &amp; Dagan 2015).</summary>
    public double ContextSmoothing { get; init; } = 0.75;
    /// <summary>Shift k: PMI − ln k before clipping at zero (1 = no shift; word2vec's negative-sample count).</summary>
    public double Shift { get; init; } = 1;
}

/// <summary>A PPMI matrix (words × contexts) with its transpose and what is needed to compute the PPMI of a new row.</summary>
/// <param name="ContextCounts">Context totals #(c) = Σ_w X_wc (not smoothed).</param>
/// <param name="SmoothedContextTotal">Z = Σ_c #(c)^α.</param>
/// <param name="Total">|D| = Σ_wc X_wc.</param>
public sealed record PpmiResult(SparseMatrix Matrix, SparseMatrix Transposed, double[] ContextCounts, double SmoothedContextTotal,
    double Total, PpmiOptions Options);

/// <summary>
/// Positive pointwise mutual information with context-distribution smoothing:
/// PPMI(w, c) = max(0, ln( X_wc · Z / (#(w) · #(c)^α) ) − ln k), with #(w) = Σ_c X_wc, #(c) = Σ_w X_wc and
/// Z = Σ_c #(c)^α, for a count matrix X (words × contexts).
/// </summary>
/// <remarks>
/// Levy, Goldberg &amp; Dagan 2015, "Improving distributional similarity with lessons learned from word embeddings",
/// TACL 3, eq. (3) (smoothed context distribution P_α(c) = #(c)^α / Σ_c #(c)^α) and §3.2 (shifted PPMI,
/// max(PMI − log k, 0)). With α = 1 and k = 1 this is plain PPMI (Jurafsky &amp; Martin, Speech and Language
/// Processing, 3rd ed. draft, ch. 6). Natural logarithm. Rows or columns without counts give no entries.
/// </remarks>
public static class Ppmi
{
    /// <summary>PPMI of a general count matrix (words × contexts).</summary>
    public static PpmiResult Compute(SparseMatrix counts, PpmiOptions options)
    {
        ArgumentNullException.ThrowIfNull(counts);
        Validate(options);
        var rowTotals = new double[counts.Rows];
        var contextCounts = new double[counts.Columns];
        for (int i = 0; i < counts.Rows; i++)
        {
            for (int k = counts.RowPointers[i]; k < counts.RowPointers[i + 1]; k++)
            {
                double v = counts.Values[k];
                if (v < 0) throw new ArgumentException($"count at row {i}, column {counts.ColumnIndices[k]} is negative ({v})");
                rowTotals[i] += v;
                contextCounts[counts.ColumnIndices[k]] += v;
            }
        }
        var (smoothed, z, total) = Smooth(contextCounts, options.ContextSmoothing);
        double logShift = Math.Log(options.Shift);
        var ptr = new int[counts.Rows + 1];
        var cols = new List<int>();
        var vals = new List<float>();
        for (int i = 0; i < counts.Rows; i++)
        {
            for (int k = counts.RowPointers[i]; k < counts.RowPointers[i + 1]; k++)
            {
                int c = counts.ColumnIndices[k];
                double v = Value(counts.Values[k], rowTotals[i], smoothed[c], z, logShift);
                if (v > 0) { cols.Add(c); vals.Add((float)v); }
            }
            ptr[i + 1] = cols.Count;
        }
        var matrix = new SparseMatrix(counts.Rows, counts.Columns, ptr, cols.ToArray(), vals.ToArray());
        return new PpmiResult(matrix, matrix.Transpose(), contextCounts, z, total, options);
    }

    /// <summary>PPMI of a symmetric co-occurrence matrix (words × words; the contexts are the same words).</summary>
    public static PpmiResult Compute(CooccurrenceCounts counts, PpmiOptions options)
    {
        ArgumentNullException.ThrowIfNull(counts);
        Validate(options);
        int n = counts.Words;
        // Symmetric X: word totals and context totals coincide.
        var totals = counts.RowSums();
        var (smoothed, z, total) = Smooth(totals, options.ContextSmoothing);
        double logShift = Math.Log(options.Shift);
        // Pass 1: positive entries per row. Stored (r, c ≥ r, v): A[r][c] from X_rc and, if c > r, A[c][r] from X_cr = X_rc.
        var ptr = new int[n + 1];
        for (int r = 0; r < n; r++)
        {
            counts.GetRow(r, out var cs, out var vs);
            for (int t = 0; t < cs.Length; t++)
            {
                int c = cs[t];
                double x = c == r ? 2.0 * vs[t] : vs[t];
                if (Value(x, totals[r], smoothed[c], z, logShift) > 0) ptr[r + 1]++;
                if (c != r && Value(x, totals[c], smoothed[r], z, logShift) > 0) ptr[c + 1]++;
            }
        }
        for (int r = 0; r < n; r++) ptr[r + 1] += ptr[r];
        var next = (int[])ptr.Clone();
        var cols = new int[ptr[n]];
        var vals = new float[ptr[n]];
        // Pass 2 in row order: row c receives its columns r < c (while rows r < c are visited) before its own c' ≥ c,
        // so every row's columns come out increasing.
        for (int r = 0; r < n; r++)
        {
            counts.GetRow(r, out var cs, out var vs);
            for (int t = 0; t < cs.Length; t++)
            {
                int c = cs[t];
                double x = c == r ? 2.0 * vs[t] : vs[t];
                double a = Value(x, totals[r], smoothed[c], z, logShift);
                if (a > 0) { int at = next[r]++; cols[at] = c; vals[at] = (float)a; }
                if (c != r)
                {
                    double b = Value(x, totals[c], smoothed[r], z, logShift);
                    if (b > 0) { int at = next[c]++; cols[at] = r; vals[at] = (float)b; }
                }
            }
        }
        var matrix = new SparseMatrix(n, n, ptr, cols, vals);
        return new PpmiResult(matrix, matrix.Transpose(), totals, z, total, options);
    }

    /// <summary>One PPMI value: max(0, ln(x · Z / (rowTotal · smoothedContext)) − logShift); 0 when x is 0.</summary>
    public static double Value(double count, double rowTotal, double smoothedContext, double smoothedTotal, double logShift)
    {
        if (count <= 0 || rowTotal <= 0 || smoothedContext <= 0) return 0;
        double pmi = Math.Log(count * smoothedTotal / (rowTotal * smoothedContext)) - logShift;
        return pmi > 0 ? pmi : 0;
    }

    private static (double[] Smoothed, double Z, double Total) Smooth(double[] contextCounts, double alpha)
    {
        var smoothed = new double[contextCounts.Length];
        double z = 0, total = 0;
        for (int c = 0; c < contextCounts.Length; c++)
        {
            total += contextCounts[c];
            smoothed[c] = contextCounts[c] > 0 ? Math.Pow(contextCounts[c], alpha) : 0;
            z += smoothed[c];
        }
        return (smoothed, z, total);
    }

    private static void Validate(PpmiOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        if (!(options.ContextSmoothing > 0 && options.ContextSmoothing <= 1))
            throw new ArgumentOutOfRangeException(nameof(options), options.ContextSmoothing, $"context smoothing ({options.ContextSmoothing}) must be in (0, 1]");
        if (!(options.Shift >= 1) || double.IsInfinity(options.Shift))
            throw new ArgumentOutOfRangeException(nameof(options), options.Shift, $"shift ({options.Shift}) must be a finite number ≥ 1");
    }
}
