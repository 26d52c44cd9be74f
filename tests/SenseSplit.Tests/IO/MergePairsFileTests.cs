using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.IO;

public class MergePairsFileTests : IDisposable
{
    private readonly TempFolder _dir = new();
    public void Dispose() => _dir.Dispose();

    [Fact]
    public void Write_ThenRead_RoundTripsWordsCountsAndPseudoWords()
    {
        var pairs = new List<MergePair>
        {
            new("bank", "oboe", 900, 30, 0, 1, 0.05),
            new("say \"hi\"", "a,b", 40, 20, 2, 3, -0.1), // quoting: CsvHelper must quote and unquote these
        };
        string path = _dir.File("pairs.csv");
        MergePairsFile.Write(path, pairs, ["bank⊕oboe", "x⊕y"]);
        Assert.StartsWith("w1,w2,f1,f2,r,pseudo\n", File.ReadAllText(path));
        var rows = MergePairsFile.Read(path);
        Assert.Equal(2, rows.Count);
        Assert.Equal(new MergePairsRow(2, "bank", "oboe", 900, 30, "bank⊕oboe"), rows[0]);
        Assert.Equal(new MergePairsRow(3, "say \"hi\"", "a,b", 40, 20, "x⊕y"), rows[1]);
    }

    [Fact]
    public void Read_OnlyWordColumnsExtraColumnsBomAndBlankLines_Accepted()
    {
        string path = _dir.Write("p.csv", "\uFEFFnote,W2,W1\r\nx,oboe,bank\r\n\r\ny,lamp,tree\r\n");
        var rows = MergePairsFile.Read(path);
        Assert.Equal([("bank", "oboe"), ("tree", "lamp")], rows.Select(r => (r.First, r.Second)));
        Assert.All(rows, r => Assert.Null(r.Pseudo));
        Assert.All(rows, r => Assert.Null(r.FirstCount));
    }

    [Theory]
    [InlineData("a,b\nx,y\n", "line 1: the header must name the columns 'w1' and 'w2'")]
    [InlineData("w1,w2\n", "has a header but no pairs")]
    [InlineData("", "is empty")]
    [InlineData("w1,w2,f1\nx,y,12\nz,,3\n", "line 3, column 2: the word is empty")]
    [InlineData("w1,w2,f1\nx,y,-4\n", "line 2, column 3: '-4' is not a count")]
    [InlineData("w1,w2,f1\nx\n", "line 2: has 1 fields, expected at least 2")]
    public void Read_BadFile_ErrorNamesFileAndLine(string content, string expected)
    {
        string path = _dir.Write("bad.csv", content);
        var ex = Assert.Throws<UserFacingException>(() => MergePairsFile.Read(path));
        Assert.StartsWith(path, ex.Message);
        Assert.Contains(expected, ex.Message);
        Assert.Equal(ExitCodes.BadInput, ex.ExitCode);
    }

    [Fact]
    public void Read_MissingFile_SaysNotFound()
    {
        var ex = Assert.Throws<UserFacingException>(() => MergePairsFile.Read(_dir.File("nope.csv")));
        Assert.Contains("not found", ex.Message);
    }
}
