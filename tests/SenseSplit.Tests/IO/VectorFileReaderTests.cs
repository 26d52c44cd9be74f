using System.IO.Compression;
using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.IO;

public class VectorFileReaderTests
{
    [Fact]
    public void Read_TextWithHeader_ParsesWordsAndNumbers()
    {
        using var t = new TempFolder();
        var path = t.File("v.txt", "3 2\nharbour 0.5 -1.25\ncrane 1e-3 2\nfern 3 4\n");
        var (v, notes) = VectorFileReader.Read(path);
        Assert.Equal(["harbour", "crane", "fern"], v.Words);
        Assert.Equal(2, v.Dimensions);
        Assert.Equal([0.5f, -1.25f, 1e-3f, 2f, 3f, 4f], v.Values);
        Assert.Equal(0, notes.ZeroRowsSkipped);
    }

    [Fact]
    public void Read_NoHeaderCrlfTabsAndBom_Parses()
    {
        using var t = new TempFolder();
        var path = t.File("v.txt");
        File.WriteAllBytes(path, [0xEF, 0xBB, 0xBF, .. Encoding.UTF8.GetBytes("été\t1 2 3\r\nnaïve 4\t5 6 \r\n")]);
        var (v, _) = VectorFileReader.Read(path);
        Assert.Equal(["été", "naïve"], v.Words);
        Assert.Equal(3, v.Dimensions);
        Assert.Equal(6f, v.Values[5]);
    }

    [Fact]
    public void Read_Gzip_SameAsPlain()
    {
        using var t = new TempFolder();
        var path = t.File("v.txt.gz");
        using (var gz = new GZipStream(File.Create(path), CompressionLevel.Fastest))
            gz.Write(Encoding.UTF8.GetBytes("2 3\na 1 2 3\nb 4 5 6\n"));
        var (v, _) = VectorFileReader.Read(path);
        Assert.Equal(["a", "b"], v.Words);
        Assert.Equal([1f, 2, 3, 4, 5, 6], v.Values);
    }

    [Fact]
    public void Read_ZeroAndDuplicateRows_SkippedWithNotes()
    {
        using var t = new TempFolder();
        var path = t.File("v.txt", "a 1 2\nz 0 0\na 3 4\nb 5 6\n");
        var (v, notes) = VectorFileReader.Read(path);
        Assert.Equal(["a", "b"], v.Words);
        Assert.Equal([1f, 2, 5, 6], v.Values);
        Assert.Equal(1, notes.ZeroRowsSkipped);
        Assert.Equal(1, notes.DuplicatesSkipped);
        Assert.Contains(notes.Messages, m => m.Contains("v.txt:2") && m.Contains("zero"));
        Assert.Contains(notes.Messages, m => m.Contains("v.txt:3") && m.Contains("first row is kept"));
    }

    [Theory]
    [InlineData("a 1 2\nb 1 2 3\n", ":2:", "more than 2 numbers")]
    [InlineData("a 1 2 3\nb 1 2\n", ":2:", "2 numbers where 3 were expected")]
    [InlineData("a 1 x2\n", ":1:5", "'x2' is not a number")]
    [InlineData("a 1 NaN\n", ":1:5", "not a finite number")]
    [InlineData("a 1 inf\n", ":1:5", "not a finite number")]
    [InlineData("3 2\na 1 2\nb 3 4\n", "header says 3", "holds 2")]
    [InlineData("2 3\na 1 2\n", ":2:", "2 numbers where 3 were expected")]
    [InlineData("", "", "no vectors")]
    [InlineData("lonely\n", ":1:1", "no numbers")]
    public void Read_BadText_ErrorNamesFileLineAndProblem(string content, string where, string problem)
    {
        using var t = new TempFolder();
        var path = t.File("bad.txt", content);
        var ex = Assert.Throws<UserFacingException>(() => VectorFileReader.Read(path));
        Assert.Contains("bad.txt", ex.Message);
        Assert.Contains(where, ex.Message);
        Assert.Contains(problem, ex.Message);
        Assert.Equal(ExitCodes.BadInput, ex.ExitCode);
    }

    [Fact]
    public void Read_InvalidUtf8Word_ErrorNamesLine()
    {
        using var t = new TempFolder();
        var path = t.File("bad.txt");
        File.WriteAllBytes(path, [.. Encoding.UTF8.GetBytes("ok 1 2\n"), 0xC3, 0x28, .. Encoding.UTF8.GetBytes(" 1 2\n")]);
        var ex = Assert.Throws<UserFacingException>(() => VectorFileReader.Read(path));
        Assert.Contains("bad.txt:2:1", ex.Message);
        Assert.Contains("UTF-8", ex.Message);
    }

    [Fact]
    public void Read_MissingFile_Error()
    {
        var ex = Assert.Throws<UserFacingException>(() => VectorFileReader.Read("/no/such/vectors.txt"));
        Assert.Contains("/no/such/vectors.txt", ex.Message);
    }

    [Fact]
    public void Read_NpyWithWords_RoundTripsAndChecksWordCount()
    {
        using var t = new TempFolder();
        var npy = t.File("v.npy");
        NpyFile.Write(npy, new float[] { 1, 2, 3, 4, 5, 6 }, 3, 2);
        var (v, _) = VectorFileReader.Read(npy, t.File("w.txt", "x\ny\nz\n"));
        Assert.Equal(["x", "y", "z"], v.Words);
        Assert.Equal([1f, 2, 3, 4, 5, 6], v.Values);
        var ex = Assert.Throws<UserFacingException>(() => VectorFileReader.Read(npy, t.File("w2.txt", "x\ny\n")));
        Assert.Contains("2 words", ex.Message);
        Assert.Throws<UserFacingException>(() => VectorFileReader.Read(npy));
    }

    [Fact]
    public void Npy_Float64Header_ParsedPerFormatSpec()
    {
        // Header layout from NumPy's .npy format specification (version 1.0): magic, version, little-endian header length,
        // a Python dict literal padded to a multiple of 64 bytes. Written by hand here to check we read a foreign writer's file.
        using var t = new TempFolder();
        var path = t.File("f8.npy");
        string dict = "{'descr': '<f8', 'fortran_order': False, 'shape': (2, 2), }";
        int pad = 64 - (10 + dict.Length + 1) % 64;
        var header = Encoding.ASCII.GetBytes(dict + new string(' ', pad) + "\n");
        using (var fs = File.Create(path))
        {
            fs.Write([0x93, (byte)'N', (byte)'U', (byte)'M', (byte)'P', (byte)'Y', 1, 0, (byte)header.Length, 0]);
            fs.Write(header);
            foreach (var d in new[] { 1.5, -2.0, 3.25, 4.0 }) fs.Write(BitConverter.GetBytes(d));
        }
        var (data, rows, cols) = NpyFile.ReadFloat32Matrix(path);
        Assert.Equal((2, 2), (rows, cols));
        Assert.Equal([1.5f, -2f, 3.25f, 4f], data);
    }
}
