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
            new("say\"hi\"", "a,b", 40, 20, 2, 3, -0.1), // quoting (RFC 4180 §2): CsvHelper must quote and unquote these
        };
        string path = _dir.File("pairs.csv");
        MergePairsFile.Write(path, pairs, ["bank⊕oboe", "x⊕y"]);
        Assert.StartsWith("w1,w2,f1,f2,r,pseudo\n", File.ReadAllText(path));
        var rows = MergePairsFile.Read(path);
        Assert.Equal(2, rows.Count);
        Assert.Equal(new MergePairsRow(2, "bank", "oboe", 900, 30, "bank⊕oboe"), rows[0]);
        Assert.Equal(new MergePairsRow(3, "say\"hi\"", "a,b", 40, 20, "x⊕y"), rows[1]);
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
    // A quote left open runs to the end of the file (RFC 4180 §2.6: line breaks are allowed inside quotes): the error
    // names the line where the record starts, not where the file ends.
    [InlineData("w1,w2\nbank,oboe\ntree,\"lamp\nx,y\n", "line 3, column 2: 'lamp\\nx,y\\n' contains white space or a line break (a quote left open?)")]
    [InlineData("w1,w2\r\nbank,oboe\r\n\"tr\r\nee\",lamp\r\nx,zz zz\r\n", "line 3, column 1: 'tr\\r\\nee' contains white space or a line break")]
    [InlineData("w1,w2\nbank,oboe\n\n\nx,zz zz\n", "line 5, column 2: 'zz zz' contains white space; a word is a single token")]
    public void Read_BadFile_ErrorNamesFileAndLine(string content, string expected)
    {
        string path = _dir.Write("bad.csv", content);
        var ex = Assert.Throws<UserFacingException>(() => MergePairsFile.Read(path));
        Assert.StartsWith(path, ex.Message);
        Assert.Contains(expected, ex.Message);
        Assert.Equal(ExitCodes.BadInput, ex.ExitCode);
    }

    [Theory]
    [InlineData(2, "x,y\n", 2)]           // one line, ended by its break
    [InlineData(4, "\"a\nb\",c\n", 3)]     // a quoted break inside: CsvHelper reports the record's last line
    [InlineData(4, "\"a\r\nb\",c\r\n", 3)]
    [InlineData(3, "x,\"y\n", 2)]          // unclosed quote at the end of the file swallows the last break
    [InlineData(5, "y,z", 5)]               // last line without a break
    public void StartLine_QuotedBreaks_LineOfFirstCharacter(int endLine, string raw, int expected)
        => Assert.Equal(expected, MergePairsFile.StartLine(endLine, raw));

    [Fact]
    public void Read_MissingFile_SaysNotFound()
    {
        var ex = Assert.Throws<UserFacingException>(() => MergePairsFile.Read(_dir.File("nope.csv")));
        Assert.Contains("not found", ex.Message);
    }
}
