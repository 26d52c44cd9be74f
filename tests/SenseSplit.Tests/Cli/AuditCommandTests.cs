using System.Globalization;
using System.Text.Json;
using CsvHelper;
using SenseSplit.Cli;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Tests.Senses;

namespace SenseSplit.Tests.Cli;

public class AuditCommandTests
{
    internal static readonly Lazy<ModelContent> Model = new(() => NamedModel.Build());

    /// <summary>Runs the audit of the BOM/CRLF glossary with the small corpus and writes the outputs to a new folder.</summary>
    internal static (string dir, AuditReport report, string errors) RunFixtureAudit()
    {
        var (context, _, err) = AuditFixtures.Context();
        var glossary = GlossaryReader.Read(AuditFixtures.File("glossary-semicolon-bom-crlf.csv"), context.Warn);
        var corpus = AuditInputs.ReadCorpus([AuditFixtures.File("corpus-bank.txt")], context);
        var report = AuditCommand.Execute(Model.Value, glossary, corpus, new AuditSettings { Examples = 2 }, context);
        var dir = Path.Combine(AuditFixtures.TempDir(), "out");
        AuditCommand.WriteOutputs(report, dir, context);
        return (dir, report, err.ToString());
    }

    internal static List<Dictionary<string, string>> ReadCsv(string path)
    {
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, CultureInfo.InvariantCulture);
        csv.Read();
        csv.ReadHeader();
        var header = csv.HeaderRecord!;
        var rows = new List<Dictionary<string, string>>();
        while (csv.Read()) rows.Add(header.Select((h, i) => (h, v: csv.GetField(i) ?? "")).ToDictionary(x => x.h, x => x.v));
        return rows;
    }

    [Fact]
    public void Execute_FixtureGlossary_WritesAllOutputsConsistently()
    {
        var (dir, report, errors) = RunFixtureAudit();
        Assert.Equal(["atoms.csv", "report.html", "senses.csv", "senses.jsonl"], Directory.GetFiles(dir).Select(Path.GetFileName).Order());
        Assert.Contains("duplicate term 'BANK'", errors);
        Assert.Contains("'morgage' is not in the vocabulary (close: mortgage", errors);

        var rows = ReadCsv(Path.Combine(dir, "senses.csv"));
        // All glossary columns first, unchanged, then ours.
        Assert.Equal(["id", "term", "domain", "owner", "key", "verdict"], rows[0].Keys.Take(6));
        var bank = rows.Where(r => r["term"] == "bank").ToArray();
        Assert.Equal(2, bank.Length);
        Assert.All(bank, r => Assert.Equal("several", r["verdict"]));
        Assert.Equal(["1", "2"], bank.Select(r => r["sense"]));
        Assert.Equal("Li; Wei", rows.First(r => r["term"] == "Bass")["owner"]);
        var unknown = Assert.Single(rows, r => r["term"] == "morgage");
        Assert.Equal("unknown", unknown["verdict"]);
        Assert.Equal("", unknown["sense"]);
        Assert.Contains("mortgage", unknown["notes"]);
        // Corpus: bank occurs 3 times (2 finance, 1 river), the examples come from those sentences.
        Assert.Equal(3, bank.Sum(r => int.Parse(r["occurrences"], CultureInfo.InvariantCulture)));
        Assert.Contains(rows, r => r["term"] == "mouse" && r["notes"].Contains("no occurrence in the corpus"));

        var lines = File.ReadAllLines(Path.Combine(dir, "senses.jsonl"));
        Assert.Equal(report.Results.Count, lines.Length);
        foreach (var line in lines)
        {
            using var doc = JsonDocument.Parse(line);
            var root = doc.RootElement;
            var verdict = root.GetProperty("verdict").GetString();
            Assert.Contains(verdict, new[] { "single", "several", "doubtful", "unknown" });
            var senses = root.GetProperty("senses");
            if (verdict == "unknown") Assert.Equal(0, senses.GetArrayLength());
            if (verdict == "single") Assert.Equal(1, senses.GetArrayLength());
            foreach (var s in senses.EnumerateArray())
            {
                Assert.True(s.GetProperty("atom").GetArrayLength() >= 1);
                foreach (var p in new[] { "weight", "label", "neighbours", "cues", "examples" }) Assert.True(s.TryGetProperty(p, out _), p);
            }
            // The glossary row rides along.
            Assert.Equal(root.GetProperty("term").GetString(), root.GetProperty("glossary").GetProperty("term").GetString());
        }
        using var bankJson = JsonDocument.Parse(lines.First(l => l.Contains("\"term\":\"bank\"")));
        var ex = bankJson.RootElement.GetProperty("senses").EnumerateArray().SelectMany(s => s.GetProperty("examples").EnumerateArray()).ToArray();
        Assert.Equal(3, ex.Length);
        Assert.All(ex, e => Assert.EndsWith("corpus-bank.txt", e.GetProperty("source").GetString()));
        Assert.Contains(ex, e => e.GetProperty("line").GetInt32() == 2 && e.GetProperty("text").GetString()!.Contains("river"));

        var atoms = ReadCsv(Path.Combine(dir, "atoms.csv"));
        Assert.Equal(Model.Value.AtomCount, atoms.Count);
        Assert.Equal(CsvReports.AtomColumns, atoms[0].Keys);
        Assert.Contains("generic", atoms[^1]["flags"]); // the named model's last atom is its generic one
    }

    [Fact]
    public void WriteOutputs_ExistingFolder_ReplacedWithoutLeftovers()
    {
        var (dir, report, _) = RunFixtureAudit();
        File.WriteAllText(Path.Combine(dir, "senses.csv"), "old");
        File.Delete(Path.Combine(dir, "report.html"));
        var (context, _, _) = AuditFixtures.Context();
        AuditCommand.WriteOutputs(report, dir, context);
        Assert.NotEqual("old", File.ReadAllText(Path.Combine(dir, "senses.csv")));
        Assert.True(File.Exists(Path.Combine(dir, "report.html")));
        Assert.DoesNotContain(Directory.GetDirectories(Path.GetDirectoryName(dir)!), d => Path.GetFileName(d).StartsWith('.'));
    }

    [Fact]
    public void OwnColumns_CollidingGlossaryColumn_Prefixed()
    {
        var own = CsvReports.OwnColumns(["term", "Verdict", "notes"]);
        Assert.Contains("audit_verdict", own);
        Assert.Contains("audit_notes", own);
        Assert.Contains("sense", own);
    }

    [Fact]
    public void CheckVectors_OtherFile_ClearError()
    {
        var dir = AuditFixtures.TempDir();
        var vec = Path.Combine(dir, "other.vec");
        File.WriteAllText(vec, "2 2\na 1 0\nb 0 1\n");
        var manifest = new ModelManifest { VectorsFile = "train.vec", VectorsSha256 = new string('a', 64) };
        var ex = Assert.Throws<UserFacingException>(() => AuditInputs.CheckVectors(manifest, "model-dir", vec));
        Assert.Contains(vec, ex.Message);
        Assert.Contains("is not the one the model in model-dir was learned from (train.vec", ex.Message);
        // The same file's own hash passes.
        var sha = Convert.ToHexString(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(vec)));
        AuditInputs.CheckVectors(manifest with { VectorsSha256 = sha.ToLowerInvariant() }, "model-dir", vec);
    }

    [Fact]
    public void Run_MissingModelFolder_BadInputNamingIt()
    {
        var dir = AuditFixtures.TempDir();
        var err = new StringWriter();
        int code = CliApp.Run(["audit", "--model", Path.Combine(dir, "nope"), "--terms", AuditFixtures.File("glossary-plain.txt"), "--out", Path.Combine(dir, "o")], new StringWriter(), err);
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("nope: model folder not found", err.ToString());
    }

    [Fact]
    public void Run_NegativeExamples_UsageError()
    {
        var err = new StringWriter();
        int code = CliApp.Run(["audit", "--model", "m", "--terms", "t", "--out", "o", "--examples", "-1"], new StringWriter(), err);
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--examples (-1) must not be negative", err.ToString());
    }

    [Fact]
    public void ReadCorpus_MissingFile_ClearError()
    {
        var (context, _, _) = AuditFixtures.Context();
        var ex = Assert.Throws<UserFacingException>(() => AuditInputs.ReadCorpus(["/no/corpus.txt"], context));
        Assert.Contains("/no/corpus.txt: corpus file or folder not found", ex.Message);
    }

    [Fact]
    public void Senses_OneTerm_TextAndJson()
    {
        var (context, output, _) = AuditFixtures.Context();
        Assert.Equal(ExitCodes.Ok, SensesCommand.Execute(Model.Value, "bank", false, new AuditSettings(), context));
        var text = output.ToString();
        Assert.StartsWith("bank: several, 2 sense(s)", text);
        Assert.Contains("sense 2", text);
        var (jc, jo, _) = AuditFixtures.Context();
        SensesCommand.Execute(Model.Value, "bank", true, new AuditSettings(), jc);
        using var doc = JsonDocument.Parse(jo.ToString());
        Assert.Equal("several", doc.RootElement.GetProperty("verdict").GetString());
        Assert.Equal(2, doc.RootElement.GetProperty("senses").GetArrayLength());
    }

    [Fact]
    public void Senses_UnknownTerm_ShowsCloseSpellings()
    {
        var (context, output, _) = AuditFixtures.Context();
        SensesCommand.Execute(Model.Value, "guitr", false, new AuditSettings(), context);
        Assert.Contains("guitr: unknown", output.ToString());
        Assert.Contains("close spellings: guitar", output.ToString());
    }

    [Fact]
    public void Run_ModelFolder_EndToEnd()
    {
        var dir = AuditFixtures.TempDir();
        ModelFolder.Write(Path.Combine(dir, "model"), Model.Value);
        var err = new StringWriter();
        int code = CliApp.Run(["audit", "--model", Path.Combine(dir, "model"), "--terms", AuditFixtures.File("glossary-plain.txt"), "--out", Path.Combine(dir, "o")], new StringWriter(), err);
        Assert.Equal(ExitCodes.Ok, code);
        Assert.True(File.Exists(Path.Combine(dir, "o", "report.html")));
    }

    [Fact]
    public void Run_SensesAndTagWithModelFolder_EndToEnd()
    {
        var dir = AuditFixtures.TempDir();
        var modelDir = Path.Combine(dir, "model");
        ModelFolder.Write(modelDir, Model.Value);
        var output = new StringWriter();
        var err = new StringWriter();
        Assert.Equal(ExitCodes.Ok, CliApp.Run(["senses", "--model", modelDir, "bass", "--json"], output, err));
        using (var doc = JsonDocument.Parse(output.ToString()))
            Assert.Equal("several", doc.RootElement.GetProperty("verdict").GetString());
        var input = Path.Combine(dir, "text.txt");
        File.WriteAllText(input, "A bass guitar, drum and melody filled the song.\nThe angler caught a bass with bait near the trout.\n");
        output = new StringWriter();
        Assert.Equal(ExitCodes.Ok, CliApp.Run(["tag", "--model", modelDir, "--terms", AuditFixtures.File("glossary-plain.txt"), "--input", input], output, err));
        var lines = output.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal(2, lines.Length);
        var senses = lines.Select(l => { using var d = JsonDocument.Parse(l); return d.RootElement.GetProperty("sense").GetInt32(); }).ToArray();
        Assert.NotEqual(senses[0], senses[1]); // music bass and fish bass go to different senses
    }

    [Fact]
    public void Run_AuditWithOtherVectorsFile_BadInput()
    {
        var dir = AuditFixtures.TempDir();
        var modelDir = Path.Combine(dir, "model");
        ModelFolder.Write(modelDir, Model.Value with { Manifest = Model.Value.Manifest with { VectorsSha256 = new string('0', 64) } });
        var vec = Path.Combine(dir, "other.vec");
        File.WriteAllText(vec, "1 2\na 1 0\n");
        var err = new StringWriter();
        int code = CliApp.Run(["audit", "--model", modelDir, "--terms", AuditFixtures.File("glossary-plain.txt"), "--out", Path.Combine(dir, "o"), "--vectors", vec], new StringWriter(), err);
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("is not the one the model in", err.ToString());
        Assert.False(Directory.Exists(Path.Combine(dir, "o")));
    }
}

public class AuditOutputFolderTests
{
    [Fact]
    public void WriteOutputs_FolderWithOtherFiles_RefusedAndKept()
    {
        var (context, _, _) = AuditFixtures.Context();
        string dir = Path.Combine(AuditFixtures.TempDir(), "mine");
        Directory.CreateDirectory(dir);
        File.WriteAllText(Path.Combine(dir, "readme.txt"), "keep me");
        var glossary = SenseSplit.Cli.IO.Glossary.FromTerms(["bank"]);
        var report = AuditCommand.Execute(AuditCommandTests.Model.Value, glossary, null, new AuditSettings(), context);
        var e = Assert.Throws<UserFacingException>(() => AuditCommand.WriteOutputs(report, dir, context));
        Assert.Contains("holds other files (readme.txt)", e.Message);
        Assert.Equal(ExitCodes.WriteFailed, e.ExitCode);
        Assert.Equal("keep me", File.ReadAllText(Path.Combine(dir, "readme.txt")));
        // An earlier audit folder is replaced.
        string again = Path.Combine(AuditFixtures.TempDir(), "audit");
        AuditCommand.WriteOutputs(report, again, context);
        AuditCommand.WriteOutputs(report, again, context);
        Assert.Equal(AuditCommand.OutputFiles.Order(StringComparer.Ordinal), Directory.GetFiles(again).Select(Path.GetFileName).Order(StringComparer.Ordinal));
    }
}

public class AuditCorpusInputTests
{
    [Fact]
    public void ReadCorpus_FolderWithTextAndGzip_ReadsBothInPathOrder()
    {
        var (context, _, _) = AuditFixtures.Context();
        string dir = Path.Combine(AuditFixtures.TempDir(), "corpus");
        Directory.CreateDirectory(Path.Combine(dir, "sub"));
        File.WriteAllText(Path.Combine(dir, "a.txt"), "\uFEFFthe bank loan");
        using (var f = File.Create(Path.Combine(dir, "sub", "b.txt.gz")))
        using (var gz = new System.IO.Compression.GZipStream(f, System.IO.Compression.CompressionLevel.Fastest))
            gz.Write("the river bank"u8);
        File.WriteAllText(Path.Combine(dir, "skip.csv"), "not a corpus file");
        var docs = AuditInputs.ReadCorpus([dir], context);
        Assert.Equal(["the bank loan", "the river bank"], docs.Select(d => d.Text));
        Assert.EndsWith("b.txt.gz", docs[1].Source);
    }

    [Fact]
    public void ReadCorpus_MissingOrStdin_ClearErrors()
    {
        var (context, _, _) = AuditFixtures.Context();
        var e = Assert.Throws<UserFacingException>(() => AuditInputs.ReadCorpus(["/nonexistent/corpus.txt"], context));
        Assert.Contains("/nonexistent/corpus.txt", e.Message);
        Assert.Equal(ExitCodes.BadInput, e.ExitCode);
        e = Assert.Throws<UserFacingException>(() => AuditInputs.ReadCorpus(["-"], context));
        Assert.Equal(ExitCodes.Usage, e.ExitCode);
    }
}
