using System.Diagnostics;
using System.Globalization;
using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Bench;

/// <summary>
/// End to end <c>sensesplit atoms</c> on an embedding-like matrix with a planted dictionary: writes the matrix as a
/// plain-text vectors file, runs the command in-process at its default settings, and reports wall time, the split
/// between loading and learning, planted-atom recovery and peak memory against the memory budget
/// (2 × vectors + the K×K Gram matrix).
/// </summary>
public sealed class AtomsPipelineBench : IBenchSuite
{
    public string Name => "atoms";
    public string Description => "atoms command end to end on a planted matrix (--rows N, --dims d, --atoms K, --noise x, --rounds R; --write-only FILE writes the matrix and stops, so the command can be timed as its own process)";

    public int Run(string[] args)
    {
        int rows = Arg(args, "--rows", 100_000), dims = Arg(args, "--dims", 300), atoms = Arg(args, "--atoms", 2000);
        double noise = double.Parse(ArgS(args, "--noise", "0.05"), CultureInfo.InvariantCulture);
        string? rounds = args.Contains("--rounds") ? ArgS(args, "--rounds", "") : null;
        var problem = PlantedDictionary.Generate(new PlantedOptions { Rows = rows, Dimensions = dims, Atoms = atoms, Noise = noise, Seed = 11 });
        if (args.Contains("--write-only"))
        {
            WriteText(ArgS(args, "--write-only", "planted.txt"), problem);
            NpyFileWriter(ArgS(args, "--write-only", "planted.txt") + ".atoms.npy", problem);
            return 0;
        }
        string dir = Path.Combine(Path.GetTempPath(), "sensesplit-bench-atoms-" + Environment.ProcessId);
        Directory.CreateDirectory(dir);
        try
        {
            string vectorsPath = Path.Combine(dir, "planted.txt");
            WriteText(vectorsPath, problem);
            Console.WriteLine($"planted matrix: {rows} × {dims}, {atoms} atoms, 5 per vector, noise {noise}; text file {new FileInfo(vectorsPath).Length / 1e6:0} MB");
            long before = Process.GetCurrentProcess().PeakWorkingSet64;
            var err = new StringWriter();
            var clock = Stopwatch.StartNew();
            var argv = new List<string> { "atoms", "--vectors", vectorsPath, "--out", Path.Combine(dir, "model"), "--atoms", atoms.ToString(CultureInfo.InvariantCulture) };
            if (rounds is not null) argv.AddRange(["--rounds", rounds]);
            int code = CliApp.Run([.. argv], TextWriter.Null, err);
            double wall = clock.Elapsed.TotalSeconds;
            if (code != 0) { Console.WriteLine($"atoms failed ({code}):\n{err}"); return 1; }
            var model = ModelFolder.Load(Path.Combine(dir, "model"));
            int found = PlantedDictionary.CountRecovered(problem.Atoms, atoms, model.Atoms, model.AtomCount, dims);
            double vectorsMb = 4.0 * rows * dims / 1e6, gramMb = 4.0 * atoms * atoms / 1e6;
            double peakMb = Process.GetCurrentProcess().PeakWorkingSet64 / 1e6;
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"wall {wall:0.0} s (load {model.Manifest.Timings.ReadSeconds:0.0} s, learn {model.Manifest.Timings.LearnSeconds:0.0} s, rounds {model.Manifest.RoundsRun}, {model.Manifest.StopReason})"));
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"time per round {model.Manifest.Timings.LearnSeconds / Math.Max(1, model.Manifest.RoundsRun):0.00} s; final relative error {model.Manifest.ErrorPerRound[^1]:0.0000}"));
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"planted atoms recovered at |cos| > 0.99: {found} / {atoms} ({100.0 * found / atoms:0.0}%)"));
            Console.WriteLine(string.Create(CultureInfo.InvariantCulture,
                $"peak working set {peakMb:0} MB (includes the generated problem, {before / 1e6:0} MB before the run); budget 2 × vectors + Gram = {2 * vectorsMb + gramMb:0} MB"));
            return 0;
        }
        finally
        {
            Directory.Delete(dir, true);
        }
    }

    private static void WriteText(string path, PlantedProblem p)
    {
        using var w = new StreamWriter(path, false, new UTF8Encoding(false), 1 << 20);
        w.Write($"{p.Rows} {p.Dimensions}\n");
        for (int i = 0; i < p.Rows; i++)
        {
            w.Write("w");
            w.Write(i.ToString(CultureInfo.InvariantCulture));
            for (int j = 0; j < p.Dimensions; j++)
            {
                w.Write(' ');
                w.Write(p.Vectors[i * p.Dimensions + j].ToString("G7", CultureInfo.InvariantCulture));
            }
            w.Write('\n');
        }
    }

    private static void NpyFileWriter(string path, PlantedProblem p)
    {
        using var stream = File.Create(path);
        NpyFile.WriteMatrix<float>(stream, p.Atoms, p.AtomCount, p.Dimensions);
    }

    internal static int Arg(string[] args, string name, int fallback)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? int.Parse(args[i + 1], CultureInfo.InvariantCulture) : fallback;
    }

    internal static string ArgS(string[] args, string name, string fallback)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? args[i + 1] : fallback;
    }
}
