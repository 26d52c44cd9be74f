using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using System.Text.Json;
using System.Text.Json.Nodes;
using SenseSplit.Cli.Demo;
using SenseSplit.Core.Demo;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit demo</c>: the whole job on the built-in invented scenario, scored against the planted truth.</summary>
public static class DemoCommand
{
    public static Command Create(CliContext context)
    {
        var output = new Option<string>("--out") { Description = "Folder for the demo's corpus, embedding, model, reports and scorecard (default demo-out).", DefaultValueFactory = _ => "demo-out" };
        var tokens = new Option<long>("--tokens") { Description = "Size of the generated corpus in tokens (default 3000000).", DefaultValueFactory = _ => 3_000_000 };
        var seed = new Option<int>("--seed") { Description = "Seed of the corpus generator and of every later step (default 7).", DefaultValueFactory = _ => 7 };
        var atoms = new Option<int>("--atoms") { Description = "Atoms to learn (default 120: the demo vocabulary is small).", DefaultValueFactory = _ => 120 };
        var dim = new Option<int>("--dim") { Description = "Embedding dimensions (default 100).", DefaultValueFactory = _ => 100 };
        var command = new Command("demo", "Generate the built-in Quillhaven corpus and run embed, atoms, audit and the merge test on it; print a scorecard against the planted senses.")
        {
            output, tokens, seed, atoms, dim,
        };
        command.SetAction((parse, cancel) => Task.FromResult(Run(context, parse.GetValue(output)!, parse.GetValue(tokens), parse.GetValue(seed), parse.GetValue(atoms), parse.GetValue(dim), cancel)));
        return command;
    }

    public static int Run(CliContext context, string outDir, long tokens, int seed, int atoms, int dim, CancellationToken cancel)
    {
        try
        {
            var clock = Stopwatch.StartNew();
            var scenario = ScenarioLoader.BuiltIn();
            string S(int i) => i.ToString(CultureInfo.InvariantCulture);
            string corpusDir = Path.Combine(outDir, "corpus");
            string corpus = Path.Combine(corpusDir, "quillhaven.txt");
            string glossary = Path.Combine(outDir, "glossary.csv");
            string embedding = Path.Combine(outDir, "embedding");
            string model = Path.Combine(outDir, "model");
            string audit = Path.Combine(outDir, "audit");
            const int steps = 5;

            context.Err.WriteLine($"[1/{steps}] writing the {scenario.Name} corpus ({tokens.ToString("N0", CultureInfo.InvariantCulture)} tokens) to {corpus}");
            var settings = new DiscourseSettings { Tokens = tokens, Seed = seed };
            var generator = new DiscourseCorpusGenerator(scenario, settings);
            var progress = ProgressDisplay.For(context);
            progress.Stage("writing the corpus");
            DemoFiles.WriteCorpus(corpus, generator, tokens, n => progress.Update("tokens", n, tokens));
            progress.EndStage($"{tokens.ToString("N0", CultureInfo.InvariantCulture)} tokens");
            DemoFiles.WriteGlossary(glossary, scenario);
            DemoFiles.WriteTruth(Path.Combine(outDir, "truth.json"), scenario, generator, settings);
            cancel.ThrowIfCancellationRequested();

            context.Err.WriteLine($"[2/{steps}] embed: counts, PPMI, randomized SVD");
            Step(context, "embed", [corpus, "--out", embedding, "--overwrite", "--dim", S(dim), "--seed", S(seed)]);
            cancel.ThrowIfCancellationRequested();

            context.Err.WriteLine($"[3/{steps}] atoms: dictionary learning");
            Step(context, "atoms", ["--vectors", Path.Combine(embedding, "vectors.txt"), "--counts", Path.Combine(embedding, "counts.tsv"),
                "--out", model, "--atoms", S(atoms), "--seed", S(seed)]);
            cancel.ThrowIfCancellationRequested();

            context.Err.WriteLine($"[4/{steps}] audit: senses of the glossary terms");
            Step(context, "audit", ["--model", model, "--terms", glossary, "--corpus", corpus, "--out", audit]);

            context.Err.WriteLine($"[5/{steps}] merge test: does the embedding keep merged word pairs apart?");
            string mergeDir = Path.Combine(outDir, "merge-test");
            int mergeCode = CliApp.Run(["merge-test", "--corpus", corpus, "--embedding", embedding, "--out", mergeDir, "--seed", S(seed)], TextWriter.Null, context.Err);
            if (mergeCode is not (ExitCodes.Ok or ExitCodes.MergeTestFailed))
                throw new UserFacingException($"demo: the merge-test step failed (exit code {mergeCode}); see the messages above", mergeCode);
            string mergeVerdict = mergeCode == ExitCodes.Ok ? "pass" : "fail";

            var score = Score(scenario, generator, Path.Combine(audit, "senses.jsonl"));
            WriteScorecard(Path.Combine(outDir, "scorecard.json"), score, clock.Elapsed.TotalSeconds, tokens, seed, mergeVerdict);
            PrintScorecard(context.Err, score);
            context.Err.WriteLine($"  merge test of the demo embedding: {mergeVerdict} (details in {Path.Combine(mergeDir, "merge-test.json")})");
            context.Err.WriteLine($"report: {Path.GetFullPath(Path.Combine(audit, "report.html"))}");
            context.Err.WriteLine($"demo finished in {ProgressDisplay.FormatSeconds(clock.Elapsed)}");
            context.Out.WriteLine(Path.GetFullPath(Path.Combine(outDir, "scorecard.json")));
            return ExitCodes.Ok;
        }
        catch (Exception ex) when (ex is not OperationCanceledException)
        {
            return CliApp.Report(context, ex);
        }
    }

    private static void Step(CliContext context, string verb, string[] args)
    {
        int code = CliApp.Run([verb, .. args], TextWriter.Null, context.Err);
        if (code != ExitCodes.Ok) throw new UserFacingException($"demo: the {verb} step failed (exit code {code}); see the messages above", code);
    }

    internal static DemoScore Score(DemoScenario scenario, DiscourseCorpusGenerator generator, string sensesJsonl)
    {
        var topicWords = new Dictionary<string, IReadOnlyCollection<string>>(StringComparer.Ordinal);
        for (int t = 0; t < scenario.Topics.Length; t++) topicWords[scenario.Topics[t].Id] = generator.TopicWords(t).ToHashSet(StringComparer.Ordinal);
        var audited = new List<AuditedTerm>();
        foreach (var line in File.ReadLines(sensesJsonl))
        {
            if (line.Length == 0) continue;
            var node = JsonNode.Parse(line)!;
            string term = (string)node["term"]!;
            string verdict = (string)node["verdict"]!;
            var senses = new List<IReadOnlyList<string>>();
            foreach (var s in node["senses"]!.AsArray())
            {
                var words = new List<string>();
                foreach (var key in new[] { "label", "neighbours" })
                    if (s![key] is JsonArray arr) words.AddRange(arr.Select(w => (string)w!));
                senses.Add(words);
            }
            audited.Add(new AuditedTerm(term, verdict == "several", senses));
        }
        return DemoScorecard.Score(scenario, topicWords, audited);
    }

    private static void WriteScorecard(string path, DemoScore s, double seconds, long tokens, int seed, string mergeVerdict)
    {
        var json = new
        {
            precision = s.Precision,
            recall = s.Recall,
            terms = s.Terms,
            planted_several = s.PlantedSeveral,
            flagged_several = s.FlaggedSeveral,
            true_positives = s.TruePositives,
            planted_senses = s.PlantedSenses,
            senses_found = s.SensesFound,
            merge_test_verdict = mergeVerdict,
            matches = s.Matches.Select(m => new { term = m.Term, topic = m.Topic, share = m.Share, audit_sense = m.AuditSense, overlap = m.Overlap }),
            tokens,
            seed,
            seconds = Math.Round(seconds, 1),
        };
        DemoFiles.WriteAtomically(path, w => w.Write(JsonSerializer.Serialize(json, new JsonSerializerOptions { WriteIndented = true })));
    }

    private static void PrintScorecard(TextWriter err, DemoScore s)
    {
        err.WriteLine("scorecard against the planted truth:");
        err.WriteLine(string.Create(CultureInfo.InvariantCulture, $"  'several senses' verdicts: precision {s.Precision:0.00}, recall {s.Recall:0.00} ({s.TruePositives} of {s.PlantedSeveral} planted, {s.FlaggedSeveral} flagged)"));
        err.WriteLine($"  planted senses found with their topic's words: {s.SensesFound} of {s.PlantedSenses}");
    }
}
