using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Tests.Cooccurrence;

public class PpmiTests
{
    [Fact]
    public void Compute_JurafskyMartinTermContextTable_ReproducesPrintedPpmi()
    {
        // Jurafsky & Martin, Speech and Language Processing, 3rd ed. draft, ch. 6 ("Vector Semantics and Embeddings"),
        // the PPMI worked example: co-occurrence counts of four words with five contexts, and the PPMI table printed
        // to two decimals (log base 2, no smoothing). Both tables are recalled from memory; the recalled PPMI values
        // are exactly what the recalled counts give, which supports the recollection.
        // Rows: cherry, strawberry, digital, information. Columns: computer, data, result, pie, sugar.
        float[] counts =
        [
            2, 8, 9, 442, 25,
            0, 0, 1, 60, 19,
            1670, 1683, 85, 5, 4,
            3325, 3982, 378, 5, 13,
        ];
        double[] printed =
        [
            0, 0, 0, 4.38, 3.30,
            0, 0, 0, 4.10, 5.51,
            0.18, 0.01, 0, 0, 0,
            0.02, 0.09, 0.28, 0, 0,
        ];
        var result = Ppmi.Compute(SparseMatrix.FromDense(counts, 4, 5), new PpmiOptions { ContextSmoothing = 1, Shift = 1 });
        var dense = result.Matrix.ToDense();
        for (int i = 0; i < printed.Length; i++)
        {
            // Our PPMI uses the natural log; the book uses log2, so divide by ln 2. Printed precision: 2 decimals.
            double log2 = dense[i] / Math.Log(2);
            Assert.True(Math.Abs(log2 - printed[i]) <= 0.005 + 1e-6, $"cell {i / 5},{i % 5}: {log2:F4} vs printed {printed[i]}");
        }
        Assert.Equal(11716, result.Total, 6); // total count printed in the same figure (from memory)
    }

    [Fact]
    public void Compute_SmoothingAndShift_MatchFormula()
    {
        // Levy, Goldberg & Dagan 2015, TACL 3, eq. (3) and §3.2: PMI_α(w,c) = ln(#(w,c)·Σ_c #(c)^α / (#(w)·#(c)^α)),
        // SPPMI = max(PMI − ln k, 0). Computed by hand here for one cell of a 2 × 2 table.
        float[] counts = [10, 2, 3, 40];
        var r = Ppmi.Compute(SparseMatrix.FromDense(counts, 2, 2), new PpmiOptions { ContextSmoothing = 0.75, Shift = 2 });
        double c0 = 13, c1 = 42, z = Math.Pow(c0, 0.75) + Math.Pow(c1, 0.75);
        double expected00 = Math.Max(0, Math.Log(10 * z / (12 * Math.Pow(c0, 0.75))) - Math.Log(2));
        Assert.Equal(expected00, r.Matrix.ToDense()[0], 5);
        Assert.Equal(z, r.SmoothedContextTotal, 9);
        Assert.All(r.Matrix.Values, v => Assert.True(v > 0));
    }

    [Fact]
    public void Compute_SymmetricCounts_EqualGeneralPath()
    {
        var rng = new Random(4);
        int words = 60;
        using var counter = new CooccurrenceCounter(words, new CooccurrenceOptions { Threads = 2 });
        for (int i = 0; i < 20_000; i++)
        {
            if (rng.Next(20) == 0) counter.LineBreak();
            counter.Id(rng.Next(10) == 0 ? -1 : (int)(Math.Pow(rng.NextDouble(), 2) * words));
        }
        var counts = counter.Complete();
        var dense = new float[words * words];
        for (int i = 0; i < words; i++) for (int j = 0; j < words; j++) dense[i * words + j] = (float)counts.Get(i, j);
        var options = new PpmiOptions();
        var general = Ppmi.Compute(SparseMatrix.FromDense(dense, words, words), options);
        var symmetric = Ppmi.Compute(counts, options);
        var g = general.Matrix.ToDense();
        var s = symmetric.Matrix.ToDense();
        for (int i = 0; i < g.Length; i++) Assert.True(Math.Abs(g[i] - s[i]) <= 1e-5 * Math.Max(1, g[i]), $"cell {i}: {s[i]} vs {g[i]}");
        Assert.Equal(symmetric.Matrix.ToDense(), symmetric.Transposed.Transpose().ToDense());
        Assert.All(symmetric.Matrix.Values, v => Assert.True(v > 0)); // PPMI is never negative; zeros are not stored
    }
}
