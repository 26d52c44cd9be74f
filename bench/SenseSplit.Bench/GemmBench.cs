using System.Diagnostics;
using System.Globalization;
using System.Numerics.Tensors;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Bench;

/// <summary>
/// Dense products C = A·Bᵀ (Gemm.MultiplyTransposed) against the machine's practical peak (independent FMA chains
/// in registers), OpenBLAS cblas_sgemm when libopenblas.so.0 is installed, and a naive TensorPrimitives.Dot per pair.
/// Rounds are interleaved and each round prints its own ratios, because the shared machine drifts.
/// </summary>
public sealed class GemmBench : IBenchSuite
{
    public string Name => "gemm";
    public string Description => "C = A·Bᵀ kernels vs FMA peak loop, OpenBLAS sgemm, per-pair dot ([--rounds R] [--rows M] [--case vectors|gram|awkward])";

    private static readonly CultureInfo Inv = CultureInfo.InvariantCulture;

    public int Run(string[] args)
    {
        int rounds = IntOption(args, "--rounds", 3);
        int rows = IntOption(args, "--rows", 50_000);
        int at = Array.IndexOf(args, "--case");
        string only = at >= 0 && at + 1 < args.Length ? args[at + 1] : "";
        var blas = OpenBlas.TryLoad();
        Console.WriteLine(blas is null
            ? "# OpenBLAS: libopenblas.so.0 not found (Debian: apt-get install libopenblas0-pthread); its figures are skipped"
            : $"# OpenBLAS: {blas.Description}");
        Console.WriteLine($"# Auto path: {Gemm.Resolve(GemmKernel.Auto)}; GFLOP/s = 2·m·n·k / seconds; best of {rounds} interleaved rounds");
        Console.WriteLine("# (cpu x) after a figure = process CPU time / (wall time × threads): well below 1 means another process took the core");

        if (only is "" or "vectors") Case(blas, rounds, "vectors x atoms", rows, 2000, 300, gram: false, extraPaths: true);
        if (only is "" or "gram") Case(blas, rounds, "Gram of atoms", 2000, 2000, 300, gram: true, extraPaths: false);
        if (only is "" or "awkward") Case(blas, rounds, "awkward 300", 10_007, 300, 300, gram: false, extraPaths: false);
        return 0;
    }

    private static void Case(OpenBlas? blas, int rounds, string title, int m, int n, int k, bool gram, bool extraPaths)
    {
        Console.WriteLine();
        Console.WriteLine($"## {title}: A {m}×{k} · Bᵀ (B {n}×{k}), float32, seeded");
        var a = RandomMatrix(m, k, 1);
        var b = gram ? a : RandomMatrix(n, k, 2);
        var c = GC.AllocateUninitializedArray<float>(checked(m * n));
        double flops = 2.0 * m * n * k;
        var best = new Dictionary<string, double>(StringComparer.Ordinal);
        void Keep(string key, double gflops) => best[key] = Math.Max(best.GetValueOrDefault(key), gflops);

        // Narrower paths run on a share of the rows so that a round stays short; GFLOP/s are per their own size.
        int avx2Rows = Math.Min(m, 10_000), scalarRows = Math.Min(m, 1_000), dotRows = Math.Min(m, 500);
        Gemm.MultiplyTransposed(a, m, b, n, k, c, 1); // warm-up (JIT, page faults of C)
        blas?.MultiplyTransposed(a, m, b, n, k, c, 1);
        for (int round = 1; round <= rounds; round++)
        {
            var r = new Dictionary<string, double>(StringComparer.Ordinal);
            var cpu = new Dictionary<string, double>(StringComparer.Ordinal);
            void Figure(string key, double work, int threads, Action action)
            {
                var (seconds, share) = Time(action, threads);
                r[key] = work / seconds / 1e9;
                cpu[key] = share;
            }
            foreach (int t in new[] { 1, 2 })
            {
                Figure($"peak t{t}", FmaPeakFlops(t), t, () => FmaPeak(t));
                Figure($"ours t{t}", flops, t, () => Gemm.MultiplyTransposed(a, m, b, n, k, c, t));
                if (blas is not null) Figure($"openblas t{t}", flops, t, () => blas.MultiplyTransposed(a, m, b, n, k, c, t));
                if (gram)
                {
                    // Symmetric products: ours computes the lower tiles and mirrors them; OpenBLAS ssyrk fills the
                    // lower triangle only. GFLOP/s are counted as 2·m·n·k (the full product) for comparability.
                    Figure($"ours-gram t{t}", flops, t, () => Gemm.Gram(a, m, k, c, t));
                    if (blas is not null) Figure($"openblas-syrk t{t}", flops, t, () => blas.GramLower(a, m, k, c, t));
                }
            }
            if (extraPaths)
            {
                if (Gemm.IsSupported(GemmKernel.Avx2))
                    Figure("avx2 t2", 2.0 * avx2Rows * n * k, 2, () => Gemm.MultiplyTransposed(a.AsSpan(0, avx2Rows * k), avx2Rows, b, n, k, c, 2, GemmKernel.Avx2));
                Figure("avx2 t1", 2.0 * avx2Rows * n * k, 1, () => Gemm.MultiplyTransposed(a.AsSpan(0, avx2Rows * k), avx2Rows, b, n, k, c, 1, GemmKernel.Avx2));
                Figure("scalar t2", 2.0 * scalarRows * n * k, 2, () => Gemm.MultiplyTransposed(a.AsSpan(0, scalarRows * k), scalarRows, b, n, k, c, 2, GemmKernel.Scalar));
                Figure("dot t1", 2.0 * dotRows * n * k, 1, () => PairwiseDot(a, dotRows, b, n, k, c));
            }
            foreach (var (key, value) in r) Keep(key, value);
            var line = string.Join("  ", r.Select(kv => string.Create(Inv, $"{kv.Key} {kv.Value:F1} (cpu {cpu[kv.Key]:F2})")));
            Console.WriteLine($"round {round}: {line}");
            Console.WriteLine(Ratios(r, "  ratios"));
        }
        Console.WriteLine("best: " + string.Join("  ", best.Select(kv => string.Create(Inv, $"{kv.Key} {kv.Value:F1}"))));
        Console.WriteLine(Ratios(best, "best ratios"));
        if (blas is not null) Console.WriteLine(Agreement(blas, a, m, b, n, k));
    }

    private static string Ratios(Dictionary<string, double> r, string label)
    {
        var parts = new List<string>();
        foreach (int t in new[] { 1, 2 })
        {
            double ours = r[$"ours t{t}"];
            parts.Add(string.Create(Inv, $"t{t} ours/peak {ours / r[$"peak t{t}"]:F3}"));
            if (r.TryGetValue($"openblas t{t}", out double ob)) parts.Add(string.Create(Inv, $"t{t} ours/openblas {ours / ob:F3}"));
            if (r.TryGetValue($"ours-gram t{t}", out double og) && r.TryGetValue($"openblas-syrk t{t}", out double os))
                parts.Add(string.Create(Inv, $"t{t} ours-gram/openblas-syrk {og / os:F3}"));
        }
        return $"{label}: {string.Join("  ", parts)}";
    }

    /// <summary>Largest |ours − OpenBLAS| relative to max |C|, as a sanity check that both compute the same product.</summary>
    private static string Agreement(OpenBlas blas, float[] a, int m, float[] b, int n, int k)
    {
        int rows = Math.Min(m, 600);
        var ours = new float[rows * n];
        var theirs = new float[rows * n];
        Gemm.MultiplyTransposed(a.AsSpan(0, rows * k), rows, b, n, k, ours);
        blas.MultiplyTransposed(a.AsSpan(0, rows * k), rows, b, n, k, theirs, 2);
        double maxDiff = 0, maxAbs = 0;
        for (int i = 0; i < ours.Length; i++)
        {
            maxDiff = Math.Max(maxDiff, Math.Abs(ours[i] - theirs[i]));
            maxAbs = Math.Max(maxAbs, Math.Abs(theirs[i]));
        }
        return string.Create(Inv, $"agreement with OpenBLAS on {rows} rows: max |diff| / max |C| = {maxDiff / maxAbs:E2}");
    }

    private static void PairwiseDot(float[] a, int m, float[] b, int n, int k, float[] c)
    {
        for (int i = 0; i < m; i++)
        {
            var ai = a.AsSpan(i * k, k);
            for (int j = 0; j < n; j++) c[i * n + j] = TensorPrimitives.Dot(ai, b.AsSpan(j * k, k));
        }
    }

    /// <summary>Wall seconds of one call, and the process's CPU time over (wall × threads).</summary>
    private static (double Seconds, double CpuShare) Time(Action action, int threads)
    {
        var process = Process.GetCurrentProcess();
        var cpu0 = process.TotalProcessorTime;
        var sw = Stopwatch.StartNew();
        action();
        double seconds = sw.Elapsed.TotalSeconds;
        process.Refresh();
        return (seconds, (process.TotalProcessorTime - cpu0).TotalSeconds / (seconds * threads));
    }

    /// <summary>
    /// Practical peak: each worker runs 16 independent chains of Vector512 fused multiply-adds held in registers
    /// (16 ≥ FMA latency × FMA ports, so the ports never wait), ~0.2 s per worker.
    /// </summary>
    private static void FmaPeak(int threads)
    {
        if (!Avx512F.IsSupported) return;
        var sink = new float[threads];
        Parallel.For(0, threads, new ParallelOptions { MaxDegreeOfParallelism = threads }, t => sink[t] = FmaChains(PeakIterations).ToScalar());
    }

    private const long PeakIterations = 3_000_000;

    /// <summary>Floating-point operations of <see cref="FmaPeak"/>: 16 chains × 16 lanes × 2 per iteration per worker.</summary>
    private static double FmaPeakFlops(int threads) => Avx512F.IsSupported ? PeakIterations * 16 * 16 * 2.0 * threads : double.NaN;

    [MethodImpl(MethodImplOptions.NoInlining | MethodImplOptions.AggressiveOptimization)]
    private static Vector512<float> FmaChains(long iterations)
    {
        var x = Vector512.Create(0.999999f);
        var y = Vector512.Create(1e-6f);
        Vector512<float> a0 = Vector512.Create(0f), a1 = Vector512.Create(1f), a2 = Vector512.Create(2f), a3 = Vector512.Create(3f);
        Vector512<float> a4 = Vector512.Create(4f), a5 = Vector512.Create(5f), a6 = Vector512.Create(6f), a7 = Vector512.Create(7f);
        Vector512<float> a8 = Vector512.Create(8f), a9 = Vector512.Create(9f), a10 = Vector512.Create(10f), a11 = Vector512.Create(11f);
        Vector512<float> a12 = Vector512.Create(12f), a13 = Vector512.Create(13f), a14 = Vector512.Create(14f), a15 = Vector512.Create(15f);
        for (long i = 0; i < iterations; i++)
        {
            a0 = Avx512F.FusedMultiplyAdd(a0, x, y); a1 = Avx512F.FusedMultiplyAdd(a1, x, y);
            a2 = Avx512F.FusedMultiplyAdd(a2, x, y); a3 = Avx512F.FusedMultiplyAdd(a3, x, y);
            a4 = Avx512F.FusedMultiplyAdd(a4, x, y); a5 = Avx512F.FusedMultiplyAdd(a5, x, y);
            a6 = Avx512F.FusedMultiplyAdd(a6, x, y); a7 = Avx512F.FusedMultiplyAdd(a7, x, y);
            a8 = Avx512F.FusedMultiplyAdd(a8, x, y); a9 = Avx512F.FusedMultiplyAdd(a9, x, y);
            a10 = Avx512F.FusedMultiplyAdd(a10, x, y); a11 = Avx512F.FusedMultiplyAdd(a11, x, y);
            a12 = Avx512F.FusedMultiplyAdd(a12, x, y); a13 = Avx512F.FusedMultiplyAdd(a13, x, y);
            a14 = Avx512F.FusedMultiplyAdd(a14, x, y); a15 = Avx512F.FusedMultiplyAdd(a15, x, y);
        }
        return ((a0 + a1) + (a2 + a3)) + ((a4 + a5) + (a6 + a7)) + ((a8 + a9) + (a10 + a11)) + ((a12 + a13) + (a14 + a15));
    }

    private static float[] RandomMatrix(int rows, int cols, int seed)
    {
        var random = new Random(seed);
        var values = new float[rows * cols];
        for (int i = 0; i < values.Length; i++) values[i] = (float)(random.NextDouble() * 2 - 1);
        return values;
    }

    private static int IntOption(string[] args, string name, int fallback)
    {
        int at = Array.IndexOf(args, name);
        return at >= 0 && at + 1 < args.Length ? int.Parse(args[at + 1], NumberStyles.Integer, Inv) : fallback;
    }

    /// <summary>cblas_sgemm from a system OpenBLAS, bound at run time; null when the library is absent.</summary>
    private sealed unsafe class OpenBlas
    {
        private const int RowMajor = 101, NoTrans = 111, Trans = 112, Lower = 122;
        private readonly delegate* unmanaged<int, int, int, int, int, int, float, float*, int, float*, int, float, float*, int, void> _sgemm;
        private readonly delegate* unmanaged<int, int, int, int, int, float, float*, int, float, float*, int, void> _ssyrk;
        private readonly delegate* unmanaged<int, void> _setThreads;
        public string Description { get; }

        private OpenBlas(nint handle, string description)
        {
            _sgemm = (delegate* unmanaged<int, int, int, int, int, int, float, float*, int, float*, int, float, float*, int, void>)NativeLibrary.GetExport(handle, "cblas_sgemm");
            _ssyrk = (delegate* unmanaged<int, int, int, int, int, float, float*, int, float, float*, int, void>)NativeLibrary.GetExport(handle, "cblas_ssyrk");
            _setThreads = (delegate* unmanaged<int, void>)NativeLibrary.GetExport(handle, "openblas_set_num_threads");
            string config = "";
            if (NativeLibrary.TryGetExport(handle, "openblas_get_config", out nint getConfig))
                config = Marshal.PtrToStringAnsi(((delegate* unmanaged<nint>)getConfig)()) ?? "";
            Description = $"{description} ({config})";
        }

        public static OpenBlas? TryLoad()
            => NativeLibrary.TryLoad("libopenblas.so.0", out nint handle) ? new OpenBlas(handle, "libopenblas.so.0") : null;

        /// <summary>C = A·Bᵀ: cblas_sgemm(RowMajor, NoTrans, Trans, m, n, k, 1, A, k, B, k, 0, C, n).</summary>
        public void MultiplyTransposed(ReadOnlySpan<float> a, int m, ReadOnlySpan<float> b, int n, int k, Span<float> c, int threads)
        {
            _setThreads(threads);
            fixed (float* pa = a)
            fixed (float* pb = b)
            fixed (float* pc = c)
                _sgemm(RowMajor, NoTrans, Trans, m, n, k, 1f, pa, k, pb, k, 0f, pc, n);
        }

        /// <summary>Lower triangle of C = A·Aᵀ: cblas_ssyrk(RowMajor, Lower, NoTrans, m, k, 1, A, k, 0, C, m).</summary>
        public void GramLower(ReadOnlySpan<float> a, int m, int k, Span<float> c, int threads)
        {
            _setThreads(threads);
            fixed (float* pa = a)
            fixed (float* pc = c)
                _ssyrk(RowMajor, Lower, NoTrans, m, k, 1f, pa, k, 0f, pc, m);
        }
    }
}
