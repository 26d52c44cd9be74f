using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class PpmiWeightingTests
{
    // Term-context counts of Jurafsky & Martin, "Speech and Language Processing", 3rd ed. draft, ch. 6 (the
    // cherry/strawberry/digital/information example, contexts computer, data, result, pie, sugar); from memory.
    private static readonly double[][] Counts =
    [
        [2, 8, 9, 442, 25],
        [0, 0, 1, 60, 19],
        [1670, 1683, 85, 5, 4],
        [3325, 3982, 378, 5, 13],
    ];

    // The PPMI table printed beside it (log base 2, no smoothing, two decimals); from memory.
    private static readonly double[][] Expected =
    [
        [0, 0, 0, 4.38, 3.30],
        [0, 0, 0, 4.10, 5.51],
        [0.18, 0.01, 0, 0, 0],
        [0.02, 0.09, 0.28, 0, 0],
    ];

    [Fact]
    public void Weigh_TextbookCounts_ReproducesPublishedPpmiTable()
    {
        var columns = Enumerable.Range(0, 5).Select(c => Counts.Sum(r => r[c])).ToArray();
        double total = Counts.Sum(r => r.Sum());
        var weighting = new PpmiWeighting(columns, total, smoothing: 1);
        var row = new double[5];
        for (int w = 0; w < Counts.Length; w++)
        {
            weighting.Weigh(Counts[w], Counts[w].Sum(), row);
            for (int c = 0; c < 5; c++)
            {
                // Our PPMI is in nats; the table is in bits (divide by ln 2). Tolerance: half a unit of the last printed digit.
                Assert.InRange(row[c] / Math.Log(2) - Expected[w][c], -0.005 - 1e-9, 0.005 + 1e-9);
            }
        }
    }

    [Fact]
    public void SmoothedContextProbability_TwoContexts_MatchesTextbookExample()
    {
        // Jurafsky & Martin, 3rd ed. draft, ch. 6: with P(a) = .99 and P(b) = .01, α = 0.75 gives P_α(a) ≈ .97 and
        // P_α(b) ≈ .03 (from memory; the example of Levy, Goldberg & Dagan 2015 context smoothing).
        var weighting = new PpmiWeighting([99, 1], 100, 0.75);
        Assert.Equal(0.97, weighting.SmoothedContextProbability(0), 2);
        Assert.Equal(0.03, weighting.SmoothedContextProbability(1), 2);
    }

    [Fact]
    public void Weigh_RandomCounts_NeverNegativeAndZeroWhereCountIsZero()
    {
        var rng = new Random(5);
        int contexts = 37;
        var totals = Enumerable.Range(0, contexts).Select(_ => (double)rng.Next(1, 500)).ToArray();
        var weighting = new PpmiWeighting(totals, totals.Sum() * 3);
        var counts = Enumerable.Range(0, contexts).Select(_ => rng.NextDouble() < 0.4 ? 0 : (double)rng.Next(1, 50)).ToArray();
        var ppmi = new double[contexts];
        weighting.Weigh(counts, counts.Sum(), ppmi);
        for (int c = 0; c < contexts; c++)
        {
            Assert.True(ppmi[c] >= 0);
            if (counts[c] == 0) Assert.Equal(0, ppmi[c]);
        }
    }

    [Fact]
    public void Weigh_CountInContextWithZeroTotal_Throws()
    {
        var weighting = new PpmiWeighting([5, 0, 3], 8);
        var ex = Assert.Throws<ArgumentException>(() => weighting.Weigh([1, 1, 0], 2, new double[3]));
        Assert.Contains("context 1", ex.Message);
    }

    [Fact]
    public void Weigh_ShiftedAndSmoothed_MatchesEmbedPipelinePpmi()
    {
        // The embed pipeline's PPMI (Cooccurrence.Ppmi.Value: ln(X·Z / (#(w)·#(c)^α)) − ln k) must give the same
        // numbers as this weighting, so a folded-in row is weighted exactly as the stored rows were.
        var rng = new Random(11);
        int contexts = 29;
        var totals = Enumerable.Range(0, contexts).Select(_ => (double)rng.Next(1, 900)).ToArray();
        double alpha = 0.75, k = 5;
        var weighting = new PpmiWeighting(totals, totals.Sum(), alpha, k);
        var counts = Enumerable.Range(0, contexts).Select(_ => rng.NextDouble() < 0.3 ? 0 : rng.Next(1, 40) + 0.5).ToArray();
        double rowTotal = counts.Sum();
        var ppmi = new double[contexts];
        weighting.Weigh(counts, rowTotal, ppmi);
        double z = totals.Sum(t => Math.Pow(t, alpha));
        for (int c = 0; c < contexts; c++)
        {
            double expected = SenseSplit.Core.Cooccurrence.Ppmi.Value(counts[c], rowTotal, Math.Pow(totals[c], alpha), z, Math.Log(k));
            Assert.Equal(expected, ppmi[c], 12);
        }
    }

    [Fact]
    public void Weigh_Shift_SubtractsLogKThenClips()
    {
        // Shifted PPMI, Levy, Goldberg & Dagan 2015 §3.2: max(PMI − ln k, 0). One word, two equal contexts, no smoothing:
        // the row [3, 1] against totals [4, 4] has PMI ln(3/4 / (1/2)) = ln 1.5 and ln(1/4 / (1/2)) = ln 0.5.
        var plain = new PpmiWeighting([4, 4], 8, 1, 1);
        var shifted = new PpmiWeighting([4, 4], 8, 1, 1.2);
        var a = new double[2];
        var b = new double[2];
        plain.Weigh([3, 1], 4, a);
        shifted.Weigh([3, 1], 4, b);
        Assert.Equal(Math.Log(1.5), a[0], 12);
        Assert.Equal(0, a[1]);
        Assert.Equal(Math.Log(1.5) - Math.Log(1.2), b[0], 12);
        Assert.Equal(0, b[1]);
        Assert.Throws<ArgumentOutOfRangeException>(() => new PpmiWeighting([4, 4], 8, 1, 0.5));
    }

    [Fact]
    public void Constructor_BadSmoothing_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new PpmiWeighting([1, 2], 3, 0));
        Assert.Throws<ArgumentOutOfRangeException>(() => new PpmiWeighting([1, 2], 3, 1.5));
        Assert.Throws<ArgumentException>(() => new PpmiWeighting([1, double.NaN], 3));
    }
}

public class FoldInTests
{
    // An exactly rank-k matrix A (m×n) = G (m×k) · H (k×n), its thin SVD through MathNet.Numerics, and the truncated
    // factors: basis V (n×k), singular values σ (k), word vectors U Σ^p (m×k).
    private static (Matrix<double> a, float[] basis, float[] sigma, Matrix<double> u) ExactRank(int seed, int m, int n, int k)
    {
        var rng = new Random(seed);
        var g = Matrix<double>.Build.Dense(m, k, (_, _) => MergeTestData.Gaussian(rng));
        var h = Matrix<double>.Build.Dense(k, n, (_, _) => MergeTestData.Gaussian(rng));
        var a = g * h;
        var svd = a.Svd(computeVectors: true);
        var basis = new float[n * k];
        for (int c = 0; c < n; c++)
            for (int j = 0; j < k; j++) basis[c * k + j] = (float)svd.VT[j, c];
        var sigma = Enumerable.Range(0, k).Select(j => (float)svd.S[j]).ToArray();
        return (a, basis, sigma, svd.U.SubMatrix(0, m, 0, k));
    }

    [Theory]
    [InlineData(1.0)]
    [InlineData(0.5)]
    [InlineData(0.0)]
    public void Project_RowOfFactorisedMatrix_ReturnsItsOwnCoordinates(double exponent)
    {
        // Folding-in (Berry, Dumais & O'Brien 1995, SIAM Review 37(4), §4): for A = U Σ Vᵀ of rank k, row i of A maps
        // to a_i V Σ^(p−1) = U_i Σ^p exactly, since Vᵀ V = I.
        int m = 30, n = 22, k = 6;
        var (a, basis, sigma, u) = ExactRank(11, m, n, k);
        var fold = new FoldIn(basis, n, k, sigma, exponent);
        var ids = Enumerable.Range(0, n).ToArray();
        var vector = new float[k];
        for (int i = 0; i < m; i++)
        {
            fold.Project(ids, a.Row(i).ToArray(), vector);
            for (int j = 0; j < k; j++)
            {
                double expected = u[i, j] * Math.Pow(sigma[j], exponent);
                // The basis is stored in single precision: allow a few float ulps of the row's scale.
                Assert.True(Math.Abs(vector[j] - expected) < 2e-5 * Math.Max(1, Math.Pow(sigma[0], exponent)),
                    $"row {i}, dim {j}: {vector[j]} vs {expected}");
            }
        }
    }

    [Fact]
    public void Word_PpmiRowSplitIntoRepeatedIds_ReturnsStoredVector()
    {
        // Whole pipeline: counts → PPMI (our weighting) → SVD of the PPMI matrix (MathNet) → vectors U Σ^p; folding a
        // word's counts back in must return its own vector. The row is passed as two chunks with repeated context ids,
        // as a merged pair's two rows would be, to check that counts add before weighting.
        var rng = new Random(3);
        int words = 25, contexts = 12, dims = contexts;
        var counts = new double[words][];
        for (int w = 0; w < words; w++) counts[w] = Enumerable.Range(0, contexts).Select(_ => rng.NextDouble() < 0.3 ? 0 : (double)rng.Next(1, 40)).ToArray();
        var totals = Enumerable.Range(0, contexts).Select(c => counts.Sum(r => r[c])).ToArray();
        double total = totals.Sum();
        var weighting = new PpmiWeighting(totals, total);
        var ppmi = Matrix<double>.Build.Dense(words, contexts);
        var row = new double[contexts];
        for (int w = 0; w < words; w++)
        {
            weighting.Weigh(counts[w], counts[w].Sum(), row);
            ppmi.SetRow(w, row);
        }
        var svd = ppmi.Svd(computeVectors: true);
        int rank = Enumerable.Range(0, contexts).Count(j => svd.S[j] > 1e-9 * svd.S[0]);
        Assert.Equal(contexts, rank); // a random count matrix of this shape has full column rank
        var basis = new float[contexts * dims];
        for (int c = 0; c < contexts; c++)
            for (int j = 0; j < dims; j++) basis[c * dims + j] = (float)svd.VT[j, c];
        var sigma = Enumerable.Range(0, dims).Select(j => (float)svd.S[j]).ToArray();
        var fold = new FoldIn(basis, contexts, dims, sigma, 0.5);

        for (int w = 0; w < words; w++)
        {
            var ids = new List<int>();
            var values = new List<double>();
            for (int c = 0; c < contexts; c++)
            {
                if (counts[w][c] == 0) continue;
                double part = Math.Floor(counts[w][c] / 3);
                ids.Add(c); values.Add(counts[w][c] - part);
                if (part > 0) { ids.Add(c); values.Add(part); }
            }
            var v = fold.Word(ids.ToArray(), values.ToArray(), counts[w].Sum(), weighting);
            for (int j = 0; j < dims; j++)
            {
                double expected = svd.U[w, j] * Math.Sqrt(svd.S[j]);
                Assert.True(Math.Abs(v[j] - expected) < 1e-4, $"word {w}, dim {j}: {v[j]} vs {expected}");
            }
        }
    }

    [Fact]
    public void Constructor_ZeroSingularValue_ThrowsNamingIt()
    {
        var ex = Assert.Throws<ArgumentException>(() => new FoldIn(new float[6], 3, 2, [1f, 0f], 0.5));
        Assert.Contains("singular value 1", ex.Message);
    }

    [Fact]
    public void Constructor_ShapeMismatch_Throws()
    {
        Assert.Throws<ArgumentException>(() => new FoldIn(new float[5], 3, 2, [1f, 1f], 1));
        Assert.Throws<ArgumentException>(() => new FoldIn(new float[6], 3, 2, [1f], 1));
        Assert.Throws<ArgumentException>(() => new FoldIn([0, 0, 0, float.NaN, 0, 0], 3, 2, [1f, 1f], 1));
    }

    [Fact]
    public void Project_ContextIdOutOfRange_Throws()
    {
        var fold = new FoldIn(new float[6], 3, 2, [1f, 1f], 1);
        Assert.Throws<ArgumentOutOfRangeException>(() => fold.Project([3], [1.0], new float[2]));
    }
}
