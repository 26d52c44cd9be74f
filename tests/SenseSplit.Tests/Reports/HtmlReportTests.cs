using System.Text.RegularExpressions;
using SenseSplit.Tests.Cli;

namespace SenseSplit.Tests.Reports;

public class HtmlReportTests
{
    [Fact]
    public void Write_ScriptTerm_RendersEscaped()
    {
        var (dir, _, _) = AuditCommandTests.RunFixtureAudit();
        var html = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.DoesNotContain("<script>alert(1)</script>", html);
        Assert.Contains("&lt;script&gt;alert(1)&lt;/script&gt;", html);
        // Exactly one script element: our own inline one.
        Assert.Single(Regex.Matches(html, "<script", RegexOptions.IgnoreCase));
    }

    [Fact]
    public void Write_SelfContained_NoExternalReferences()
    {
        var (dir, _, _) = AuditCommandTests.RunFixtureAudit();
        var html = File.ReadAllText(Path.Combine(dir, "report.html"));
        Assert.DoesNotMatch(new Regex(@"(src|href)\s*=\s*""(?!#)", RegexOptions.IgnoreCase), html);
        Assert.DoesNotContain("<link", html, StringComparison.OrdinalIgnoreCase);
        Assert.DoesNotContain("@import", html);
        Assert.DoesNotContain("url(", html);
        Assert.DoesNotContain("http://", html);
        Assert.DoesNotContain("https://", html);
    }

    [Fact]
    public void Write_WeightsShown_EqualSensesCsv()
    {
        var (dir, report, _) = AuditCommandTests.RunFixtureAudit();
        var html = File.ReadAllText(Path.Combine(dir, "report.html"));
        var rows = AuditCommandTests.ReadCsv(Path.Combine(dir, "senses.csv"));
        int checkedRows = 0;
        for (int t = 0; t < report.Results.Count; t++)
        {
            foreach (var row in rows.Where(r => r["key"] == report.Results[t].Query.Key && r["sense"] != ""))
            {
                var m = Regex.Match(html, $"data-weight=\"{t}:{row["sense"]}\">([^<]*)<");
                Assert.True(m.Success, $"term {t} sense {row["sense"]}");
                Assert.Equal(row["weight"], m.Groups[1].Value);
                var bar = Regex.Match(html, $"data-bar=\"{t}:{row["sense"]}\">([^<]*)<");
                Assert.Equal(row["weight"], bar.Groups[1].Value);
                checkedRows++;
            }
        }
        Assert.True(checkedRows >= 5);
    }
}
