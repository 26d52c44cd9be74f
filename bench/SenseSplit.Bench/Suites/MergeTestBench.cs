using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using System.Text.RegularExpressions;
using SenseSplit.Cli;

namespace SenseSplit.Bench.Suites;

/// <summary>
/// The built-in fold-in merge test end to end on the GCIDE benchmark corpus (<see cref="EmbedBench.BuildGcideCorpus"/>:
/// markup stripped, lines repeated in shuffled order until the target size). Embeds the corpus in-process with embed's
/// defaults, then runs <c>merge-test</c> (fold-in, 200 pairs) in-process, and splits its wall time into the one corpus
/// pass that counts the pairs' contexts and everything else. Reference in the same run: embed's own pass over the raw
/// text (decode, tokenize, word table) and its counting pass.
/// Usage: merge-test [--tokens 20000000] [--corpus FILE] [--embedding DIR] [--pairs 200] [--retrain] [--corpus-only]
/// (--corpus-only writes the corpus, prints its path and stops, so the commands can be timed as their own processes).
/// </summary>
public sealed class MergeTestBench : IBenchSuite
{
    public string Name => "merge-test";
    public string Description => "fold-in merge test (200 pairs) on >= 20 M tokens of GCIDE text, beside embed's passes; --corpus-only writes the corpus";
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public int Run(string[] args)
    {
        long targetTokens = 20_000_000;
        string? corpusPath = null, embedding = null;
        int pairs = 200;
        bool corpusOnly = false, retrain = false;
        for (int i = 0; i < args.Length; i++)
        {
            switch (args[i])
            {
                case "--tokens": targetTokens = long.Parse(args[++i], C); break;
                case "--corpus": corpusPath = args[++i]; break;
                case "--embedding": embedding = args[++i]; break;
                case "--pairs": pairs = int.Parse(args[++i], C); break;
                case "--retrain": retrain = true; break;
                case "--corpus-only": corpusOnly = true; break;
                default: Console.Error.WriteLine($"unknown option {args[i]}"); return 2;
            }
        }
        corpusPath ??= EmbedBench.BuildGcideCorpus(targetTokens);
        Console.WriteLine(string.Create(C, $"corpus {corpusPath}: {new FileInfo(corpusPath).Length / 1e6:F1} MB; load average {LoadAverage()}"));
        if (corpusOnly) return 0;

        string dir = Path.Combine(Path.GetTempPath(), $"sensesplit-bench-merge-{Environment.ProcessId}");
        Directory.CreateDirectory(dir);
        try
        {
            if (embedding is null)
            {
                embedding = Path.Combine(dir, "embedding");
                var embedErr = new StringWriter();
                var clock = Stopwatch.StartNew();
                int code = CliApp.Run(["embed", corpusPath, "--out", embedding], TextWriter.Null, embedErr);
                if (code != 0) { Console.WriteLine($"embed failed ({code}):\n{embedErr}"); return 1; }
                Console.WriteLine(string.Create(C, $"embed (defaults): {clock.Elapsed.TotalSeconds:F1} s wall"));
            }
            using (var manifest = JsonDocument.Parse(File.ReadAllBytes(Path.Combine(embedding, "manifest.json"))))
            {
                var root = manifest.RootElement;
                long tokens = root.GetProperty("tokens").GetInt64();
                var timings = root.GetProperty("timingsSeconds");
                double vocabulary = timings.GetProperty("vocabulary").GetDouble(), counting = timings.GetProperty("counting").GetDouble();
                Console.WriteLine(string.Create(C, $"embedding: {tokens / 1e6:F2} M tokens, {root.GetProperty("words").GetInt32()} words, {root.GetProperty("dimensions").GetInt32()} dimensions"));
                Console.WriteLine(string.Create(C, $"reference, embed pass 1 over the raw text (decode, tokenize, word table): {vocabulary:F2} s = {tokens / vocabulary / 1e6:F2} M tokens/s"));
                Console.WriteLine(string.Create(C, $"reference, embed pass 2 (co-occurrence counting from the id stream): {counting:F2} s"));
            }

            var err = new StringWriter();
            var watch = Stopwatch.StartNew();
            var argv = new List<string> { "merge-test", "--corpus", corpusPath, "--embedding", embedding, "--out", Path.Combine(dir, "merge"), "--pairs", pairs.ToString(C) };
            if (retrain) argv.Add("--retrain");
            int mergeCode = CliApp.Run([.. argv], TextWriter.Null, err);
            double wall = watch.Elapsed.TotalSeconds;
            if (mergeCode is not (0 or 5)) { Console.WriteLine($"merge-test failed ({mergeCode}):\n{err}"); return 1; }
            string log = err.ToString();
            // Each corpus pass ends with "<pass>: ... MB of ... MB (100%), ... M tokens, ... M tokens/s, <seconds> s".
            double passes = 0;
            foreach (Match m in Regex.Matches(log, @"^(?<name>[^:\n]+): [0-9.]+ MB of [0-9.]+ MB \(100%\), (?<tokens>[0-9.]+) M tokens, [0-9.]+ M tokens/s, (?<s>[0-9.]+) s$", RegexOptions.Multiline))
            {
                double s = double.Parse(m.Groups["s"].Value, C);
                passes += s;
                Console.WriteLine(string.Create(C, $"merge-test corpus pass '{m.Groups["name"].Value}': {s:F2} s ({m.Groups["tokens"].Value} M tokens)"));
            }
            Console.WriteLine(string.Create(C, $"merge-test ({(retrain ? "retrain" : "fold-in")}, {pairs} pairs, exit {mergeCode}): {wall:F2} s wall; corpus passes {passes:F2} s; everything else {wall - passes:F2} s"));
            foreach (var line in log.Split('\n').Where(l => l.Contains(": ", StringComparison.Ordinal) && Regex.IsMatch(l, @"[0-9.]+ s$") && !l.Contains(" MB of ", StringComparison.Ordinal)))
                Console.WriteLine("  stage " + line.Trim());
            Console.WriteLine(string.Create(C, $"peak working set {Process.GetCurrentProcess().PeakWorkingSet64 / 1e6:F0} MB; load average {LoadAverage()}"));
            return 0;
        }
        finally
        {
            try { Directory.Delete(dir, recursive: true); } catch (IOException) { }
        }
    }

    private static string LoadAverage()
    {
        try { return File.ReadAllText("/proc/loadavg").Split(' ').Take(3).Aggregate((a, b) => a + " " + b); }
        catch (IOException) { return "?"; }
    }
}
