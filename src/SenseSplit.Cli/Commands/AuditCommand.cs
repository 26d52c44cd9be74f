using System.CommandLine;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Commands;

/// <summary>Settings of an audit run that the command line sets.</summary>
public sealed record AuditSettings
{
    public int Examples { get; init; } = 3;
    public int Neighbours { get; init; } = 10;
    public int LabelWords { get; init; } = 10;
    public long LabelMinCount { get; init; } = 10;
}

/// <summary><c>sensesplit audit</c>: split each glossary term into its senses and write reports for people (HTML) and for a search index (CSV, JSON).</summary>
public static class AuditCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("audit", "Split each glossary term into its senses and write reports for people (HTML) and for a search index (CSV, JSON).");
        var model = new Option<string>("--model") { Description = "Model folder written by 'sensesplit atoms'.", Required = true };
        var terms = new Option<string>("--terms") { Description = "Glossary: CSV with a 'term' column (, ; or tab), or one term per line.", Required = true };
        var output = new Option<string>("--out") { Description = "Folder to write atoms.csv, senses.csv, senses.jsonl and report.html to (replaced atomically).", Required = true };
        var corpus = new Option<string[]>("--corpus") { Description = "Text files or folders (searched for *.txt and *.txt.gz; gzip allowed) whose occurrences of the terms give examples, evidence and senses the vectors lost.", AllowMultipleArgumentsPerToken = true };
        var examples = new Option<int>("--examples") { Description = "Example contexts kept per sense (with --corpus).", DefaultValueFactory = _ => 3 };
        var neighbours = new Option<int>("--neighbours") { Description = "Neighbour words listed per sense.", DefaultValueFactory = _ => 10 };
        var vectors = new Option<string?>("--vectors") { Description = "Vectors file the model should have been learned from (checked by SHA-256)." };
        var labelWords = new Option<int>("--label-words") { Description = "Words naming each atom.", DefaultValueFactory = _ => 10 };
        var minCount = new Option<long>("--label-min-count") { Description = "With word counts, rarer words never name an atom or appear as neighbours.", DefaultValueFactory = _ => 10 };
        foreach (var o in new Option[] { model, terms, output, corpus, examples, neighbours, vectors, labelWords, minCount }) command.Options.Add(o);
        command.SetAction(parse =>
        {
            var settings = new AuditSettings
            {
                Examples = parse.GetValue(examples),
                Neighbours = parse.GetValue(neighbours),
                LabelWords = parse.GetValue(labelWords),
                LabelMinCount = parse.GetValue(minCount),
            };
            Validate(settings);
            AuditInputs.CheckOutputFolder(parse.GetValue(output)!, OutputFiles);
            var content = AuditInputs.LoadModel(parse.GetValue(model)!, parse.GetValue(vectors));
            var glossary = GlossaryReader.Read(parse.GetValue(terms)!, context.Warn);
            var files = parse.GetValue(corpus) ?? [];
            var docs = files.Length > 0 ? AuditInputs.ReadCorpus(files, context) : null;
            var report = Execute(content, glossary, docs, settings, context);
            WriteOutputs(report, parse.GetValue(output)!, context);
            return ExitCodes.Ok;
        });
        return command;
    }

    public static void Validate(AuditSettings s)
    {
        if (s.Examples < 0) throw new UserFacingException($"--examples ({s.Examples}) must not be negative", ExitCodes.Usage);
        if (s.Neighbours < 0) throw new UserFacingException($"--neighbours ({s.Neighbours}) must not be negative", ExitCodes.Usage);
        if (s.LabelWords < 1) throw new UserFacingException($"--label-words ({s.LabelWords}) must be at least 1", ExitCodes.Usage);
        if (s.LabelMinCount < 0) throw new UserFacingException($"--label-min-count ({s.LabelMinCount}) must not be negative", ExitCodes.Usage);
    }

    public static SenseOptions Options(AuditSettings s) => new()
    {
        Neighbours = s.Neighbours,
        Naming = new AtomNamingOptions { LabelWords = s.LabelWords, MinCount = s.LabelMinCount },
    };

    /// <summary>The audit itself, on a loaded model: no files read or written.</summary>
    public static AuditReport Execute(ModelContent content, Glossary glossary, IReadOnlyList<CorpusDocument>? corpus, AuditSettings settings, CliContext context)
    {
        Validate(settings);
        context.Err.WriteLine($"naming {content.AtomCount} atoms over {content.Vectors.Count} words");
        var model = AuditInputs.BuildSenseModel(content, Options(settings));
        int generic = model.Catalog.Flags.Count(f => (f & AtomFlags.Generic) != 0);
        int diffuse = model.Catalog.Flags.Count(f => (f & AtomFlags.Diffuse) != 0);
        context.Err.WriteLine($"atoms: {generic} generic (usage above {Fmt.N(model.Catalog.GenericUsageThreshold)} words), {diffuse} diffuse (coherence below {Fmt.N(model.Catalog.DiffuseCoherenceThreshold)})");
        var tokenized = corpus?.Select(d => TokenizedText.From(d.Text, model)).ToArray();
        var progress = new Progress(context);
        var results = SenseAudit.Run(model, glossary.Entries.Select(e => e.Query).ToArray(), tokenized, settings.Examples, progress);
        if (corpus is not null)
        {
            int none = results.Count(r => r.Verdict != Verdict.Unknown && r.Occurrences == 0);
            if (none > 0) context.Warn($"{none} of {results.Count} terms never occur in the corpus ({string.Join(", ", corpus.Select(c => c.Source))}); their senses have no examples");
        }
        foreach (var (r, e) in results.Zip(glossary.Entries))
            if (r.Verdict == Verdict.Unknown)
                context.Warn($"{glossary.Source}:{e.Line}: '{r.Query.Term}' is not in the vocabulary" + (r.CloseSpellings.Count > 0 ? $" (close: {string.Join(", ", r.CloseSpellings)})" : ""));
        var counts = results.GroupBy(r => r.Verdict).ToDictionary(g => g.Key, g => g.Count());
        context.Err.WriteLine($"terms: {counts.GetValueOrDefault(Verdict.Several)} several, {counts.GetValueOrDefault(Verdict.Doubtful)} doubtful, {counts.GetValueOrDefault(Verdict.Single)} single, {counts.GetValueOrDefault(Verdict.Unknown)} unknown");
        return new AuditReport(model, content.Manifest, glossary, results, corpus, settings.Examples);
    }

    /// <summary>The files an audit folder holds; an existing folder with anything else is never replaced.</summary>
    public static readonly string[] OutputFiles = ["atoms.csv", "senses.csv", "senses.jsonl", "report.html"];

    /// <summary>Writes atoms.csv, senses.csv, senses.jsonl and report.html into <paramref name="directory"/>, atomically.</summary>
    public static void WriteOutputs(AuditReport report, string directory, CliContext context)
    {
        AuditInputs.CheckOutputFolder(directory, OutputFiles);
        AuditInputs.WriteFolderAtomically(directory, tmp =>
        {
            using (var w = new StreamWriter(Path.Combine(tmp, "atoms.csv"), false, CsvReports.Utf8NoBom)) CsvReports.WriteAtoms(report, w);
            using (var w = new StreamWriter(Path.Combine(tmp, "senses.csv"), false, CsvReports.Utf8NoBom)) CsvReports.WriteSenses(report, w);
            using (var s = File.Create(Path.Combine(tmp, "senses.jsonl"))) JsonReports.WriteSenses(report, s);
            using (var w = new StreamWriter(Path.Combine(tmp, "report.html"), false, CsvReports.Utf8NoBom)) HtmlReport.Write(report, w);
        });
        context.Err.WriteLine($"wrote {directory}/atoms.csv, senses.csv, senses.jsonl, report.html");
    }

    private sealed class Progress(CliContext context) : IProgress<string>
    {
        public void Report(string value) => context.Err.WriteLine(value);
    }
}
