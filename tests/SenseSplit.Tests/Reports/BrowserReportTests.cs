using System.Diagnostics;
using System.Text.RegularExpressions;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Tests.Cli;
using SenseSplit.Tests.Senses;

namespace SenseSplit.Tests.Reports;

/// <summary>Opens report.html in headless Chromium (Debian package, installed by scripts/install-test-deps.sh).</summary>
public class BrowserReportTests
{
    private static string Chromium()
    {
        foreach (var candidate in new[] { "/usr/bin/chromium", "/usr/bin/chromium-browser" })
            if (File.Exists(candidate)) return candidate;
        throw new InvalidOperationException("chromium not found: run scripts/install-test-deps.sh (installs Debian's chromium)");
    }

    /// <summary>Runs Chromium with a fresh profile; kills it (whole tree) after 60 s.</summary>
    private static (string stdout, string stderr) Run(params string[] extra)
    {
        var profile = AuditFixtures.TempDir();
        var psi = new ProcessStartInfo(Chromium()) { RedirectStandardOutput = true, RedirectStandardError = true, UseShellExecute = false };
        foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
                     "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage", $"--user-data-dir={profile}" }.Concat(extra))
            psi.ArgumentList.Add(a);
        using var p = Process.Start(psi)!;
        var outTask = p.StandardOutput.ReadToEndAsync();
        var errTask = p.StandardError.ReadToEndAsync();
        if (!p.WaitForExit(60_000))
        {
            p.Kill(entireProcessTree: true);
            throw new TimeoutException("chromium did not finish within 60 s");
        }
        p.WaitForExit();
        try { Directory.Delete(profile, true); } catch (IOException) { }
        return (outTask.Result, errTask.Result);
    }

    [Fact]
    public void Report_InChromium_ScriptRunsWithoutErrorsAndNumbersMatchCsv()
    {
        var (context, _, _) = AuditFixtures.Context();
        var terms = NamedModel.DefaultTopics.Values.SelectMany(v => v.Take(4)).Distinct().Concat(["morgage", "<script>alert(1)</script>", "river flood"]).ToArray();
        var content = NamedModel.Build();
        var glossary = Glossary.FromTerms(terms);
        var corpus = AuditInputs.ReadCorpus([AuditFixtures.File("corpus-bank.txt")], context);
        var report = AuditCommand.Execute(content, glossary, corpus, new AuditSettings { Examples = 2 }, context);
        var outDir = Path.Combine(AppContext.BaseDirectory, "browser-test");
        var reportDir = Path.Combine(outDir, "report");
        AuditCommand.WriteOutputs(report, reportDir, context);
        var html = Path.Combine(reportDir, "report.html");
        var url = new Uri(html).AbsoluteUri;

        var (dom, log) = Run("--enable-logging=stderr", "--v=0", "--dump-dom", url);
        Assert.DoesNotContain("Uncaught", log);
        Assert.DoesNotMatch(new Regex(@"CONSOLE.*(Error|error)"), log);
        // The script ran: it marks the body and fills the count of shown terms.
        Assert.Contains("data-ready=\"yes\"", dom);
        var shown = Regex.Match(dom, "<span id=\"shown\"[^>]*>([^<]*)</span>");
        Assert.Equal($"{report.Results.Count} of {report.Results.Count} terms shown", shown.Groups[1].Value);
        Assert.Contains("&lt;script&gt;alert(1)&lt;/script&gt;", dom);
        Assert.Contains("composed</span>", dom); // "river flood" is composed from its words

        // Numbers rendered equal senses.csv: sense weights and the counts per verdict.
        var rows = AuditCommandTests.ReadCsv(Path.Combine(reportDir, "senses.csv"));
        foreach (var verdict in new[] { "several", "doubtful", "single", "unknown" })
        {
            int expected = rows.Where(r => r["verdict"] == verdict).Select(r => r["key"]).Distinct().Count();
            var m = Regex.Match(dom, $"data-count=\"{verdict}\">(\\d+)<");
            Assert.Equal(expected.ToString(System.Globalization.CultureInfo.InvariantCulture), m.Groups[1].Value);
        }
        for (int t = 0; t < report.Results.Count; t++)
            foreach (var row in rows.Where(r => r["key"] == report.Results[t].Query.Key && r["sense"] != ""))
                Assert.Equal(row["weight"], Regex.Match(dom, $"data-weight=\"{t}:{row["sense"]}\">([^<]*)<").Groups[1].Value);

        var png = Path.Combine(outDir, "overview.png");
        if (File.Exists(png)) File.Delete(png);
        Run($"--screenshot={png}", "--window-size=1280,900", "--hide-scrollbars", url);
        Assert.True(File.Exists(png), "no screenshot written");
        var bytes = File.ReadAllBytes(png);
        Assert.True(bytes.Length > 10_000 && bytes[0] == 0x89 && bytes[1] == (byte)'P', "not a PNG");
    }
}
