using SenseSplit.Cli;
using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.Cli;

public class AuditGlossaryTests
{
    [Fact]
    public void Read_SemicolonBomCrlf_CarriesColumnsAndKeepsFirstDuplicate()
    {
        var warnings = new List<string>();
        var path = AuditFixtures.File("glossary-semicolon-bom-crlf.csv");
        var g = GlossaryReader.Read(path, warnings.Add);
        Assert.Equal(';', g.Delimiter);
        Assert.Equal(["id", "term", "domain", "owner"], g.Columns);
        Assert.Equal(1, g.TermColumn);
        Assert.Equal(["bank", "Bass", "mouse", "morgage", "<script>alert(1)</script>"], g.Entries.Select(e => e.Query.Term));
        Assert.Equal(["2", "Bass", "music", "Li; Wei"], g.Entries[1].Fields);
        Assert.Equal(2, g.Entries[0].Line);
        var dup = Assert.Single(warnings);
        Assert.Contains($"{path}:5", dup);
        Assert.Contains("duplicate term 'BANK' (first on line 2)", dup);
    }

    [Fact]
    public void Read_PlainList_OneTermPerLine()
    {
        var g = GlossaryReader.Read(AuditFixtures.File("glossary-plain.txt"), _ => { });
        Assert.Null(g.Delimiter);
        Assert.Equal(["term"], g.Columns);
        Assert.Equal(["bank", "bass", "mouse", "loan", "rain", "river flood"], g.Entries.Select(e => e.Query.Term));
        Assert.Equal(["river", "flood"], g.Entries[5].Query.Tokens);
        Assert.Equal(7, g.Entries[5].Line);
    }

    [Fact]
    public void Read_Tab_DetectsDelimiter()
    {
        var g = GlossaryReader.Read(AuditFixtures.File("glossary-tab.tsv"), _ => { });
        Assert.Equal('\t', g.Delimiter);
        Assert.Equal(["bank", "see finance"], g.Entries[0].Fields);
    }

    [Theory]
    [InlineData("glossary-no-term.csv", ":1: the header has no 'term' column")]
    [InlineData("glossary-wrong-delimiter.csv", ":2: 1 field(s) where the header has 2 (delimiter ','")]
    [InlineData("glossary-empty.csv", "the glossary is empty")]
    public void Read_BadGlossary_NamesFileLineAndProblem(string name, string expected)
    {
        var path = AuditFixtures.File(name);
        var ex = Assert.Throws<UserFacingException>(() => GlossaryReader.Read(path, _ => { }));
        Assert.Contains(path, ex.Message);
        Assert.Contains(expected, ex.Message);
        Assert.Equal(ExitCodes.BadInput, ex.ExitCode);
    }

    [Fact]
    public void Parse_UnclosedQuote_ReportsMalformedField()
    {
        var ex = Assert.Throws<UserFacingException>(() => GlossaryReader.Parse("term,domain\nba\"nk,finance\n", "g.csv", _ => { }));
        Assert.Contains("g.csv:2: malformed CSV field", ex.Message);
    }

    [Fact]
    public void Parse_HeaderOnlyOrEmptyTerm_ErrorsOrWarns()
    {
        Assert.Throws<UserFacingException>(() => GlossaryReader.Parse("term\n", "g.csv", _ => { }));
        var warnings = new List<string>();
        var g = GlossaryReader.Parse("term,x\n,1\nbank,2\n", "g.csv", warnings.Add);
        Assert.Single(g.Entries);
        Assert.Contains("g.csv:2, column 1: empty term", Assert.Single(warnings));
    }

    [Fact]
    public void Read_MissingFile_ClearError()
    {
        var ex = Assert.Throws<UserFacingException>(() => GlossaryReader.Read("/no/such/glossary.csv", _ => { }));
        Assert.Contains("/no/such/glossary.csv: glossary file not found", ex.Message);
    }
}
