using System.Diagnostics;
using System.Globalization;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Bench;

/// <summary>Options shared by the <c>omp</c> and <c>learn</c> suites: <c>--rows --dims --atoms --sparsity --noise --seed
/// --threads</c> and suite-specific ones, each as <c>--name value</c>.</summary>
internal sealed class SparseBenchArgs
{
    private readonly Dictionary<string, string> values = new(StringComparer.Ordinal);

    public SparseBenchArgs(string[] args)
    {
        for (int i = 0; i < args.Length; i++)
        {
            if (!args[i].StartsWith("--", StringComparison.Ordinal) || i + 1 >= args.Length)
                throw new ArgumentException($"expected '--name value', got '{args[i]}'");
            values[args[i][2..]] = args[++i];
        }
    }

    public int Int(string name, int fallback) =>
        values.TryGetValue(name, out var v) ? int.Parse(v, NumberStyles.Integer, CultureInfo.InvariantCulture) : fallback;

    public double Double(string name, double fallback) =>
        values.TryGetValue(name, out var v) ? double.Parse(v, NumberStyles.Float, CultureInfo.InvariantCulture) : fallback;

    public PlantedOptions Planted() => new()
    {
        Rows = Int("rows", 100_000), Dimensions = Int("dims", 300), Atoms = Int("atoms", 2000),
        Sparsity = Int("sparsity", 5), Noise = Double("noise", 0.05), Seed = Int("seed", 1),
    };

    public static string F(double v, string format = "F3") => v.ToString(format, CultureInfo.InvariantCulture);

    public static string Describe(PlantedOptions p) =>
        $"planted problem: {p.Rows} vectors × {p.Dimensions} dims, {p.Atoms} atoms, {p.Sparsity} per vector, noise {F(p.Noise, "G3")}, weights ±U[{F(p.MinWeight, "G3")},1], seed {p.Seed}";

    public static string Memory()
    {
        var info = GC.GetGCMemoryInfo();
        using var proc = Process.GetCurrentProcess();
        return $"peak working set {F(proc.PeakWorkingSet64 / 1048576.0, "F0")} MB, GC heap {F(GC.GetTotalMemory(false) / 1048576.0, "F0")} MB, GC committed {F(info.TotalCommittedBytes / 1048576.0, "F0")} MB";
    }
}

/// <summary>Batch-OMP coding throughput with the planted (true) dictionary, split into correlations (the GEMM X·Dᵀ)
/// and the per-vector part, beside plain OMP (MathNet least squares) on a subsample.</summary>
public sealed class OmpSuite : IBenchSuite
{
    public string Name => "omp";
    public string Description => "Batch-OMP coding throughput vs plain OMP (--rows --dims --atoms --sparsity --noise --threads --plain)";

    public int Run(string[] args)
    {
        var a = new SparseBenchArgs(args);
        var p = a.Planted();
        int threads = a.Int("threads", Environment.ProcessorCount);
        int plainRows = a.Int("plain", 200);
        var sw = Stopwatch.StartNew();
        var problem = PlantedDictionary.Generate(p);
        Console.WriteLine($"{SparseBenchArgs.Describe(p)}; generated in {SparseBenchArgs.F(sw.Elapsed.TotalSeconds, "F1")} s");
        int n = p.Rows, d = p.Dimensions, k = p.Atoms, s = p.Sparsity;

        sw.Restart();
        var gram = BatchOmp.ComputeGram(problem.Atoms, k, d, threads);
        double tGram = sw.Elapsed.TotalSeconds;

        // Warm-up on a small slice (JIT), then the full coding.
        BatchOmp.Encode(problem.Vectors.AsSpan(0, Math.Min(n, 2048) * d), Math.Min(n, 2048), d, problem.Atoms, k, s, threads, gram);
        sw.Restart();
        var result = BatchOmp.Encode(problem.Vectors, n, d, problem.Atoms, k, s, threads, gram);
        double tFull = sw.Elapsed.TotalSeconds;

        // Correlations only: the same blocked products the coder runs, on the same number of workers.
        int block = BatchOmp.BlockRows(n);
        int blocks = (n + block - 1) / block;
        sw.Restart();
        int next = -1;
        Parallel.For(0, Math.Min(threads, blocks), new ParallelOptions { MaxDegreeOfParallelism = threads }, _ =>
        {
            var c = new float[block * k];
            int b;
            while ((b = Interlocked.Increment(ref next)) < blocks)
            {
                int m = Math.Min(block, n - b * block);
                Gemm.MultiplyTransposed(problem.Vectors.AsSpan(b * block * d, m * d), m, problem.Atoms, k, d, c, threads: 1);
            }
        });
        double tCorr = sw.Elapsed.TotalSeconds;

        // Per-vector part alone, one thread, on the first blocks (correlations precomputed, untimed).
        int sampleRows = Math.Min(n, 16 * block);
        var scratch = new BatchOmp.Scratch(block, k, s, d);
        var ids = new int[n * s];
        var ws = new float[n * s];
        var res = new float[n];
        double tPerVector = 0;
        unsafe
        {
            fixed (float* xp = problem.Vectors)
            fixed (float* dp = problem.Atoms)
            {
                var job = new BatchOmp.Job(xp, dp, n, d, k, s, gram, ids, ws, res, block);
                for (int first = 0; first < sampleRows; first += block)
                {
                    int m = Math.Min(block, sampleRows - first);
                    Gemm.MultiplyTransposed(problem.Vectors.AsSpan(first * d, m * d), m, problem.Atoms, k, d, scratch.Correlations, threads: 1);
                    var t0 = Stopwatch.GetTimestamp();
                    for (int r = 0; r < m; r++) job.CodeOne(first + r, scratch.Correlations.AsSpan(r * k, k), scratch);
                    tPerVector += Stopwatch.GetElapsedTime(t0).TotalSeconds;
                    if (Environment.GetEnvironmentVariable("OMP_HOT") == "1")
                    {
                        var t1 = Stopwatch.GetTimestamp();
                        for (int r = 0; r < m; r++) job.CodeOne(first + r, scratch.Correlations.AsSpan(r * k, k), scratch);
                        Console.Error.WriteLine($"block at {first}: cold {Stopwatch.GetElapsedTime(t0).TotalSeconds - Stopwatch.GetElapsedTime(t1).TotalSeconds:F4} s, hot {Stopwatch.GetElapsedTime(t1).TotalSeconds:F4} s");
                    }
                }
            }
        }
        double perVectorUs = tPerVector / sampleRows * 1e6;

        // Accuracy against the planted codes: same support (any order).
        int exact = 0;
        for (int i = 0; i < n; i++)
        {
            var got = result.Codes.AtomsOf(i).ToArray();
            var want = problem.TrueCodes.AtomsOf(i).ToArray();
            Array.Sort(got); Array.Sort(want);
            if (got.AsSpan().SequenceEqual(want)) exact++;
        }
        double meanRes = 0;
        foreach (float r in result.ResidualNorms) meanRes += r;
        meanRes /= n;

        // Plain OMP reference, one thread, on a subsample.
        var plain = new PlainOmp(problem.Atoms, k, d);
        plain.CodeOne(problem.Vectors.AsSpan(0, d), s); // warm-up
        sw.Restart();
        for (int i = 0; i < plainRows; i++) plain.CodeOne(problem.Vectors.AsSpan(i * d, d), s);
        double tPlain = sw.Elapsed.TotalSeconds;

        double gflop = 2.0 * n * k * d / 1e9;
        Console.WriteLine($"threads {threads}, block {block} rows");
        Console.WriteLine($"Gram {k}×{k}:              {SparseBenchArgs.F(tGram)} s");
        Console.WriteLine($"Batch-OMP, all {n} vectors: {SparseBenchArgs.F(tFull)} s = {SparseBenchArgs.F(n / tFull, "F0")} vectors/s");
        Console.WriteLine($"  correlations X·Dᵀ only:  {SparseBenchArgs.F(tCorr)} s ({SparseBenchArgs.F(gflop / tCorr, "F1")} GFLOP/s, {SparseBenchArgs.F(100 * tCorr / tFull, "F0")}% of the total)");
        Console.WriteLine($"  per-vector part:         {SparseBenchArgs.F(perVectorUs, "F2")} µs/vector on 1 thread ({sampleRows} vectors) → {SparseBenchArgs.F(n * perVectorUs / 1e6 / threads)} s on {threads} threads");
        Console.WriteLine($"  projection: at G GFLOP/s for the GEMM, vectors/s ≈ 1 / ({SparseBenchArgs.F(2.0 * k * d / 1e9 * 1e6, "F1")}/G + {SparseBenchArgs.F(perVectorUs / threads, "F2")}) · 1e6; e.g. G=100 → {SparseBenchArgs.F(1e6 / (2.0 * k * d / 100 / 1e3 + perVectorUs / threads), "F0")} vectors/s");
        Console.WriteLine($"  planted support recovered exactly: {SparseBenchArgs.F(100.0 * exact / n, "F2")}% of vectors; mean residual norm {SparseBenchArgs.F(meanRes, "G4")}");
        Console.WriteLine($"Plain OMP (MathNet QR, 1 thread), {plainRows} vectors: {SparseBenchArgs.F(tPlain)} s = {SparseBenchArgs.F(plainRows / tPlain, "F0")} vectors/s");
        Console.WriteLine($"ratio Batch-OMP ({threads} threads) / plain OMP (1 thread): {SparseBenchArgs.F(n / tFull / (plainRows / tPlain), "F0")}×");
        Console.WriteLine(SparseBenchArgs.Memory());
        return 0;
    }
}

/// <summary>Dictionary learning on the planted problem: time per round and phase, planted-atom recovery, memory.</summary>
public sealed class LearnSuite : IBenchSuite
{
    public string Name => "learn";
    public string Description => "dictionary learning on a planted dictionary (--rows --dims --atoms --sparsity --noise --rounds --tolerance --learnseed --threads)";

    private sealed class Observer(float[] planted, int plantedCount, int dims, bool trackRecovery) : ILearningObserver
    {
        private readonly Stopwatch clock = Stopwatch.StartNew();
        private double mark;
        private LearningPhase current = LearningPhase.Done;
        public double Coding, Update, Replacement;
        public readonly List<string> Lines = [];
        private double roundStart;

        public void Phase(int round, LearningPhase phase)
        {
            double now = clock.Elapsed.TotalSeconds;
            switch (current)
            {
                case LearningPhase.Coding: Coding += now - mark; break;
                case LearningPhase.Update: Update += now - mark; break;
                case LearningPhase.Replacement: Replacement += now - mark; break;
            }
            if (phase == LearningPhase.Coding && current != LearningPhase.Replacement) roundStart = now;
            mark = now;
            current = phase;
        }

        public double Now => clock.Elapsed.TotalSeconds;

        public void RoundDone(int round, ReadOnlySpan<float> atoms)
        {
            double now = clock.Elapsed.TotalSeconds;
            Replacement += now - mark;
            mark = now;
            current = LearningPhase.Done;
            string rec = "";
            if (trackRecovery)
            {
                int found = PlantedDictionary.CountRecovered(planted, plantedCount, atoms, atoms.Length / dims, dims);
                rec = $", recovered {found}/{plantedCount}";
            }
            Lines.Add($"round {round}: {SparseBenchArgs.F(now - roundStart, "F2")} s{rec}");
            Console.Error.WriteLine(Lines[^1]);
            mark = clock.Elapsed.TotalSeconds; // recovery counting is not part of learning
            roundStart = mark;
        }
    }

    private sealed class SyncProgress(List<RoundReport> reports) : IProgress<RoundReport>
    {
        public void Report(RoundReport value) => reports.Add(value);
    }

    public int Run(string[] args)
    {
        var a = new SparseBenchArgs(args);
        var p = a.Planted();
        var defaults = new DictionaryOptions();
        var options = new DictionaryOptions
        {
            Atoms = p.Atoms, Sparsity = p.Sparsity,
            MaxRounds = a.Int("rounds", defaults.MaxRounds), Tolerance = a.Double("tolerance", defaults.Tolerance),
            Seed = a.Int("learnseed", defaults.Seed), Threads = a.Int("threads", 0),
        };
        bool track = a.Int("track", 1) != 0;
        var sw = Stopwatch.StartNew();
        var problem = PlantedDictionary.Generate(p);
        Console.WriteLine($"{SparseBenchArgs.Describe(p)}; generated in {SparseBenchArgs.F(sw.Elapsed.TotalSeconds, "F1")} s");
        Console.WriteLine($"options: max rounds {options.MaxRounds}, tolerance {SparseBenchArgs.F(options.Tolerance, "G3")}, seed {options.Seed}, threads {(options.Threads == 0 ? Environment.ProcessorCount : options.Threads)}");
        GC.Collect();
        Console.WriteLine($"before learning: {SparseBenchArgs.Memory()}; vectors {SparseBenchArgs.F(problem.Vectors.Length * 4 / 1048576.0, "F0")} MB, Gram {SparseBenchArgs.F(4.0 * p.Atoms * p.Atoms / 1048576.0, "F0")} MB");

        var observer = new Observer(problem.Atoms, p.Atoms, p.Dimensions, track);
        var reports = new List<RoundReport>();
        double t0 = observer.Now;
        var result = DictionaryLearner.Learn(problem.Vectors, p.Rows, p.Dimensions, options, observer, DictionaryLearner.DefaultKeptResiduals, new SyncProgress(reports));
        double total = observer.Now - t0;
        int found = PlantedDictionary.CountRecovered(problem.Atoms, p.Atoms, result.Atoms, result.AtomCount, p.Dimensions);

        for (int r = 0; r < reports.Count; r++)
        {
            var rep = reports[r];
            string timing = r < observer.Lines.Count ? observer.Lines[r] : $"round {rep.Round}: (coding only)";
            Console.WriteLine($"{timing}, relative error {SparseBenchArgs.F(rep.RelativeError, "F5")}, replaced {rep.AtomsReplaced}");
        }
        Console.WriteLine($"stop: {result.StopReason}; rounds run {result.RoundsRun}, converged {result.Converged}, final relative error {SparseBenchArgs.F(result.FinalRelativeError, "F5")}");
        Console.WriteLine($"total {SparseBenchArgs.F(total, "F1")} s (recovery tracking excluded): coding {SparseBenchArgs.F(observer.Coding, "F1")} s, atom update {SparseBenchArgs.F(observer.Update, "F1")} s, Gram + replacement {SparseBenchArgs.F(observer.Replacement, "F1")} s");
        Console.WriteLine($"planted atoms recovered (|cos| > 0.99): {found} of {p.Atoms} = {SparseBenchArgs.F(100.0 * found / p.Atoms, "F1")}%");
        Console.WriteLine($"after learning: {SparseBenchArgs.Memory()}");
        return 0;
    }
}
