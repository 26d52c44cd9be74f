using System.Diagnostics;
using System.Globalization;
using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Bench;

/// <summary>
/// The synthetic experiment of Aharon, Elad &amp; Bruckstein (2006), "K-SVD: An algorithm for designing overcomplete
/// dictionaries for sparse representation", IEEE Trans. Signal Processing 54(11), §V-A and Fig. 3: a random 20×50
/// dictionary, 1,500 signals of 3 atoms each, 80 iterations, an atom found when 1 − |d_iᵀ d̂_j| &lt; 0.01; at noise levels
/// of 10, 20 and 30 dB SNR and without noise. The paper's Fig. 3 shows about 45 of 50 atoms found at 10 dB and about
/// 48 of 50 at the other levels (read off the figure, from memory of its bar heights).
/// </summary>
public sealed class KsvdPaperBench : IBenchSuite
{
    public string Name => "ksvd-paper";
    public string Description => "K-SVD paper's synthetic dictionary recovery at 10/20/30 dB and no noise (--seeds N)";

    public int Run(string[] args)
    {
        int seeds = AtomsPipelineBench.Arg(args, "--seeds", 5);
        const int dims = 20, atoms = 50, signals = 1500, sparsity = 3;
        Console.WriteLine($"20×50 dictionary, 1500 signals × 3 atoms, 80 rounds, {seeds} seeds; atoms found of 50 (mean, per seed)");
        foreach (double? snr in new double?[] { 10, 20, 30, null })
        {
            // SNR in dB = 20·log10(||signal|| / ||noise||), so the noise-to-signal norm ratio is 10^(−SNR/20).
            double noise = snr is { } db ? Math.Pow(10, -db / 20) : 0;
            var found = new List<int>();
            var clock = Stopwatch.StartNew();
            for (int seed = 1; seed <= seeds; seed++)
            {
                var problem = PlantedDictionary.Generate(new PlantedOptions
                {
                    Rows = signals, Dimensions = dims, Atoms = atoms, Sparsity = sparsity, Noise = noise, MinWeight = 0, Seed = seed,
                });
                var result = DictionaryLearner.Learn(problem.Vectors, signals, dims, new DictionaryOptions
                {
                    Atoms = atoms, Sparsity = sparsity, MaxRounds = 80, Tolerance = 0, Seed = seed,
                });
                found.Add(PlantedDictionary.CountRecovered(problem.Atoms, atoms, result.Atoms, atoms, dims, cosine: 0.99));
            }
            string level = snr is { } d ? $"{d.ToString(CultureInfo.InvariantCulture)} dB" : "no noise";
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"{level,-9} mean {found.Average():0.0} of 50 (per seed: {string.Join(", ", found)}); {clock.Elapsed.TotalSeconds / seeds:0.00} s per run"));
        }
        return 0;
    }
}
