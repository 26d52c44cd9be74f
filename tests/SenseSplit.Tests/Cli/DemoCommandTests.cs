using System.Text.Json;
using SenseSplit.Cli;
using SenseSplit.Tests.IO;

namespace SenseSplit.Tests.Cli;

public class DemoCommandTests
{
    /// <summary>The whole job on a small demo corpus. The bars come from the full-size run recorded in docs/demo.md
    /// (3 M tokens: precision 1.00, recall 0.77, 40 of 43 planted senses found) and a 400 k-token run (precision 1.00,
    /// recall 0.62, 37 of 43): the test asks for at most one false alarm in five flags, more than half of the planted
    /// several-sense terms, and 80% of the planted senses.</summary>
    [Fact]
    public void Demo_SmallCorpus_ScorecardReachesBar()
    {
        using var t = new TempFolder();
        string outDir = Path.Combine(t.Path, "demo");
        var (code, stdout, stderr) = CliRunner.Run("demo", "--out", outDir, "--tokens", "400000");
        Assert.True(code == ExitCodes.Ok, stderr);
        Assert.Contains("scorecard.json", stdout);
        using var doc = JsonDocument.Parse(File.ReadAllText(Path.Combine(outDir, "scorecard.json")));
        var root = doc.RootElement;
        double precision = root.GetProperty("precision").GetDouble();
        double recall = root.GetProperty("recall").GetDouble();
        int found = root.GetProperty("senses_found").GetInt32();
        int planted = root.GetProperty("planted_senses").GetInt32();
        Assert.True(precision >= 0.8, $"precision {precision}");
        Assert.True(recall >= 7.0 / 13, $"recall {recall}");
        Assert.True(found >= planted * 0.8, $"{found} of {planted} planted senses found");
        Assert.True(File.Exists(Path.Combine(outDir, "audit", "report.html")));
        Assert.True(File.Exists(Path.Combine(outDir, "truth.json")));
        Assert.Contains(root.GetProperty("merge_test_verdict").GetString(), new[] { "pass", "fail" });
        Assert.True(File.Exists(Path.Combine(outDir, "merge-test", "merge-test.json")));
    }
}
