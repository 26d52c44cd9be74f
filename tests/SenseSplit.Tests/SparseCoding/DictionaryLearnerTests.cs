using SenseSplit.Core.SparseCoding;
using static SenseSplit.Tests.SparseCoding.SparseTestData;

namespace SenseSplit.Tests.SparseCoding;

public class DictionaryLearnerTests
{
    private sealed class ListProgress : IProgress<RoundReport>
    {
        public readonly List<RoundReport> Reports = [];
        public void Report(RoundReport value) => Reports.Add(value);
    }

    [Fact]
    public void Learn_KsvdSyntheticExperimentWithoutNoise_RecoversAtLeast45Of50Atoms()
    {
        // M. Aharon, M. Elad and A. Bruckstein (2006), "K-SVD: An algorithm for designing overcomplete dictionaries for
        // sparse representation", IEEE Trans. Signal Processing 54(11), §V-A and Fig. 3: a random 20×50 dictionary with
        // unit columns, 1,500 signals each a combination of 3 atoms with i.i.d. uniform coefficients at random locations,
        // K-SVD for 80 iterations; an atom counts as found when 1 − |d_iᵀ d̂_j| < 0.01. Without noise the paper reports
        // about 48 of 50 atoms found on average (96%, read off Fig. 3, from memory). We assert a mean of at least 45
        // over five seeds: margin for the approximate atom update (Rubinstein et al. 2008, Algorithm 5) and seed spread.
        const int dims = 20, atoms = 50, signals = 1500, sparsity = 3, seeds = 5;
        double total = 0;
        var perSeed = new List<int>();
        for (int seed = 1; seed <= seeds; seed++)
        {
            var problem = PlantedDictionary.Generate(new PlantedOptions
            {
                Rows = signals, Dimensions = dims, Atoms = atoms, Sparsity = sparsity, Noise = 0, MinWeight = 0, Seed = seed,
            });
            var result = DictionaryLearner.Learn(problem.Vectors, signals, dims, new DictionaryOptions
            {
                Atoms = atoms, Sparsity = sparsity, MaxRounds = 80, Tolerance = 0, Seed = seed,
            });
            int found = PlantedDictionary.CountRecovered(problem.Atoms, atoms, result.Atoms, atoms, dims, cosine: 0.99);
            perSeed.Add(found);
            total += found;
        }
        double mean = total / seeds;
        Assert.True(mean >= 45, $"mean atoms recovered {mean} (per seed: {string.Join(", ", perSeed)})");
    }

    [Fact]
    public void Learn_RandomData_ErrorNeverRisesAndInvariantsHold()
    {
        // K-SVD decreases (or keeps) the representation error in every stage (Aharon et al. 2006, §IV-D, convergence);
        // OMP is greedy and replacement swaps atoms, so allow a rise of 1e-3 relative (common practice for K-SVD
        // monitoring). Atoms unit norm; at most `sparsity` atoms per code; the codes are those of the returned atoms.
        const int rows = 600, dims = 24, atoms = 40, sparsity = 4;
        var rng = new Random(21);
        var x = Gaussian(rng, rows, dims);
        var result = DictionaryLearner.Learn(x, rows, dims, new DictionaryOptions
        {
            Atoms = atoms, Sparsity = sparsity, MaxRounds = 15, Tolerance = 0, Seed = 3,
        });
        Assert.Equal(15, result.RoundsRun);
        Assert.Equal(15, result.ErrorPerRound.Count);
        for (int r = 1; r < result.ErrorPerRound.Count; r++)
            Assert.True(result.ErrorPerRound[r] <= result.ErrorPerRound[r - 1] * (1 + 1e-3),
                $"round {r + 1}: error {result.ErrorPerRound[r]} after {result.ErrorPerRound[r - 1]}");
        Assert.True(result.FinalRelativeError <= result.ErrorPerRound[^1] * (1 + 1e-3));
        Assert.True(result.ErrorPerRound[^1] < result.ErrorPerRound[0], "learning must lower the error on random data");

        for (int a = 0; a < atoms; a++)
            Assert.Equal(1.0, NormF(result.Atoms.AsSpan(a * dims, dims)), 1e-5);

        var recoded = BatchOmp.Encode(x, rows, dims, result.Atoms, atoms, sparsity);
        Assert.Equal(recoded.Codes.AtomIds, result.Codes.AtomIds);
        Assert.Equal(recoded.Codes.Weights, result.Codes.Weights);
        double err2 = 0, x2 = 0;
        for (int i = 0; i < rows; i++)
        {
            Assert.True(result.Codes.AtomsOf(i).ToArray().Count(id => id >= 0) <= sparsity);
            var r = Residual(x.AsSpan(i * dims, dims), result.Atoms, dims, result.Codes.AtomsOf(i), result.Codes.WeightsOf(i));
            double rn = Norm(r);
            Assert.Equal(rn, result.ResidualNorms[i], 1e-4);
            err2 += rn * rn;
            x2 += Math.Pow(NormF(x.AsSpan(i * dims, dims)), 2);
        }
        Assert.Equal(Math.Sqrt(err2 / x2), result.FinalRelativeError, 1e-5);
    }

    [Fact]
    public void Learn_OneAndTwoThreads_BitwiseEqual()
    {
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = 2500, Dimensions = 30, Atoms = 60, Sparsity = 3, Seed = 4 });
        DictionaryResult Run(int threads) => DictionaryLearner.Learn(problem.Vectors, 2500, 30, new DictionaryOptions
        {
            Atoms = 60, Sparsity = 3, MaxRounds = 6, Tolerance = 0, Seed = 9, Threads = threads,
        });
        var one = Run(1);
        var two = Run(2);
        Assert.Equal(one.Atoms, two.Atoms);
        Assert.Equal(one.Codes.AtomIds, two.Codes.AtomIds);
        Assert.Equal(one.Codes.Weights, two.Codes.Weights);
        Assert.Equal(one.ErrorPerRound, two.ErrorPerRound);
        Assert.Equal(one.ReplacedPerRound, two.ReplacedPerRound);
        var otherSeed = DictionaryLearner.Learn(problem.Vectors, 2500, 30, new DictionaryOptions
        {
            Atoms = 60, Sparsity = 3, MaxRounds = 6, Tolerance = 0, Seed = 10, Threads = 2,
        });
        Assert.NotEqual(one.Atoms, otherSeed.Atoms);
    }

    [Fact]
    public void Learn_KeptAndRecomputedResiduals_SameResult()
    {
        // The second pass of the atom update computes g_i = E_iᵀ d_j either from the kept E_i or as
        // x_iᵀ d_j − Σ_t a_t d_tᵀ d_j (same value in exact arithmetic, Rubinstein et al. 2008, Algorithm 5). Float
        // rounding differs, so compare the learned quantities loosely: error to 1e-4 relative and atoms matched.
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = 1500, Dimensions = 20, Atoms = 30, Sparsity = 3, Seed = 8 });
        var options = new DictionaryOptions { Atoms = 30, Sparsity = 3, MaxRounds = 8, Tolerance = 0, Seed = 2 };
        var kept = DictionaryLearner.Learn(problem.Vectors, 1500, 20, options, null, keptResiduals: 4096);
        var formed = DictionaryLearner.Learn(problem.Vectors, 1500, 20, options, null, keptResiduals: 0);
        for (int r = 0; r < kept.ErrorPerRound.Count; r++)
            Assert.Equal(kept.ErrorPerRound[r], formed.ErrorPerRound[r], 1e-4 * kept.ErrorPerRound[r]);
        Assert.Equal(30, PlantedDictionary.CountRecovered(kept.Atoms, 30, formed.Atoms, 30, 20, cosine: 0.999));
    }

    [Fact]
    public void Learn_DuplicateRows_ReplacesDuplicateAndUnusedAtoms()
    {
        // Half of the rows are one repeated vector, so the random initial atoms contain many copies of it. The copies
        // beyond the first are near-duplicates (|cos| > 0.99) and are replaced by badly represented vectors, as
        // Aharon et al. (2006, §IV-E) recommend; at the end no two atoms may be near-duplicates.
        const int dims = 16, atoms = 20;
        var planted = PlantedDictionary.Generate(new PlantedOptions { Rows = 800, Dimensions = dims, Atoms = atoms, Sparsity = 2, Seed = 6 });
        var x = new float[1600 * dims];
        planted.Vectors.CopyTo(x, 0);
        for (int i = 800; i < 1600; i++) planted.Vectors.AsSpan(0, dims).CopyTo(x.AsSpan(i * dims, dims));
        var result = DictionaryLearner.Learn(x, 1600, dims, new DictionaryOptions
        {
            Atoms = atoms, Sparsity = 2, MaxRounds = 10, Tolerance = 0, Seed = 1,
        });
        Assert.True(result.ReplacedPerRound[0] >= 5, $"replaced in round 1: {result.ReplacedPerRound[0]}");
        var gram = BatchOmp.ComputeGram(result.Atoms, atoms, dims);
        for (int a = 0; a < atoms; a++)
            for (int b = 0; b < a; b++)
                Assert.True(Math.Abs(gram[a * atoms + b]) <= 0.99,
                    $"atoms {b} and {a} are near-duplicates: cos {gram[a * atoms + b]}");
    }

    [Fact]
    public void Learn_LargeTolerance_ConvergesAndSaysWhy()
    {
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = 1000, Dimensions = 20, Atoms = 30, Sparsity = 3, Seed = 2 });
        var progress = new ListProgress();
        var result = DictionaryLearner.Learn(problem.Vectors, 1000, 20, new DictionaryOptions
        {
            Atoms = 30, Sparsity = 3, MaxRounds = 50, Tolerance = 0.5, Seed = 1,
        }, progress);
        Assert.True(result.Converged);
        Assert.True(result.RoundsRun < 50);
        Assert.Contains("below the tolerance 0.5", result.StopReason);
        Assert.Equal(result.RoundsRun, progress.Reports.Count);
        Assert.Equal(Enumerable.Range(1, result.RoundsRun), progress.Reports.Select(r => r.Round));
        Assert.All(progress.Reports, r => Assert.Equal(50, r.MaxRounds));
        Assert.Equal(result.ErrorPerRound, progress.Reports.Select(r => r.RelativeError));
        // On convergence the last coding was made with the returned atoms, so its error is the final one.
        Assert.Equal(result.ErrorPerRound[^1], result.FinalRelativeError);

        var capped = DictionaryLearner.Learn(problem.Vectors, 1000, 20, new DictionaryOptions
        {
            Atoms = 30, Sparsity = 3, MaxRounds = 3, Tolerance = 0, Seed = 1,
        });
        Assert.False(capped.Converged);
        Assert.Equal(3, capped.RoundsRun);
        Assert.Contains("maximum of 3 rounds", capped.StopReason);
    }

    [Fact]
    public void Learn_Cancelled_Throws()
    {
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = 1000, Dimensions = 20, Atoms = 30, Sparsity = 3, Seed = 2 });
        using var cts = new CancellationTokenSource();
        var progress = new CancelAfterFirst(cts);
        Assert.ThrowsAny<OperationCanceledException>(() => DictionaryLearner.Learn(problem.Vectors, 1000, 20,
            new DictionaryOptions { Atoms = 30, Sparsity = 3, MaxRounds = 20, Tolerance = 0 }, progress, cts.Token));
        Assert.Equal(1, progress.Calls);
    }

    private sealed class CancelAfterFirst(CancellationTokenSource cts) : IProgress<RoundReport>
    {
        public int Calls;
        public void Report(RoundReport value) { Calls++; cts.Cancel(); }
    }

    [Fact]
    public void Learn_EdgeSizes_Handled()
    {
        // Two vectors, one atom, one dimension: the atom is ±1 and every vector is represented exactly.
        var r1 = DictionaryLearner.Learn([2f, -3f], 2, 1, new DictionaryOptions { Atoms = 1, Sparsity = 1, MaxRounds = 3 });
        Assert.Equal(1f, Math.Abs(r1.Atoms[0]));
        Assert.Equal(0, r1.FinalRelativeError, 1e-6);

        // Sparsity = dimensions: exact representation.
        var rng = new Random(7);
        var x = Gaussian(rng, 50, 4);
        var r2 = DictionaryLearner.Learn(x, 50, 4, new DictionaryOptions { Atoms = 8, Sparsity = 4, MaxRounds = 3 });
        Assert.True(r2.FinalRelativeError < 1e-3, $"error {r2.FinalRelativeError}");

        // Zero rows are allowed (empty codes) as long as enough rows are non-zero.
        var withZeros = new float[60 * 4];
        x.AsSpan(0, 40 * 4).CopyTo(withZeros);
        var r3 = DictionaryLearner.Learn(withZeros, 60, 4, new DictionaryOptions { Atoms = 6, Sparsity = 2, MaxRounds = 3 });
        Assert.Equal([-1, -1], r3.Codes.AtomsOf(55).ToArray());
        Assert.Equal(0f, r3.ResidualNorms[55]);
    }

    [Fact]
    public void Learn_BadArguments_MessagesGiveNumbers()
    {
        var rng = new Random(1);
        var x = Gaussian(rng, 10, 6);
        var e1 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            DictionaryLearner.Learn(x, 10, 6, new DictionaryOptions { Atoms = 10, Sparsity = 2 }));
        Assert.Contains("atoms (10) must be below vectors (10)", e1.Message);
        var e2 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            DictionaryLearner.Learn(x, 10, 6, new DictionaryOptions { Atoms = 4, Sparsity = 5 }));
        Assert.Contains("sparsity (5) must not exceed atoms (4)", e2.Message);
        var e3 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            DictionaryLearner.Learn(x, 10, 6, new DictionaryOptions { Atoms = 8, Sparsity = 7 }));
        Assert.Contains("sparsity (7) must not exceed dimensions (6)", e3.Message);
        var e4 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            DictionaryLearner.Learn(x, 10, 6, new DictionaryOptions { Atoms = 4, Sparsity = 2, Tolerance = -1 }));
        Assert.Contains("tolerance (-1) must be finite and not negative", e4.Message);
        var e5 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            DictionaryLearner.Learn(x, 10, 6, new DictionaryOptions { Atoms = 4, Sparsity = 2, MaxRounds = 0 }));
        Assert.Contains("maxRounds (0) must be positive", e5.Message);
        var zeros = new float[60];
        x.AsSpan(0, 18).CopyTo(zeros);
        var e6 = Assert.Throws<ArgumentException>(() =>
            DictionaryLearner.Learn(zeros, 10, 6, new DictionaryOptions { Atoms = 4, Sparsity = 2 }));
        Assert.Contains("only 3 of 10 rows are non-zero; atoms (4)", e6.Message);
        var bad = (float[])x.Clone();
        bad[2 * 6 + 4] = float.PositiveInfinity;
        var e7 = Assert.Throws<ArgumentException>(() =>
            DictionaryLearner.Learn(bad, 10, 6, new DictionaryOptions { Atoms = 4, Sparsity = 2 }));
        Assert.Contains("row 2, column 4", e7.Message);
        var e8 = Assert.Throws<ArgumentException>(() =>
            DictionaryLearner.Learn(x, 11, 6, new DictionaryOptions { Atoms = 4, Sparsity = 2 }));
        Assert.Contains("length 60 does not match the expected 66", e8.Message);
    }
}
