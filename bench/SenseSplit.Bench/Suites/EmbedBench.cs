using System.Diagnostics;
using System.Globalization;
using System.IO.Compression;
using System.Text;
using System.Text.RegularExpressions;
using SenseSplit.Bench.Baselines;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.Text;

namespace SenseSplit.Bench.Suites;

/// <summary>
/// The embed pipeline stage by stage on a corpus of at least 20 M tokens built from GCIDE (Debian dict-gcide: markup
/// stripped, lines repeated in shuffled order until the target size): decode, tokenize, vocabulary pass, counting pass,
/// merge, PPMI, SVD (d = 300) for each vocabulary size, peak memory. References in the same run: a naive tokenizer
/// (Regex split + ToLowerInvariant + Dictionary&lt;string,long&gt;) for pass 1, and for the counting pass the counter of
/// commit 909f2ad (<see cref="RowPartitionedCounter"/>), interleaved with the current one, best of the rounds, with
/// a bit-for-bit comparison of their counts.
/// Usage: embed [--tokens 20000000] [--words 30000,100000] [--corpus FILE] [--threads 2] [--rounds 2] [--skip-svd] [--count-only]
/// </summary>
public sealed class EmbedBench : IBenchSuite
{
    public string Name => "embed";
    public string Description => "embed pipeline stages on >= 20 M tokens of GCIDE text";
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public int Run(string[] args)
    {
        long targetTokens = 20_000_000;
        int[] vocabSizes = [30_000, 100_000];
        string? corpusPath = null;
        int threads = 0;
        bool skipSvd = false, countOnly = false;
        int rounds = 2;
        for (int i = 0; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--tokens": targetTokens = long.Parse(args[++i], C); break;
                case "--words": vocabSizes = args[++i].Split(',').Select(s => int.Parse(s, C)).ToArray(); break;
                case "--corpus": corpusPath = args[++i]; break;
                case "--threads": threads = int.Parse(args[++i], C); break;
                case "--skip-svd": skipSvd = true; break;
                case "--count-only": countOnly = true; break;
                case "--rounds": rounds = int.Parse(args[++i], C); break;
                case "--svd-parts": return SvdParts(threads <= 0 ? Environment.ProcessorCount : threads);
                default: Console.Error.WriteLine($"unknown option {args[i]}"); return 2;
            }
        }
        if (threads <= 0) threads = Environment.ProcessorCount;
        corpusPath ??= BuildGcideCorpus(targetTokens);
        var input = new CorpusInput(corpusPath, corpusPath, new FileInfo(corpusPath).Length, false);
        Console.WriteLine(string.Create(C, $"corpus {corpusPath}: {input.Bytes / 1e6:F1} MB; threads {threads}; load average {LoadAverage()}"));

        // Reference in the same run: naive tokenizer + counter.
        var sw = Stopwatch.StartNew();
        var naive = new Dictionary<string, long>();
        long naiveTokens = 0;
        var split = new Regex(@"[^\p{L}\p{Nd}'-]+", RegexOptions.Compiled);
        foreach (var line in File.ReadLines(corpusPath))
            foreach (var t in split.Split(line))
            {
                if (t.Length == 0) continue;
                var w = t.ToLowerInvariant();
                naive[w] = naive.GetValueOrDefault(w) + 1;
                naiveTokens++;
            }
        double naiveSeconds = sw.Elapsed.TotalSeconds;
        Report("baseline: Regex split + ToLower + Dictionary", naiveTokens, naiveSeconds);

        var reader = new CorpusReader();
        var cpuScan = Process.GetCurrentProcess().TotalProcessorTime;
        sw.Restart();
        var nullSink = new CountingSink();
        reader.Read(input, new TokenScanner(new TokenizerOptions()), nullSink);
        double scanSeconds = sw.Elapsed.TotalSeconds;
        Report("decode + tokenize (no table)", nullSink.Tokens, scanSeconds);
        Console.WriteLine(string.Create(C, $"  CPU time {(Process.GetCurrentProcess().TotalProcessorTime - cpuScan).TotalSeconds:F2} s"));

        var cpuPass1 = Process.GetCurrentProcess().TotalProcessorTime;
        sw.Restart();
        var table = new WordTable();
        var recorded = new IdRecorder();
        var vocabCounter = new VocabularyCounter(table, null, recorded);
        reader.Read(input, new TokenScanner(new TokenizerOptions()), vocabCounter);
        double pass1 = sw.Elapsed.TotalSeconds;
        Report("pass 1: decode + tokenize + word table + id stream (in memory here, a temporary file in the CLI)", vocabCounter.Tokens, pass1);
        double pass1Cpu = (Process.GetCurrentProcess().TotalProcessorTime - cpuPass1).TotalSeconds;
        Console.WriteLine(string.Create(C, $"  CPU time {pass1Cpu:F2} s = {vocabCounter.Tokens / pass1Cpu / 1e6:F2} M tokens per CPU-second"));
        Console.WriteLine(string.Create(C, $"  ratio to baseline: {naiveSeconds / pass1:F1}x faster"));

        var stream = recorded.Ids.ToArray();
        recorded.Ids.Clear();
        recorded.Ids.TrimExcess();
        foreach (int words in vocabSizes)
        {
            GC.Collect();
            var vocab = Vocabulary.Select(table, 5, words);
            // Counting, before and after in the same run, interleaved, best of the rounds: the row-partitioned
            // counter of commit 909f2ad fed value by value (as the CLI fed it), and the position-partitioned counter fed
            // through TokenIdMapper.TableIds in 1 MB chunks (as the CLI replays the id file). --rounds sets the rounds.
            double bestBefore = double.MaxValue, bestAfter = double.MaxValue, bestBeforeCpu = 0, bestAfterCpu = 0;
            CooccurrenceCounts? counts = null;
            CooccurrenceCounts? reference = null;
            int spilled = 0;
            double mergeSeconds = 0;
            for (int round = 0; round < rounds; round++)
            {
                {
                    GC.Collect();
                    var cpu = Process.GetCurrentProcess().TotalProcessorTime;
                    sw.Restart();
                    using var old = new RowPartitionedCounter(vocab.Count, new CooccurrenceOptions { Threads = threads });
                    var map = vocab.TableIdToWordId;
                    foreach (int v in stream)
                    {
                        if (v == IdStream.LineMark) old.LineBreak();
                        else if (v == IdStream.ParagraphMark) old.ParagraphBreak();
                        else old.Id(v >= 0 && v < map.Length ? map[v] : -1);
                    }
                    var result = old.Complete();
                    double seconds = sw.Elapsed.TotalSeconds;
                    if (seconds < bestBefore) { bestBefore = seconds; bestBeforeCpu = (Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds; }
                    reference ??= result;
                }
                {
                    GC.Collect();
                    var cpu = Process.GetCurrentProcess().TotalProcessorTime;
                    sw.Restart();
                    using var counter = new CooccurrenceCounter(vocab.Count, new CooccurrenceOptions { Threads = threads });
                    var mapper = new TokenIdMapper(table, vocab.TableIdToWordId, null, counter);
                    for (int at = 0; at < stream.Length; at += 1 << 18)
                        mapper.TableIds(stream.AsSpan(at, Math.Min(1 << 18, stream.Length - at)));
                    double feed = sw.Elapsed.TotalSeconds;
                    var merge = Stopwatch.StartNew();
                    var result = counter.Complete();
                    double seconds = sw.Elapsed.TotalSeconds;
                    if (seconds < bestAfter)
                    {
                        bestAfter = seconds;
                        bestAfterCpu = (Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds;
                        mergeSeconds = merge.Elapsed.TotalSeconds;
                        Console.WriteLine(string.Create(C, $"  after, round {round + 1}: feed and count {feed:F2} s, merge {mergeSeconds:F2} s"));
                    }
                    counts ??= result;
                    spilled = counter.SpilledRuns;
                }
            }
            long tokens = counts!.Tokens;
            Report($"V={vocab.Count}: pass 2 before (row-partitioned counter, value by value), including merge", tokens, bestBefore);
            Console.WriteLine(string.Create(C, $"  CPU time {bestBeforeCpu:F2} s"));
            Report($"V={vocab.Count}: pass 2 after (position-partitioned counter, bulk), including merge", tokens, bestAfter);
            Console.WriteLine(string.Create(C, $"  CPU time {bestAfterCpu:F2} s; merge part {mergeSeconds:F2} s"));
            Console.WriteLine(string.Create(C, $"  speed-up after / before: {bestBefore / bestAfter:F2}x; identical counts: {Identical(reference!, counts)}"));
            reference = null;
            Console.WriteLine(string.Create(C, $"V={vocab.Count}: {counts.UpperNonZeros} pairs, {spilled} runs"));
            if (countOnly) continue;
            sw.Restart();
            var ppmi = Ppmi.Compute(counts, new PpmiOptions());
            counts = null;
            Console.WriteLine(string.Create(C, $"V={vocab.Count}: PPMI {sw.Elapsed.TotalSeconds:F2} s, {ppmi.Matrix.NonZeros} entries"));
            GC.Collect();
            if (!skipSvd)
            {
                var cpuSvd = Process.GetCurrentProcess().TotalProcessorTime;
                sw.Restart();
                var svd = RandomizedSvd.Compute(ppmi.Matrix, 300, new RandomizedSvdOptions { Threads = threads }, ppmi.Transposed,
                    new Progress<string>(_ => { }));
                Console.WriteLine(string.Create(C, $"V={vocab.Count}: SVD d=300 p=10 q=4: {sw.Elapsed.TotalSeconds:F2} s (σ1 {svd.SingularValues[0]:G5}, σ300 {svd.SingularValues[299]:G5}), CPU {(Process.GetCurrentProcess().TotalProcessorTime - cpuSvd).TotalSeconds:F2} s"));
            }
            Console.WriteLine(string.Create(C, $"V={vocab.Count}: peak working set so far {Process.GetCurrentProcess().PeakWorkingSet64 / 1e6:F0} MB; load average {LoadAverage()}"));
        }
        return 0;
    }

    /// <summary>Same stored entries, row by row, bit for bit.</summary>
    private static bool Identical(CooccurrenceCounts a, CooccurrenceCounts b)
    {
        if (a.UpperNonZeros != b.UpperNonZeros || a.Tokens != b.Tokens || !a.WordCounts.AsSpan().SequenceEqual(b.WordCounts)) return false;
        for (int r = 0; r < a.Words; r++)
        {
            a.GetRow(r, out var ca, out var va);
            b.GetRow(r, out var cb, out var vb);
            if (!ca.SequenceEqual(cb) || !va.SequenceEqual(vb)) return false;
        }
        return true;
    }

    /// <summary>CPU and wall time of the SVD's building blocks at m = 30,000, l = 310.</summary>
    private static int SvdParts(int threads)
    {
        int m = 30_000, l = 310;
        var rng = new Random(1);
        var y = new float[m * l];
        for (int i = 0; i < y.Length; i++) y[i] = (float)(rng.NextDouble() - 0.5);
        var q = new float[m * l];
        var b = new float[l * l];
        for (int i = 0; i < b.Length; i++) b[i] = (float)(rng.NextDouble() - 0.5);
        void Time(string what, Action action)
        {
            action();
            var cpu = Process.GetCurrentProcess().TotalProcessorTime;
            var sw = Stopwatch.StartNew();
            action();
            Console.WriteLine(string.Create(C, $"{what}: wall {sw.Elapsed.TotalSeconds:F3} s, CPU {(Process.GetCurrentProcess().TotalProcessorTime - cpu).TotalSeconds:F3} s"));
        }
        Time("Gram YᵀY double (30000 × 310)", () => RandomizedSvd.Gram(y, m, l, threads));
        Time("Gemm Y·Mᵀ (30000 × 310 × 310)", () => Gemm.MultiplyTransposed(y, m, b, l, l, q, threads));
        Time("Evd 310 × 310 (MathNet)", () => MathNet.Numerics.LinearAlgebra.Matrix<double>.Build.Random(l, l).Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric));
        // Sparse product at PPMI-like density: 150 entries per row.
        var ptr = new int[m + 1];
        var cols = new int[m * 150];
        var vals = new float[m * 150];
        for (int i = 0; i < m; i++)
        {
            var set = new SortedSet<int>();
            while (set.Count < 150) set.Add((int)(Math.Pow(rng.NextDouble(), 2) * m));
            int at = i * 150;
            foreach (int c in set) { cols[at] = c; vals[at] = 1; at++; }
            ptr[i + 1] = at;
        }
        var a = new SparseMatrix(m, m, ptr, cols, vals);
        Time("CSR × dense (30000², 4.5 M entries, width 310)", () => a.Multiply(y, l, q, threads));
        return 0;
    }

    private static void Report(string what, long tokens, double seconds) =>
        Console.WriteLine(string.Create(C, $"{what}: {tokens / 1e6:F2} M tokens in {seconds:F2} s = {tokens / seconds / 1e6:F2} M tokens/s"));

    private static string LoadAverage()
    {
        try { return File.ReadAllText("/proc/loadavg").Split(' ').Take(3).Aggregate((a, b) => a + " " + b); }
        catch (IOException) { return "?"; }
    }

    private sealed class IdRecorder : IIdSink
    {
        public readonly List<int> Ids = new();
        public void Id(int id) => Ids.Add(id);
        public void LineBreak() => Ids.Add(IdStream.LineMark);
        public void ParagraphBreak() => Ids.Add(IdStream.ParagraphMark);
    }

    private sealed class CountingSink : ITokenSink
    {
        public long Tokens;
        public void Token(ReadOnlySpan<char> token) => Tokens++;
        public void LineBreak() { }
        public void ParagraphBreak() { }
    }

    /// <summary>GCIDE text (markup stripped), repeated with shuffled line order until ~target tokens; cached in /tmp.</summary>
    internal static string BuildGcideCorpus(long targetTokens)
    {
        string path = Path.Combine(Path.GetTempPath(), string.Create(C, $"sensesplit-bench-gcide-{targetTokens}.txt"));
        if (File.Exists(path)) return path;
        const string source = "/usr/share/dictd/gcide.dict.dz";
        if (!File.Exists(source)) throw new InvalidOperationException($"{source} is missing: apt-get install dict-gcide");
        var lines = GcideText.Lines(source).ToList();
        long perCopy = lines.Sum(l => (long)l.Split(' ', StringSplitOptions.RemoveEmptyEntries).Length);
        var rng = new Random(1);
        using var w = new StreamWriter(path + ".tmp", false, new UTF8Encoding(false));
        long written = 0;
        for (int copy = 0; written < targetTokens; copy++)
        {
            var order = lines.ToArray();
            if (copy > 0) rng.Shuffle(order);
            foreach (var l in order) w.WriteLine(l);
            written += perCopy;
        }
        w.Close();
        File.Move(path + ".tmp", path);
        return path;
    }
}

/// <summary>Plain text of the GCIDE dictd database: pronunciations (\...\), bracketed notes ([...]) and braces removed;
/// "Syn:" lines dropped (they are synonym lists, which would make a synonym check trivial).</summary>
internal static class GcideText
{
    public static IEnumerable<string> Lines(string dictDz)
    {
        using var f = File.OpenRead(dictDz);
        using var gz = new GZipStream(f, CompressionMode.Decompress);
        using var r = new StreamReader(gz, Encoding.UTF8);
        string? line;
        bool inSyn = false;
        while ((line = r.ReadLine()) is not null)
        {
            var t = line.Trim();
            if (t.StartsWith("Syn:", StringComparison.Ordinal)) { inSyn = true; continue; }
            if (inSyn && line.StartsWith("     ", StringComparison.Ordinal) && t.Length > 0) continue;
            inSyn = false;
            t = Regex.Replace(t, @"\\[^\\]*\\", "");
            t = Regex.Replace(t, @"\[[^\]]*\]", "");
            t = t.Replace("{", "").Replace("}", "");
            yield return t;
        }
    }
}
