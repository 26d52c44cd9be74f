namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// Smoothed, optionally shifted positive PMI of one word's co-occurrence row against fixed context statistics:
/// PPMI(w,c) = max(0, ln( P(w,c) / (P(w) · P_α(c)) ) − ln k) with P(w,c) = #(w,c)/D, P(w) = #(w)/D and
/// P_α(c) = #(c)^α / Σ_c' #(c')^α (α = 0.75 and k = 1 by default). Context totals #(c) have one entry per context;
/// D is the total count.
/// </summary>
/// <remarks>
/// Context-distribution smoothing and the shift are those of Levy, Goldberg &amp; Dagan 2015, "Improving
/// distributional similarity with lessons learned from word embeddings", TACL 3, eq. (3) and §3.2. Natural logarithm,
/// as the embed pipeline's <see cref="SenseSplit.Core.Cooccurrence.Ppmi"/> (whose <c>--neg</c> is k); the
/// embed-side formula ln(X_wc·Z / (#(w)·#(c)^α)) − ln k is the same number once D cancels, which it does when #(w) is
/// the row sum and D the sum of all rows. D is kept so the formula matches a pipeline that takes #(w) from another count.
/// </remarks>
public sealed class PpmiWeighting
{
    private readonly double[] _contextTotals;
    private readonly double _smoothedSum;
    private readonly double _logShift;

    /// <param name="contextTotals">#(c) for every context (length = contexts), finite and non-negative.</param>
    /// <param name="totalCount">D, the total count, positive.</param>
    /// <param name="smoothing">α in (0, 1]; 1 turns smoothing off.</param>
    /// <param name="shift">k ≥ 1, subtracted as ln k before clipping; 1 is no shift.</param>
    public PpmiWeighting(ReadOnlySpan<double> contextTotals, double totalCount, double smoothing = 0.75, double shift = 1)
    {
        Guard.Positive(contextTotals.Length);
        if (!(smoothing > 0 && smoothing <= 1)) throw new ArgumentOutOfRangeException(nameof(smoothing), smoothing, $"smoothing ({smoothing}) must lie in (0, 1]");
        if (!(shift >= 1) || !double.IsFinite(shift)) throw new ArgumentOutOfRangeException(nameof(shift), shift, $"shift ({shift}) must be finite and at least 1");
        if (!(totalCount > 0) || !double.IsFinite(totalCount)) throw new ArgumentOutOfRangeException(nameof(totalCount), totalCount, $"total count ({totalCount}) must be positive and finite");
        double sum = 0;
        for (int c = 0; c < contextTotals.Length; c++)
        {
            double t = contextTotals[c];
            if (!(t >= 0) || !double.IsFinite(t)) throw new ArgumentException($"context totals: value at context {c} is {t} (must be finite and non-negative)", nameof(contextTotals));
            if (t > 0) sum += Math.Pow(t, smoothing);
        }
        if (!(sum > 0)) throw new ArgumentException("context totals are all zero", nameof(contextTotals));
        _contextTotals = contextTotals.ToArray();
        _smoothedSum = sum;
        TotalCount = totalCount;
        Smoothing = smoothing;
        Shift = shift;
        _logShift = Math.Log(shift);
    }

    public int Contexts => _contextTotals.Length;
    public double TotalCount { get; }
    public double Smoothing { get; }
    public double Shift { get; }

    /// <summary>P_α(c) = #(c)^α / Σ_c' #(c')^α.</summary>
    public double SmoothedContextProbability(int context)
    {
        Guard.NonNegative(context);
        Guard.Below(context, Contexts, "contexts");
        double t = _contextTotals[context];
        return t > 0 ? Math.Pow(t, Smoothing) / _smoothedSum : 0;
    }

    /// <summary>
    /// Writes PPMI(w,c) for the dense count row <paramref name="counts"/> (length = contexts) into
    /// <paramref name="ppmi"/> (same length). Zero counts give zero.
    /// </summary>
    public void Weigh(ReadOnlySpan<double> counts, double wordTotal, Span<double> ppmi)
    {
        Guard.Length(counts.Length, Contexts, "co-occurrence row");
        Guard.Length(ppmi.Length, Contexts, "PPMI row");
        if (!(wordTotal > 0) || !double.IsFinite(wordTotal)) throw new ArgumentOutOfRangeException(nameof(wordTotal), wordTotal, $"word total ({wordTotal}) must be positive and finite");
        double pw = wordTotal / TotalCount;
        for (int c = 0; c < counts.Length; c++)
        {
            double n = counts[c];
            if (n == 0) { ppmi[c] = 0; continue; }
            if (_contextTotals[c] <= 0) throw new ArgumentException($"co-occurrence row: context {c} has count {n} but a context total of 0");
            double pwc = n / TotalCount;
            double pc = Math.Pow(_contextTotals[c], Smoothing) / _smoothedSum;
            ppmi[c] = Math.Max(0, Math.Log(pwc / (pw * pc)) - _logShift);
        }
    }
}

/// <summary>
/// Folding a new word into a truncated SVD embedding: given the word's PPMI row a (length = contexts), the right
/// singular vectors V (contexts×dims, row-major) and singular values σ (dims, positive) of A ≈ U Σ Vᵀ, and word vectors
/// U·Σ^p, the new word's vector is v = a · V · Σ^(p−1) (length = dims).
/// </summary>
/// <remarks>
/// Folding-in as in Berry, Dumais &amp; O'Brien 1995, "Using linear algebra for intelligent information retrieval",
/// SIAM Review 37(4), §4 (a new row maps to û = a V Σ⁻¹); scaling by Σ^p gives v = a V Σ^(p−1). The exponent p is the
/// embed pipeline's eigenvalue weighting (p = 1 is plain U Σ, p = 0.5 the weighting discussed by Levy, Goldberg &amp;
/// Dagan 2015). The basis and singular values stay those of the original matrix, so the new word does not change the
/// other words' vectors. The basis is checked once here; products accumulate in double.
/// </remarks>
public sealed class FoldIn
{
    private readonly float[] _basis;
    private readonly double[] _scale;

    /// <param name="basis">V, contexts×dims row-major (kept by reference, not copied).</param>
    /// <param name="singularValues">σ, dims positive values.</param>
    /// <param name="exponent">p, the eigenvalue weighting of the stored word vectors U·Σ^p.</param>
    public FoldIn(float[] basis, int contexts, int dims, ReadOnlySpan<float> singularValues, double exponent)
    {
        ArgumentNullException.ThrowIfNull(basis);
        Guard.Positive(contexts);
        Guard.Positive(dims);
        Guard.Length(basis.Length, (long)contexts * dims, "basis (contexts×dims)");
        Guard.Length(singularValues.Length, dims, "singular values");
        if (!double.IsFinite(exponent)) throw new ArgumentOutOfRangeException(nameof(exponent), exponent, "eigenvalue exponent must be finite");
        Guard.Finite(basis, dims, "basis");
        _scale = new double[dims];
        for (int j = 0; j < dims; j++)
        {
            // Σ^(p−1) with p < 1 needs σ > 0; a zero singular value means the stored rank exceeds the matrix rank.
            if (!(singularValues[j] > 0) || !float.IsFinite(singularValues[j]))
                throw new ArgumentException($"singular value {j} is {singularValues[j]} (must be positive and finite)", nameof(singularValues));
            _scale[j] = Math.Pow(singularValues[j], exponent - 1);
        }
        _basis = basis;
        Contexts = contexts;
        Dimensions = dims;
        Exponent = exponent;
    }

    public int Contexts { get; }
    public int Dimensions { get; }
    public double Exponent { get; }

    /// <summary>v = a·V·Σ^(p−1) for a sparse row a given as (context id, value) pairs; ids may repeat (values add).</summary>
    public void Project(ReadOnlySpan<int> contextIds, ReadOnlySpan<double> values, Span<float> vector)
    {
        Guard.Length(values.Length, contextIds.Length, "row values (one per context id)");
        Guard.Length(vector.Length, Dimensions, "output vector");
        int dims = Dimensions;
        var acc = new double[dims];
        var basis = _basis.AsSpan();
        for (int i = 0; i < contextIds.Length; i++)
        {
            int c = contextIds[i];
            if ((uint)c >= (uint)Contexts) throw new ArgumentOutOfRangeException(nameof(contextIds), c, $"context id {c} at position {i} is outside [0, {Contexts})");
            double a = values[i];
            if (!double.IsFinite(a)) throw new ArgumentException($"row value at position {i} is {a} (must be finite)", nameof(values));
            if (a == 0) continue;
            var row = basis.Slice(c * dims, dims);
            for (int j = 0; j < dims; j++) acc[j] += a * row[j];
        }
        for (int j = 0; j < dims; j++) vector[j] = (float)(acc[j] * _scale[j]);
    }

    /// <summary>
    /// The whole fold-in of a new word from its raw co-occurrence counts: sums the (context id, count) pairs into a dense
    /// row (ids may repeat, e.g. the two rows of a merged pair concatenated), weighs it with
    /// <paramref name="weighting"/> (PPMI as the embed pipeline) and projects it with <see cref="Project"/>.
    /// Returns the vector (length = dims).
    /// </summary>
    public float[] Word(ReadOnlySpan<int> contextIds, ReadOnlySpan<double> counts, double wordTotal, PpmiWeighting weighting)
    {
        ArgumentNullException.ThrowIfNull(weighting);
        Guard.Length(weighting.Contexts, Contexts, "context totals of the weighting");
        Guard.Length(counts.Length, contextIds.Length, "row counts (one per context id)");
        var dense = new double[Contexts];
        for (int i = 0; i < contextIds.Length; i++)
        {
            int c = contextIds[i];
            if ((uint)c >= (uint)Contexts) throw new ArgumentOutOfRangeException(nameof(contextIds), c, $"context id {c} at position {i} is outside [0, {Contexts})");
            double n = counts[i];
            if (!(n >= 0) || !double.IsFinite(n)) throw new ArgumentException($"count at position {i} is {n} (must be finite and non-negative)", nameof(counts));
            dense[c] += n;
        }
        var ppmi = new double[Contexts];
        weighting.Weigh(dense, wordTotal, ppmi);
        int nonZero = 0;
        for (int c = 0; c < Contexts; c++) if (ppmi[c] != 0) nonZero++;
        var ids = new int[nonZero];
        var vals = new double[nonZero];
        for (int c = 0, k = 0; c < Contexts; c++)
            if (ppmi[c] != 0) { ids[k] = c; vals[k] = ppmi[c]; k++; }
        var vector = new float[Dimensions];
        Project(ids, vals, vector);
        return vector;
    }
}
