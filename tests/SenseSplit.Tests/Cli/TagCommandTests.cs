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
}
