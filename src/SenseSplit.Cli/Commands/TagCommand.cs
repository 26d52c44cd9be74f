using System.CommandLine;
using System.Globalization;
using System.Text;
using System.Text.Encodings.Web;
using System.Text.Json;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit tag</c>: assign each occurrence of a glossary term in text read from standard input to one of its senses (JSON lines).</summary>
public static class TagCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("tag", "Assign each occurrence of a glossary term in text read from standard input to one of its senses (JSON lines).");
        var model = new Option<string>("--model") { Description = "Model folder written by 'sensesplit atoms'.", Required = true };
        var terms = new Option<string?>("--terms") { Description = "Glossary: CSV with a 'term' column (, ; or tab), or one term per line. Its terms are split afresh (without corpus evidence)." };
        var senses = new Option<string?>("--senses") { Description = "senses.jsonl of an audit of this model: tag with exactly those terms and senses (same ids, including senses found in the audit's corpus). Instead of --terms." };
        var input = new Option<string?>("--input") { Description = "Read the text from this file instead of standard input." };
        var vectors = new Option<string?>("--vectors") { Description = "Vectors file the model should have been learned from (checked by SHA-256)." };
        foreach (var o in new Option[] { model, terms, senses, input, vectors }) command.Options.Add(o);
        command.SetAction(parse =>
        {
            string? termsPath = parse.GetValue(terms), sensesPath = parse.GetValue(senses);
            if ((termsPath is null) == (sensesPath is null))
                throw new UserFacingException("give either --terms (a glossary) or --senses (an audit's senses.jsonl)", ExitCodes.Usage);
            var content = AuditInputs.LoadModel(parse.GetValue(model)!, parse.GetValue(vectors));
            var path = parse.GetValue(input);
            if (path is not null && !File.Exists(path)) throw new UserFacingException($"{path}: input file not found");
            using var reader = path is null ? null : new StreamReader(path, Encoding.UTF8, detectEncodingFromByteOrderMarks: true);
            TextReader text = reader ?? Console.In;
            if (sensesPath is not null) ExecuteWithSenses(content, sensesPath, text, context.Out, context);
            else Execute(content, GlossaryReader.Read(termsPath!, context.Warn), text, context.Out, context);
            return ExitCodes.Ok;
        });
        return command;
    }

    /// <summary>Tags the whole of <paramref name="input"/>: one line per occurrence,
    /// <c>{"term":…,"offset":…,"length":…,"sense":…,"confidence":…}</c>; offset and length in Unicode code points from
    /// the start of the input. Returns the number of occurrences written.</summary>
    public static long Execute(ModelContent content, Glossary glossary, TextReader input, TextWriter output, CliContext context)
    {
        var model = AuditInputs.BuildSenseModel(content, AuditCommand.Options(new AuditSettings { Neighbours = 0 }));
        var queries = glossary.Entries.Select(e => e.Query).ToArray();
        var results = model.Analyze(queries);
        foreach (var (r, e) in results.Zip(glossary.Entries))
            if (r.Verdict == Verdict.Unknown) context.Warn($"{glossary.Source}:{e.Line}: '{r.Query.Term}' is not in the vocabulary; its occurrences are not tagged");
        var tagger = new Tagger(model, results);
        string text = input.ReadToEnd();
        if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
        long n = tagger.Tag(text, output);
        context.Err.WriteLine($"tagged {n} occurrences of {results.Count(r => r.Verdict != Verdict.Unknown)} terms");
        return n;
    }

    /// <summary>Tags <paramref name="input"/> with the terms and senses of an audit's senses.jsonl.</summary>
    public static long ExecuteWithSenses(ModelContent content, string sensesPath, TextReader input, TextWriter output, CliContext context)
    {
        var model = AuditInputs.BuildSenseModel(content, AuditCommand.Options(new AuditSettings { Neighbours = 0 }));
        var results = AuditSensesFile.Read(sensesPath, model).Where(r => r.Senses.Count > 0).ToArray();
        var tagger = new Tagger(model, results);
        string text = input.ReadToEnd();
        if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
        long n = tagger.Tag(text, output);
        context.Err.WriteLine($"tagged {n} occurrences of {results.Length} terms from {sensesPath}");
        return n;
    }

    /// <summary>Finds and assigns occurrences; the term names are JSON-encoded once.</summary>
    public sealed class Tagger
    {
        private readonly SenseModel _model;
        private readonly IReadOnlyList<TermSenses> _results;
        private readonly string[] _jsonTerms;
        private readonly IReadOnlyList<float[]>[] _vectors;
        private readonly TermFinder _finder;
        private readonly SenseTagger _tagger;

        public Tagger(SenseModel model, IReadOnlyList<TermSenses> results)
        {
            _model = model;
            _results = results;
            var encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping;
            _jsonTerms = results.Select(r => JsonSerializer.Serialize(r.Query.Term, new JsonSerializerOptions { Encoder = encoder })).ToArray();
            _vectors = results.Select(r => (IReadOnlyList<float[]>)r.Senses.Select(s => s.Vector).ToArray()).ToArray();
            _finder = new TermFinder(results.Select(r => r.Query).ToArray());
            _tagger = new SenseTagger(model);
        }

        public long Tag(string text, TextWriter output)
        {
            var doc = TokenizedText.From(text, _model);
            var context = new float[_model.Dimensions];
            var line = new StringBuilder(128);
            long n = 0;
            foreach (var m in _finder.Find(doc.Tokens))
            {
                var r = _results[m.Term];
                if (r.Senses.Count == 0) continue;
                int used = _tagger.Context(doc.Rows, m.Start, m.End, context);
                var (index, confidence) = used == 0 ? (0, 1.0 / r.Senses.Count) : _tagger.Assign(context, _vectors[m.Term]);
                var first = doc.Tokens[m.Start];
                var last = doc.Tokens[m.End - 1];
                int length = CodePoints(text, first.CharIndex, last.CharIndex + last.CharLength);
                line.Clear();
                line.Append("{\"term\":").Append(_jsonTerms[m.Term])
                    .Append(",\"offset\":").Append(first.Offset.ToString(CultureInfo.InvariantCulture))
                    .Append(",\"length\":").Append(length.ToString(CultureInfo.InvariantCulture))
                    .Append(",\"sense\":").Append(r.Senses[index].Id.ToString(CultureInfo.InvariantCulture))
                    .Append(",\"confidence\":").Append(Math.Round(confidence, 4).ToString("0.####", CultureInfo.InvariantCulture))
                    .Append('}');
                output.Write(line);
                output.Write('\n');
                n++;
            }
            return n;
        }

        private static int CodePoints(string s, int from, int to)
        {
            int n = 0;
            for (int i = from; i < to; i++) if (!char.IsLowSurrogate(s[i])) n++;
            return n;
        }
    }
}
