using System.Diagnostics;
using System.Globalization;
using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.Senses;

namespace SenseSplit.Bench;

/// <summary>
/// Audit of a planted model (default 100,000 words × 300 dims, 2,000 atoms, 5,000-term glossary, no corpus) end to end
/// (naming, splitting, all four reports), beside the atoms×words product alone as reference; then the tagger on
/// generated text beside the tokenizer alone.
/// </summary>
public sealed class AuditBench : IBenchSuite
{
    public string Name => "audit";
    public string Description => "audit of a planted 100k-word / 2,000-atom model with a 5,000-term glossary; tagger throughput";

    public int Run(string[] args)
    {
        int words = Arg(args, "--words", 100_000), dims = Arg(args, "--dims", 300), atoms = Arg(args, "--atoms", 2000);
        int terms = Arg(args, "--terms", 5000), textMb = Arg(args, "--text-mb", 8);
        var sw = Stopwatch.StartNew();
        var p = PlantedSenseModel.Generate(words, dims, atoms, seed: 11);
        Console.WriteLine($"planted model: {words} words × {dims} dims, {atoms} atoms, generated in {sw.Elapsed.TotalSeconds:F1} s");
        var content = new ModelContent(new ModelManifest { Words = words, Dimensions = dims, Atoms = atoms, Sparsity = 5, HasCounts = true },
            p.Vectors, p.Atoms, p.AtomCount, p.Codes, p.Counts);

        // Reference: the atoms × words product alone, in the same blocks the catalogue uses.
        sw.Restart();
        var block = new float[(long)atoms * 2048];
        for (int start = 0; start < words; start += 2048)
        {
            int len = Math.Min(2048, words - start);
            Gemm.MultiplyTransposed(p.Atoms, atoms, p.Vectors.Values.AsSpan(start * dims, len * dims), len, dims, block);
        }
        double gemm = sw.Elapsed.TotalSeconds;
        Console.WriteLine($"reference: atoms×words product alone {gemm:F2} s ({2.0 * atoms * words * dims / gemm / 1e9:F1} GFLOP/s)");

        // Stages on their own: the sense model (catalogue, co-usage, indexes), then the splitting of the glossary.
        sw.Restart();
        var senseModel = SenseSplit.Cli.Reports.AuditInputs.BuildSenseModel(content, AuditCommand.Options(new AuditSettings()));
        double build = sw.Elapsed.TotalSeconds;
        Console.WriteLine($"stage: sense model (atom catalogue, co-usage, indexes) {build:F2} s ({build / gemm:F2}× the product alone)");

        // Glossary: terms-50 vocabulary words (every 10th polysemous by construction of the sample) + 50 misspellings.
        var rng = new Random(5);
        var chosen = Enumerable.Range(0, words).OrderBy(_ => rng.Next()).Take(terms - 50).ToArray();
        var list = chosen.Select(w => p.Vectors.Words[w]).Concat(Enumerable.Range(0, 50).Select(i => "w" + chosen[i] + "x")).ToArray();
        var glossary = Glossary.FromTerms(list);
        sw.Restart();
        var split = SenseAudit.Run(senseModel, glossary.Entries.Select(e => e.Query).ToArray());
        Console.WriteLine($"stage: splitting {terms} terms {sw.Elapsed.TotalSeconds:F2} s");
        sw.Restart();
        SenseAudit.Run(senseModel, glossary.Entries.Where(e => senseModel.IndexOf(e.Query.Key) >= 0).Select(e => e.Query).ToArray());
        Console.WriteLine($"stage: splitting only the known terms {sw.Elapsed.TotalSeconds:F2} s");
        var err = new StringWriter();
        var context = new CliContext(new StringWriter(), err);
        var outDir = Path.Combine(Path.GetTempPath(), $"sensesplit-bench-audit-{Environment.ProcessId}");
        sw.Restart();
        var report = AuditCommand.Execute(content, glossary, null, new AuditSettings(), context);
        double analyse = sw.Elapsed.TotalSeconds;
        AuditCommand.WriteOutputs(report, outDir, context);
        double total = sw.Elapsed.TotalSeconds;
        long bytes = Directory.GetFiles(outDir).Sum(f => new FileInfo(f).Length);
        Console.WriteLine($"audit: {terms} terms, naming + splitting {analyse:F2} s, with reports {total:F2} s ({total / gemm:F2}× the product alone); outputs {bytes / 1e6:F1} MB");
        int mono = 0, monoSeveral = 0, monoDoubt = 0, poly = 0, polySeveral = 0;
        for (int i = 0; i < chosen.Length; i++)
        {
            var v = report.Results[i].Verdict;
            if (p.IsPolysemous(chosen[i])) { poly++; if (v == Verdict.Several) polySeveral++; }
            else { mono++; if (v == Verdict.Several) monoSeveral++; if (v == Verdict.Doubtful) monoDoubt++; }
        }
        Console.WriteLine($"planted truth: one-sense terms {mono}: several {monoSeveral} ({100.0 * monoSeveral / Math.Max(1, mono):F2}%), doubtful {monoDoubt}; two-sense terms {poly}: several {polySeveral} ({100.0 * polySeveral / Math.Max(1, poly):F1}%)");
        Directory.Delete(outDir, true);

        // Tagger: sentences of 12 words from one topic each, with a glossary term in the middle.
        var byTopic = Enumerable.Range(0, p.Topics).Select(_ => new List<int>()).ToArray();
        for (int w = 0; w < words; w++) if (!p.IsPolysemous(w)) byTopic[p.WordTopics[w][0]].Add(w);
        var sb = new StringBuilder();
        while (sb.Length < textMb * 1_000_000)
        {
            int term = chosen[rng.Next(chosen.Length)];
            int topic = p.WordTopics[term][rng.Next(p.WordTopics[term].Length)];
            var pool = byTopic[topic];
            for (int j = 0; j < 12; j++)
            {
                if (j == 6) sb.Append(p.Vectors.Words[term]);
                else sb.Append(p.Vectors.Words[pool[rng.Next(pool.Count)]]);
                sb.Append(j == 11 ? ".\n" : " ");
            }
        }
        string text = sb.ToString();
        double mb = Encoding.UTF8.GetByteCount(text) / 1e6;
        sw.Restart();
        int tokens = WordTokenizer.Tokenize(text).Count();
        double tokenize = sw.Elapsed.TotalSeconds;
        var model = report.Model;
        var tagger = new TagCommand.Tagger(model, report.Results);
        var sink = new StringWriter();
        sw.Restart();
        long tagged = tagger.Tag(text, sink);
        double tag = sw.Elapsed.TotalSeconds;
        Console.WriteLine($"tagger: {mb:F1} MB, {tokens} tokens, {tagged} occurrences: {mb / tag:F2} MB/s; tokenizer alone {mb / tokenize:F2} MB/s (tagger takes {tag / tokenize:F2}× the tokenizer)");
        return 0;
    }

    private static int Arg(string[] args, string name, int fallback)
    {
        int i = Array.IndexOf(args, name);
        return i >= 0 && i + 1 < args.Length ? int.Parse(args[i + 1], CultureInfo.InvariantCulture) : fallback;
    }
}
