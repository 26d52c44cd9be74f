using System.Globalization;
using System.Text;
using System.Text.Json;
using CsvHelper;
using SenseSplit.Core.Demo;

namespace SenseSplit.Cli.Demo;

/// <summary>Writes the demo corpus, its glossary and the planted truth, each atomically (temporary file, then rename).</summary>
public static class DemoFiles
{
    public static void WriteCorpus(string path, DiscourseCorpusGenerator generator, long tokens, Action<long>? progress = null)
    {
        WriteAtomically(path, writer =>
        {
            long written = 0, lastReport = 0;
            foreach (var line in generator.Lines())
            {
                writer.Write(line);
                writer.Write('\n');
                if (line.Length > 0) written += 1 + line.Count(c => c == ' ');
                if (written - lastReport >= 250_000) { progress?.Invoke(written); lastReport = written; }
            }
            progress?.Invoke(written);
        });
    }

    public static void WriteGlossary(string path, DemoScenario scenario)
    {
        WriteAtomically(path, writer =>
        {
            using var csv = new CsvWriter(writer, CultureInfo.InvariantCulture, leaveOpen: true);
            csv.WriteField("term"); csv.WriteField("owner"); csv.NextRecord();
            foreach (var g in scenario.Glossary) { csv.WriteField(g.Term); csv.WriteField(g.Owner); csv.NextRecord(); }
        });
    }

    public static void WriteTruth(string path, DemoScenario scenario, DiscourseCorpusGenerator generator, DiscourseSettings settings)
    {
        var counts = generator.PlantedCounts();
        var truth = new
        {
            scenario = scenario.Name,
            settings.Seed,
            settings.Tokens,
            terms = scenario.Terms.Select(t => new
            {
                term = t.Term,
                polysemous = t.IsPolysemous,
                senses = t.Senses.Select(s => new
                {
                    topic = s.Topic,
                    share = s.Share,
                    occurrences = counts.First(c => c.Term == t.Term && c.Topic == s.Topic).Occurrences,
                }),
            }),
            topics = scenario.Topics.Select((t, i) => new { id = t.Id, domain = t.Domain, words = generator.TopicWords(i).Take(20) }),
        };
        WriteAtomically(path, writer => writer.Write(JsonSerializer.Serialize(truth, new JsonSerializerOptions { WriteIndented = true })));
    }

    public static void WriteAtomically(string path, Action<TextWriter> write)
    {
        string full = Path.GetFullPath(path);
        Directory.CreateDirectory(Path.GetDirectoryName(full)!);
        string temp = full + ".tmp-" + Environment.ProcessId.ToString(CultureInfo.InvariantCulture);
        try
        {
            using (var writer = new StreamWriter(temp, false, new UTF8Encoding(false), 1 << 16))
                write(writer);
            File.Move(temp, full, overwrite: true);
        }
        catch
        {
            if (File.Exists(temp)) File.Delete(temp);
            throw;
        }
    }
}
