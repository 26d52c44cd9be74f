using System.Globalization;
using System.Text.Json;
using System.Xml.Linq;
using CsvHelper;
using SenseSplit.Cli;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public sealed class MergeTestReportTests : IDisposable
{
    private readonly string _dir = Path.Combine(Path.GetTempPath(), "sensesplit-mergetest-" + Guid.NewGuid().ToString("N"));

    public void Dispose()
    {
        if (Directory.Exists(_dir)) Directory.Delete(_dir, recursive: true);
    }

    // 60 pairs from the logarithmic model with c = 0.4 (β/α < 0 beyond r = 316, so some pairs are non-positive),
    // plus one degenerate pair, analysed end to end.
    internal static MergeTestOutcome Outcome()
    {
        var data = MergeTestData.LinearModel(seed: 9, pairs: 60, dims: 50, noise: 0.01, maxRatio: 1000, r => 1 - 0.4 * Math.Log10(r));
        var fits = MergeTestData.Fits(data);
        fits.Add(new PairFit(new MergePair("same", "copy", 400, 20, 500, 501, 1), MixtureFit.Fit([1, 2, 3], [1, 2, 3], [2, 4, 6])));
        var selection = new PairSelectionSettings { Pairs = 61 };
        return MergeTestAnalysis.Analyse(fits, selection, new WeightLawSettings { Resamples = 200 }, notes: ["made for a test"]);
    }

    [Fact]
    public void Write_AllFiles_ParseBack()
    {
        var outcome = Outcome();
        MergeTestReport.Write(_dir, outcome, new Dictionary<string, object?> { ["method"] = "fold-in", ["dims"] = 50 });
        Assert.Equal(
            new[] { MergeTestReport.SummaryFile, MergeTestReport.ChartFile, MergeTestReport.PairsFile }.Order(),
            Directory.GetFiles(_dir).Select(Path.GetFileName).Order()); // no temporary files left behind
    }

    [Fact]
    public void WritePairs_CsvParsesWithCsvHelper_ValuesRoundTrip()
    {
        var outcome = Outcome();
        string path = Path.Combine(_dir, "p.csv");
        Directory.CreateDirectory(_dir);
        MergeTestReport.WritePairs(path, outcome.Pairs);
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, CultureInfo.InvariantCulture);
        csv.Read();
        csv.ReadHeader();
        Assert.Equal(MergeTestReport.PairColumns, csv.HeaderRecord);
        int row = 0;
        while (csv.Read())
        {
            var p = outcome.Pairs[row++];
            Assert.Equal(p.Pair.FrequentWord, csv.GetField("w1"));
            Assert.Equal(p.Pair.RareWord, csv.GetField("w2"));
            Assert.Equal(p.Pair.FrequentCount, long.Parse(csv.GetField("f1")!, CultureInfo.InvariantCulture));
            Assert.Equal(p.Pair.Ratio, double.Parse(csv.GetField("r")!, CultureInfo.InvariantCulture));
            if (p.Fit.IsDegenerate) Assert.Equal("", csv.GetField("alpha"));
            else Assert.Equal(p.Fit.Beta, double.Parse(csv.GetField("beta")!, CultureInfo.InvariantCulture));
            Assert.Equal(p.Fit.CosineToSpan, double.Parse(csv.GetField("cosine_to_span")!, CultureInfo.InvariantCulture));
        }
        Assert.Equal(outcome.Pairs.Count, row);
    }

    [Fact]
    public void WriteSummary_JsonHasRequiredFieldsAndRoundTrips()
    {
        var outcome = Outcome();
        Directory.CreateDirectory(_dir);
        string path = Path.Combine(_dir, "s.json");
        MergeTestReport.WriteSummary(path, outcome, new Dictionary<string, object?> { ["method"] = "fold-in" });
        using var doc = JsonDocument.Parse(File.ReadAllText(path));
        var root = doc.RootElement;
        Assert.Equal(outcome.Verdict.Label, root.GetProperty("verdict").GetString());
        Assert.Equal(outcome.Laws.MedianCosineToSpan, root.GetProperty("median_cosine_to_span").GetDouble(), 12);
        Assert.Equal(WeightLaws.Name(outcome.Laws.BetterLaw!.Value), root.GetProperty("better_law").GetString());
        Assert.Equal(outcome.Laws.C.Estimate, root.GetProperty("c").GetProperty("estimate").GetDouble(), 12);
        Assert.Equal(outcome.Laws.C.Lower, root.GetProperty("c").GetProperty("lower").GetDouble(), 12);
        Assert.Equal(outcome.Laws.Gamma.Upper, root.GetProperty("gamma").GetProperty("upper").GetDouble(), 12);
        Assert.Equal(8, root.GetProperty("bins").GetArrayLength());
        var bin = root.GetProperty("bins")[0].GetProperty("error");
        foreach (var law in new[] { "proportional", "logarithmic", "power" }) Assert.True(bin.TryGetProperty(law, out _));
        Assert.Equal("fold-in", root.GetProperty("parameters").GetProperty("run").GetProperty("method").GetString());
        Assert.Equal(0.9, root.GetProperty("parameters").GetProperty("min_median_cosine").GetDouble());
        Assert.Equal(1, root.GetProperty("pairs_without_weights").GetInt32());
        Assert.Contains("made for a test", root.GetProperty("notes").EnumerateArray().Select(e => e.GetString()));

        var back = MergeTestReport.ReadSummary(path);
        Assert.Equal(outcome.Laws.PowerExcluded, back.PowerExcludedPairs);
        Assert.Equal(outcome.Laws.Bins[3].Pairs, back.Bins[3].Pairs);
    }

    [Fact]
    public void ReadSummary_Malformed_NamesFileAndLine()
    {
        Directory.CreateDirectory(_dir);
        string path = Path.Combine(_dir, "bad.json");
        File.WriteAllText(path, "{\n  \"verdict\": \"pass\",\n  \"pairs_used\": oops\n}");
        var ex = Assert.Throws<UserFacingException>(() => MergeTestReport.ReadSummary(path));
        Assert.Contains("bad.json: line 3", ex.Message);
    }

    [Fact]
    public void WriteAtomically_FailingWriter_LeavesNoFileAndKeepsOldOne()
    {
        Directory.CreateDirectory(_dir);
        string path = Path.Combine(_dir, "x.txt");
        File.WriteAllText(path, "old");
        Assert.Throws<InvalidOperationException>(() => MergeTestReport.WriteAtomically(path, _ => throw new InvalidOperationException("boom")));
        Assert.Equal("old", File.ReadAllText(path));
        Assert.Single(Directory.GetFiles(_dir));
    }

    [Fact]
    public void Render_SvgIsWellFormedWithOneDotPerPositivePair()
    {
        var outcome = Outcome();
        string markup = MergeTestChart.Render(outcome);
        var doc = XDocument.Parse(markup); // throws when not well-formed XML
        XNamespace svg = "http://www.w3.org/2000/svg";
        Assert.Equal(svg + "svg", doc.Root!.Name);
        int positive = outcome.Pairs.Count(p => p.HasWeightRatio && p.WeightRatio > 0);
        int nonPositive = outcome.Pairs.Count(p => p.HasWeightRatio && !(p.WeightRatio > 0));
        Assert.True(nonPositive > 0); // c = 0.4 puts pairs beyond r ≈ 316 at β/α < 0
        // One dot per positive pair plus the legend's sample dot.
        Assert.Equal(positive + 1, doc.Descendants(svg + "circle").Count());
        Assert.Equal(nonPositive, doc.Descendants(svg + "line").Count(l => l.Element(svg + "title")?.Value.Contains("not on log axis") == true));
        var text = string.Join("\n", doc.Descendants(svg + "text").Select(t => t.Value));
        Assert.Contains("frequency ratio r = f1/f2 (log scale)", text);
        Assert.Contains("β/α", text);
        Assert.Contains("logarithmic: 1 − ", text);
        Assert.Contains("power: ", text);
        Assert.Contains("proportional: 1/r", text);
        Assert.Contains("median of a ratio bin", text);
        Assert.True(doc.Descendants(svg + "polyline").Count() >= 4); // 3/r, 1/r, logarithmic, power
        Assert.DoesNotContain("<style", markup);
        Assert.DoesNotContain("<?xml", markup); // inline-ready unless standalone
        Assert.StartsWith("<?xml", MergeTestChart.Render(outcome, standalone: true));
    }

    [Fact]
    public void Render_NoUsablePairs_StillWellFormed()
    {
        var outcome = MergeTestAnalysis.Analyse([], new PairSelectionSettings(), new WeightLawSettings { Resamples = 10 });
        var doc = XDocument.Parse(MergeTestChart.Render(outcome));
        Assert.Contains("not fitted", string.Join(" ", doc.Descendants().Select(e => e.Value)));
        Assert.Equal("fail", outcome.Verdict.Label);
    }
}
