using SenseSplit.Core.SparseCoding;
using static SenseSplit.Tests.SparseCoding.SparseTestData;

namespace SenseSplit.Tests.SparseCoding;

public class PlantedDictionaryTests
{
    [Fact]
    public void Generate_Options_VectorsAreCodesTimesAtomsPlusRequestedNoise()
    {
        // Design of Aharon, Elad and Bruckstein (2006), §V-A: unit atoms, exactly s distinct atoms per signal, additive
        // white Gaussian noise. With noise ratio ρ the expected ||noise||²/||signal||² is ρ², so the mean of the
        // per-vector ratio over 4000 vectors is within a few percent of ρ (χ² with 64 degrees of freedom, rel. sd ~9%
        // per vector, ~0.2% for the mean).
        var p = new PlantedOptions { Rows = 4000, Dimensions = 64, Atoms = 100, Sparsity = 4, Noise = 0.1, Seed = 3 };
        var problem = PlantedDictionary.Generate(p);
        Assert.Equal(4000 * 64, problem.Vectors.Length);
        for (int a = 0; a < 100; a++) Assert.Equal(1.0, NormF(problem.Atoms.AsSpan(a * 64, 64)), 1e-5);
        double ratio = 0;
        for (int i = 0; i < 4000; i++)
        {
            var ids = problem.TrueCodes.AtomsOf(i);
            Assert.Equal(4, ids.ToArray().Distinct().Count());
            foreach (float w in problem.TrueCodes.WeightsOf(i)) Assert.InRange(Math.Abs(w), 0.2f, 1f);
            var noise = Residual(problem.Vectors.AsSpan(i * 64, 64), problem.Atoms, 64, ids, problem.TrueCodes.WeightsOf(i));
            var signal = new float[64];
            for (int j = 0; j < 64; j++) signal[j] = problem.Vectors[i * 64 + j] - (float)noise[j];
            ratio += Norm(noise) / NormF(signal);
        }
        Assert.Equal(0.1, ratio / 4000, 0.005);
    }

    [Fact]
    public void Generate_SameSeed_SameProblem()
    {
        var p = new PlantedOptions { Rows = 50, Dimensions = 10, Atoms = 20, Sparsity = 3, Seed = 5 };
        Assert.Equal(PlantedDictionary.Generate(p).Vectors, PlantedDictionary.Generate(p).Vectors);
        Assert.NotEqual(PlantedDictionary.Generate(p).Vectors, PlantedDictionary.Generate(p with { Seed = 6 }).Vectors);
    }

    [Fact]
    public void CountRecovered_PermutedAndSignFlipped_AllFound()
    {
        // The recovery measure of Aharon et al. (2006, §V-A) ignores atom order and sign.
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = 1, Dimensions = 30, Atoms = 40, Sparsity = 1, Seed = 1 });
        var learned = new float[40 * 30];
        for (int a = 0; a < 40; a++)
            for (int j = 0; j < 30; j++) learned[((a * 7) % 40) * 30 + j] = (a % 2 == 0 ? 1 : -1) * problem.Atoms[a * 30 + j];
        Assert.Equal(40, PlantedDictionary.CountRecovered(problem.Atoms, 40, learned, 40, 30));
        // Random unit atoms in 30 dimensions have |cos| ≈ 0.18 with any given atom: none found.
        var random = UnitDictionary(new Random(2), 40, 30);
        Assert.Equal(0, PlantedDictionary.CountRecovered(problem.Atoms, 40, random, 40, 30));
        // Halfway between two planted atoms: cosine ≈ 0.71, not found at 0.99, found at 0.5.
        var mixed = new float[30];
        for (int j = 0; j < 30; j++) mixed[j] = problem.Atoms[j] + problem.Atoms[30 + j];
        NormalizeRows(mixed, 1, 30);
        Assert.Equal(0, PlantedDictionary.CountRecovered(problem.Atoms.AsSpan(0, 60), 2, mixed, 1, 30));
        Assert.Equal(2, PlantedDictionary.CountRecovered(problem.Atoms.AsSpan(0, 60), 2, mixed, 1, 30, cosine: 0.5));
    }

    [Fact]
    public void Generate_BadOptions_MessagesGiveNumbers()
    {
        var e1 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            PlantedDictionary.Generate(new PlantedOptions { Rows = 5, Dimensions = 4, Atoms = 3, Sparsity = 4 }));
        Assert.Contains("sparsity (4) must not exceed atoms (3)", e1.Message);
        var e2 = Assert.Throws<ArgumentOutOfRangeException>(() =>
            PlantedDictionary.Generate(new PlantedOptions { Rows = 5, Dimensions = 4, Atoms = 3, Sparsity = 1, Noise = -1 }));
        Assert.Contains("noise (-1)", e2.Message);
    }
}
