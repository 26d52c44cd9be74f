using System.Text.Json;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Tests.Senses;

namespace SenseSplit.Tests.Cli;

public class TagCommandTests
{
    [Fact]
    public void Execute_Text_OneJsonLinePerOccurrenceWithCodePointOffsets()
    {
        var (context, _, err) = AuditFixtures.Context();
        var glossary = Glossary.FromTerms(["bank", "bass", "zzzunknown"]);
        // An emoji (two UTF-16 units, one code point) before the first occurrence checks the offset unit.
        string text = "\U0001F3E6 " + SenseTaggerTests.FinanceText + "\n" + SenseTaggerTests.RiverText + "\nA bass guitar, drum and melody filled the song.";
        var output = new StringWriter();
        long n = TagCommand.Execute(AuditCommandTests.Model.Value, glossary, new StringReader(text), output, context);
        var lines = output.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(3, n);
        Assert.Equal(3, lines.Length);
        var codePoints = text.EnumerateRunes().Select(r => r.ToString()).ToArray();
        var model = SenseSplit.Cli.Reports.AuditInputs.BuildSenseModel(AuditCommandTests.Model.Value, new SenseSplit.Core.Senses.SenseOptions());
        var bank = model.Analyze(SenseSplit.Core.Senses.TermQuery.From("bank"));
        string[] topicNames = NamedModel.DefaultTopics.Keys.ToArray();
        var expectedTopics = new[] { "finance", "river" };
        for (int i = 0; i < lines.Length; i++)
        {
            using var doc = JsonDocument.Parse(lines[i]);
            var root = doc.RootElement;
            string term = root.GetProperty("term").GetString()!;
            int offset = root.GetProperty("offset").GetInt32(), length = root.GetProperty("length").GetInt32();
            Assert.Equal(term, string.Concat(codePoints.Skip(offset).Take(length)).ToLowerInvariant());
            Assert.InRange(root.GetProperty("confidence").GetDouble(), 0, 1);
            if (i < 2)
            {
                int sense = root.GetProperty("sense").GetInt32();
                var s = bank.Senses.Single(x => x.Id == sense);
                Assert.Equal(expectedTopics[i], topicNames[NamedModel.TopicOf(s.Atoms[0], topicNames.Length)]);
            }
        }
        Assert.Contains("'zzzunknown' is not in the vocabulary", err.ToString());
    }

    [Fact]
    public void Execute_NoOccurrences_WritesNothing()
    {
        var (context, _, _) = AuditFixtures.Context();
        var output = new StringWriter();
        long n = TagCommand.Execute(AuditCommandTests.Model.Value, Glossary.FromTerms(["bank"]), new StringReader("nothing to see here"), output, context);
        Assert.Equal(0, n);
        Assert.Equal("", output.ToString());
    }

    [Fact]
    public void ExecuteWithSenses_AuditSensesFile_SameIdsAsTheAudit()
    {
        // The audit of the fixture glossary with the small corpus writes senses.jsonl; tagging with it must give each
        // bank occurrence the id of the audit's sense of the matching topic.
        var (dir, report, _) = AuditCommandTests.RunFixtureAudit();
        var (context, _, err) = AuditFixtures.Context();
        string text = SenseTaggerTests.FinanceText + "\n" + SenseTaggerTests.RiverText;
        var output = new StringWriter();
        long n = TagCommand.ExecuteWithSenses(AuditCommandTests.Model.Value, Path.Combine(dir, "senses.jsonl"), new StringReader(text), output, context);
        Assert.Equal(2, n);
        Assert.Contains("from " + Path.Combine(dir, "senses.jsonl"), err.ToString());
        var bank = report.Results.Single(r => r.Query.Key == "bank");
        string[] topicNames = NamedModel.DefaultTopics.Keys.ToArray();
        var lines = output.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        foreach (var (line, topic) in lines.Zip(new[] { "finance", "river" }))
        {
            using var doc = JsonDocument.Parse(line);
            int id = doc.RootElement.GetProperty("sense").GetInt32();
            var sense = bank.Senses.Single(s => s.Id == id);
            Assert.Equal(topic, topicNames[NamedModel.TopicOf(sense.Atoms[0], topicNames.Length)]);
        }
    }

    [Theory]
    [InlineData("not json", "2: not a JSON object")]
    [InlineData("{\"term\":\"bank\",\"verdict\":\"single\",\"senses\":[{\"id\":1,\"atom\":[99999],\"atom_weights\":[1]}]}", "2: sense 1 of 'bank' names atom 99999")]
    [InlineData("{\"term\":\"bank\",\"verdict\":\"maybe\",\"senses\":[]}", "2: unknown verdict \"maybe\"")]
    [InlineData("{\"term\":\"bank\",\"verdict\":\"single\",\"senses\":[{\"id\":1,\"atom\":[1,2],\"atom_weights\":[1]}]}", "2: sense 1 of 'bank' needs \"atom\" and \"atom_weights\"")]
    public void ExecuteWithSenses_BadLine_NamesFileAndLine(string badLine, string expected)
    {
        string path = Path.Combine(AuditFixtures.TempDir(), "senses.jsonl");
        File.WriteAllText(path, "{\"term\":\"bass\",\"verdict\":\"single\",\"senses\":[{\"id\":1,\"atom\":[0],\"atom_weights\":[0.5]}]}\n" + badLine + "\n");
        var (context, _, _) = AuditFixtures.Context();
        var e = Assert.Throws<SenseSplit.Cli.UserFacingException>(() =>
            TagCommand.ExecuteWithSenses(AuditCommandTests.Model.Value, path, new StringReader("bank"), new StringWriter(), context));
        Assert.Contains(path + ":" + expected, e.Message);
        Assert.Equal(SenseSplit.Cli.ExitCodes.BadInput, e.ExitCode);
    }

    [Fact]
    public void Tag_BothTermsAndSenses_IsAUsageError()
    {
        var (code, _, stderr) = CliRunner.Run("tag", "--model", "m", "--terms", "a.csv", "--senses", "s.jsonl");
        Assert.Equal(SenseSplit.Cli.ExitCodes.Usage, code);
        Assert.Contains("either --terms", stderr);
        (code, _, stderr) = CliRunner.Run("tag", "--model", "m");
        Assert.Equal(SenseSplit.Cli.ExitCodes.Usage, code);
    }
}
