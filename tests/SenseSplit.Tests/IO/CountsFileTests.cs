using SenseSplit.Cli;
using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.IO;

public class CountsFileTests
{
    [Fact]
    public void Read_TabAndSpaceSeparated_LastFieldIsCount()
    {
        using var t = new TempFolder();
        var path = t.Write("c.tsv", "the\t1061396\nof  593677\nnew york\t1200\r\n\nzero 0\n");
        var c = CountsFile.Read(path);
        Assert.Equal(1061396, c["the"]);
        Assert.Equal(593677, c["of"]);
        Assert.Equal(1200, c["new york"]);
        Assert.Equal(0, c["zero"]);
        Assert.Equal(4, c.Count);
    }

    [Theory]
    [InlineData(true, "word\tcount\nthe\t12\nnew_york\t3\n")]
    [InlineData(false, "the\t12\nnew_york\t3\n")]
    public void Write_WithAndWithoutHeader_ExactBytesAndReadBack(bool header, string expected)
    {
        using var t = new TempFolder();
        var path = t.File("c.tsv");
        using (var f = File.Create(path)) CountsFile.Write(f, ["the", "new_york"], [12L, 3L], header);
        Assert.Equal(expected, File.ReadAllText(path));
        var back = CountsFile.Read(path);
        Assert.Equal(2, back.Count);
        Assert.Equal(12, back["the"]);
        Assert.Equal(3, back["new_york"]);
    }

    [Fact]
    public void Read_TabHeaderLine_SkippedAsEmbedWritesIt()
    {
        using var t = new TempFolder();
        var path = t.Write("c.tsv", "word\tcount\nthe\t12\nword\t3\n");
        var c = CountsFile.Read(path);
        Assert.Equal(12, c["the"]);
        Assert.Equal(3, c["word"]);
        Assert.Equal(2, c.Count);
    }

    [Fact]
    public void Read_CsvWithHeader_QuotedFieldsViaCsvHelper()
    {
        using var t = new TempFolder();
        var path = t.Write("c.csv", "count,word\n12,\"a,b\"\n7,\"say \"\"hi\"\"\"\n3,plain\n");
        var c = CountsFile.Read(path);
        Assert.Equal(12, c["a,b"]);
        Assert.Equal(7, c["say \"hi\""]);
        Assert.Equal(3, c["plain"]);
    }

    [Fact]
    public void Read_CsvHeaderWithoutCsvExtension_DetectedByHeader()
    {
        using var t = new TempFolder();
        var c = CountsFile.Read(t.Write("counts.txt", "Word,Count\nx,5\n"));
        Assert.Equal(5, c["x"]);
    }

    [Theory]
    [InlineData("c.tsv", "a\t1\nb\tmany\n", "line 2, column 3", "'many' is not a count")]
    [InlineData("c.tsv", "a\t1\nb\t-4\n", "line 2", "'-4' is not a count")]
    [InlineData("c.tsv", "a\t1\nlonely\n", "line 2", "expected 'word<TAB>count'")]
    [InlineData("c.tsv", "a\t1.5\n", "line 1", "'1.5' is not a count")]
    [InlineData("c.csv", "word,count\na,1\nb,x\n", "line 3", "'x' is not a count")]
    [InlineData("c.csv", "word,freq\na,1\n", "line 1", "must name the columns 'word' and 'count'")]
    [InlineData("c.tsv", "", "", "contains no counts")]
    public void Read_Bad_ErrorNamesFileAndLine(string name, string content, string where, string problem)
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => CountsFile.Read(t.Write(name, content)));
        Assert.Equal(ExitCodes.BadInput, e.ExitCode);
        Assert.Contains(name, e.Message);
        Assert.Contains(where, e.Message);
        Assert.Contains(problem, e.Message);
    }

    [Fact]
    public void Read_InvalidUtf8_ErrorNamesLine()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => CountsFile.Read(t.WriteBytes("c.tsv", [.. "a\t1\nb\t2\n"u8, 0xFE, .. "\t3\n"u8])));
        Assert.Contains("c.tsv: line 3", e.Message);
    }

    [Fact]
    public void Read_RepeatedWord_KeepsFirstAndWarns()
    {
        using var t = new TempFolder();
        var warnings = new List<string>();
        var c = CountsFile.Read(t.Write("c.tsv", "a\t1\nb\t2\na\t3\n"), warnings.Add);
        Assert.Equal(1, c["a"]);
        var w = Assert.Single(warnings);
        Assert.Contains("'a' on line 3", w);
    }

    [Fact]
    public void Align_MissingWords_ZeroAndOneWarningWithHowMany()
    {
        var warnings = new List<string>();
        var counts = new Dictionary<string, long> { ["a"] = 4, ["c"] = 9, ["unused"] = 1 };
        var aligned = CountsFile.Align(["a", "b", "c", "d"], counts, "c.tsv", warnings.Add);
        Assert.Equal([4L, 0L, 9L, 0L], aligned);
        var w = Assert.Single(warnings);
        Assert.Contains("c.tsv: 2 of 4 words have no count", w);
        Assert.Contains("'b'", w);
    }

    [Fact]
    public void Align_AllPresent_NoWarning()
    {
        var warnings = new List<string>();
        CountsFile.Align(["a"], new Dictionary<string, long> { ["a"] = 1 }, "c.tsv", warnings.Add);
        Assert.Empty(warnings);
    }
}
