using System.Diagnostics;
using System.Globalization;
using System.IO.Compression;
using System.Text;
using SenseSplit.Cli.IO;

namespace SenseSplit.Bench;

/// <summary>
/// Suite <c>load</c>: reading a plain-text word-vector file with <see cref="VectorFile"/> (byte spans, in-place
/// number parsing) against a naive reader (File.ReadLines + string.Split + float.Parse) in the same run, on a
/// generated file of --rows × --dims (default 400,000 × 300, about 1 GB, GloVe-like 6-decimal numbers).
/// Options: --rows N, --dims D, --digits short|full (full: shortest round-trip float text, 8-9 digits as some
/// tools write), --no-naive, --gzip (also time the .gz of the same file), --npy (also time a .npy + words file),
/// --keep (leave the temp folder).
/// </summary>
public sealed class LoadBench : IBenchSuite
{
    public string Name => "load";
    public string Description => "Read text word vectors: span parser vs File.ReadLines+Split+float.Parse (default 400000x300)";

    public int Run(string[] args)
    {
        int rows = IntArg(args, "--rows", 400_000), dims = IntArg(args, "--dims", 300);
        bool full = StringArg(args, "--digits", "short") == "full";
        bool naive = !args.Contains("--no-naive"), gzip = args.Contains("--gzip"), npy = args.Contains("--npy"), keep = args.Contains("--keep");
        var dir = Path.Combine(Path.GetTempPath(), "sensesplit-bench-load-" + Guid.NewGuid().ToString("N")[..8]);
        Directory.CreateDirectory(dir);
        try
        {
            var path = Path.Combine(dir, "vectors.txt");
            var sw = Stopwatch.StartNew();
            Generate(path, rows, dims, full, seed: 1);
            long bytes = new FileInfo(path).Length;
            Console.WriteLine($"generated {rows}x{dims} ({(full ? "shortest round-trip" : "6-decimal")} numbers), {bytes / 1e6:F0} MB in {sw.Elapsed.TotalSeconds:F1} s");
            Console.WriteLine($"{"reader",-28} {"wall s",8} {"CPU s",8} {"MB/s",8} {"Mnum/s",8} {"peak WS MB",10}");

            var (ours, oursSeconds) = Time("VectorFile.Read (text)", () => VectorFile.Read(path), bytes, (long)rows * dims);
            if (naive)
            {
                ours = null!; // let the first result go before the naive reader allocates its strings
                GC.Collect();
                var (naiveValues, naiveSeconds) = Time("naive ReadLines+Split", () => NaiveRead(path), bytes, (long)rows * dims);
                var again = VectorFile.Read(path);
                bool same = again.Vectors.Values.AsSpan().SequenceEqual(naiveValues);
                Console.WriteLine($"ratio naive/ours: {naiveSeconds / oursSeconds:F2}x  (values identical: {same})");
            }
            if (gzip)
            {
                var gz = path + ".gz";
                using (var input = File.OpenRead(path))
                using (var output = new GZipStream(File.Create(gz), CompressionLevel.Fastest))
                    input.CopyTo(output);
                Time($"VectorFile.Read (.gz, {new FileInfo(gz).Length / 1e6:F0} MB)", () => VectorFile.Read(gz), bytes, (long)rows * dims);
            }
            if (npy)
            {
                var load = VectorFile.Read(path);
                var np = Path.Combine(dir, "vectors.npy");
                VectorFile.WriteNpy(np, load.Vectors.Values, load.Vectors.Count, load.Vectors.Dimensions);
                File.WriteAllLines(Path.Combine(dir, "words.txt"), load.Vectors.Words);
                load = null!;
                Time("VectorFile.Read (.npy)", () => VectorFile.Read(np, Path.Combine(dir, "words.txt")), new FileInfo(np).Length, (long)rows * dims);
            }
            return 0;
        }
        finally
        {
            if (!keep) Directory.Delete(dir, recursive: true);
            else Console.WriteLine($"kept {dir}");
        }
    }

    private static (T Result, double Seconds) Time<T>(string name, Func<T> run, long bytes, long numbers)
    {
        GC.Collect();
        GC.WaitForPendingFinalizers();
        var process = Process.GetCurrentProcess();
        var cpu0 = process.TotalProcessorTime;
        var sw = Stopwatch.StartNew();
        var result = run();
        double s = sw.Elapsed.TotalSeconds;
        process.Refresh();
        double cpu = (process.TotalProcessorTime - cpu0).TotalSeconds;
        Console.WriteLine($"{name,-28} {s,8:F2} {cpu,8:F2} {bytes / 1e6 / s,8:F0} {numbers / 1e6 / s,8:F1} {process.PeakWorkingSet64 / 1e6,10:F0}");
        // CPU seconds include the GC and JIT threads; on a busy machine they are the steadier figure.
        return (result, s);
    }

    /// <summary>The reference: what a first implementation would do.</summary>
    private static float[] NaiveRead(string path)
    {
        var values = new List<float>();
        bool first = true;
        foreach (var line in File.ReadLines(path, Encoding.UTF8))
        {
            var parts = line.Split(' ', StringSplitOptions.RemoveEmptyEntries);
            if (first && parts.Length == 2) { first = false; continue; }
            first = false;
            for (int i = 1; i < parts.Length; i++) values.Add(float.Parse(parts[i], CultureInfo.InvariantCulture));
        }
        return [.. values];
    }

    /// <summary>GloVe-like file: no header, words "w123", values ~ N(0, 0.4²) written with 6 decimals (or shortest round-trip).</summary>
    private static void Generate(string path, int rows, int dims, bool full, int seed)
    {
        var rnd = new Random(seed);
        using var stream = new FileStream(path, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 20);
        var line = new byte[dims * 24 + 32];
        for (int r = 0; r < rows; r++)
        {
            int n = Encoding.ASCII.GetBytes("w" + r.ToString(CultureInfo.InvariantCulture), line);
            for (int j = 0; j < dims; j++)
            {
                // Box-Muller normal sample, scaled like typical trained embeddings.
                double u1 = 1.0 - rnd.NextDouble(), u2 = rnd.NextDouble();
                float v = (float)(0.4 * Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2));
                line[n++] = (byte)' ';
                v.TryFormat(line.AsSpan(n), out int w, full ? "R" : "0.######", CultureInfo.InvariantCulture);
                n += w;
            }
            line[n++] = (byte)'\n';
            stream.Write(line, 0, n);
        }
    }

    private static int IntArg(string[] args, string name, int fallback)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? int.Parse(args[i + 1], CultureInfo.InvariantCulture) : fallback;
    }

    private static string StringArg(string[] args, string name, string fallback)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? args[i + 1] : fallback;
    }
}
