using System.Globalization;
using System.IO.Compression;
using System.Security.Cryptography;
using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.IO;

public class VectorFileTests
{
    private static (VectorLoad Load, List<string> Warnings) Read(string path, string? words = null)
    {
        var warnings = new List<string>();
        var load = VectorFile.Read(path, words, warnings.Add);
        return (load, warnings);
    }

    private static float P(string s) => float.Parse(s, CultureInfo.InvariantCulture);

    [Fact]
    public void Read_GloveStyleFixture_WordsAndValuesAsWritten()
    {
        var (load, warnings) = Read(TempFolder.Fixture("glove-style.txt"));
        Assert.Empty(warnings);
        Assert.Equal(["the", ",", "of"], load.Vectors.Words);
        Assert.Equal(3, load.Vectors.Dimensions);
        Assert.Equal([P("0.418"), P("0.24968"), P("-0.41242")], load.Vectors.Row(0).ToArray());
        Assert.Equal([P("0.70853"), P("0.57088"), P("-0.4716")], load.Vectors.Row(2).ToArray());
        Assert.Equal("text", load.Format);
        Assert.Equal(3, load.RowsInFile);
    }

    [Fact]
    public void Read_Word2VecStyleWithHeader_Utf8WordsAndNumberForms()
    {
        var (load, _) = Read(TempFolder.Fixture("w2v-style.txt"));
        Assert.Equal(["café", "naïve", "東京", "</s>"], load.Vectors.Words);
        Assert.Equal([0.5f, -1.25f, 3f, 0.2f, 0.125f, -8f, -0.75f, 4.5f, 0.25f, 1f, -2f, 100f], load.Vectors.Values);
    }

    [Fact]
    public void Read_GzipFixture_SameVectorsAsPlainAndHashOfCompressedBytes()
    {
        string gz = TempFolder.Fixture("w2v-style.txt.gz");
        var (plain, _) = Read(TempFolder.Fixture("w2v-style.txt"));
        var (packed, _) = Read(gz);
        Assert.Equal("text+gzip", packed.Format);
        Assert.Equal(plain.Vectors.Words, packed.Vectors.Words);
        Assert.Equal(plain.Vectors.Values, packed.Vectors.Values);
        // The recorded hash is of the file as stored (System.Security.Cryptography SHA-256 over the whole file).
        Assert.Equal(Convert.ToHexStringLower(SHA256.HashData(File.ReadAllBytes(gz))), packed.Sha256);
        Assert.NotEqual(plain.Sha256, packed.Sha256);
    }

    [Fact]
    public void Read_NumpyFloat32WithWords_ValuesOfTheNumpyArray()
    {
        var (load, _) = Read(TempFolder.Fixture("numpy-f32.npy"), TempFolder.Fixture("numpy-f32.words.txt"));
        Assert.Equal("npy", load.Format);
        Assert.Equal(["alpha", "beta", "gamma"], load.Vectors.Words);
        Assert.Equal(4, load.Vectors.Dimensions);
        // The array numpy.save wrote (tests/TestData/io/README.md).
        Assert.Equal([0.5f, -1.25f, 3f, 0f, 2f, 0.125f, -8f, 1f, -0.75f, 4.5f, 0.25f, -2f], load.Vectors.Values);
    }

    [Fact]
    public void Read_NumpyFloat64_ConvertedLikeNumpyAstypeFloat32()
    {
        var (load, _) = Read(TempFolder.Fixture("numpy-f64.npy"), TempFolder.Fixture("numpy-f64.words.txt"));
        // NumPy 1.24.2: np.array([[0.1,-0.2,0.3],[1e-3,2.5,-7.0]]).astype('<f4').tolist() (README of the fixtures).
        double[] numpy = [0.10000000149011612, -0.20000000298023224, 0.30000001192092896, 0.0010000000474974513, 2.5, -7.0];
        Assert.Equal(numpy, load.Vectors.Values.Select(v => (double)v).ToArray());
    }

    [Fact]
    public void Read_NumpyVersion2Header_SameAsVersion1()
    {
        var (v1, _) = Read(TempFolder.Fixture("numpy-f32.npy"), TempFolder.Fixture("numpy-f32.words.txt"));
        var (v2, _) = Read(TempFolder.Fixture("numpy-v2.npy"), TempFolder.Fixture("numpy-f32.words.txt"));
        Assert.Equal(v1.Vectors.Values, v2.Vectors.Values);
    }

    [Fact]
    public void Read_GzippedNpy_Recognised()
    {
        using var t = new TempFolder();
        var path = t.File("v.npy.gz");
        using (var gz = new GZipStream(File.Create(path), CompressionLevel.Fastest))
            gz.Write(File.ReadAllBytes(TempFolder.Fixture("numpy-f32.npy")));
        var (load, _) = Read(path, TempFolder.Fixture("numpy-f32.words.txt"));
        Assert.Equal("npy+gzip", load.Format);
        Assert.Equal(12, load.Vectors.Values.Length);
    }

    [Fact]
    public void Read_NpyWithoutWordsFile_UsageErrorNamingOption()
    {
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture("numpy-f32.npy")));
        Assert.Equal(ExitCodes.Usage, e.ExitCode);
        Assert.Contains("--words", e.Message);
        Assert.Contains("numpy-f32.npy", e.Message);
    }

    [Fact]
    public void Read_TextWithWordsFile_UsageError()
    {
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture("glove-style.txt"), TempFolder.Fixture("numpy-f32.words.txt")));
        Assert.Equal(ExitCodes.Usage, e.ExitCode);
        Assert.Contains("--words", e.Message);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void WriteText_ThenRead_ExactRoundTrip(bool header)
    {
        using var t = new TempFolder();
        var original = RandomVectors(257, 37, seed: 3);
        var path = t.File("out.txt");
        VectorFile.WriteText(path, original, header);
        var (load, _) = Read(path);
        Assert.Equal(original.Words, load.Vectors.Words);
        Assert.Equal(original.Values, load.Vectors.Values); // shortest round-trip formatting: bit-exact
        Assert.Equal(header, File.ReadLines(path).First() == "257 37");
        Assert.Equal(["out.txt"], t.Entries()); // no temporary file left behind
    }

    [Fact]
    public void WriteText_NegativeZero_WrittenAsZero()
    {
        using var t = new TempFolder();
        var path = t.File("z.txt");
        VectorFile.WriteText(path, new SenseSplit.Core.Vectors.WordVectors(["a"], [-0f, 1.5f, -2f], 3));
        Assert.Equal("1 3\na 0 1.5 -2\n", File.ReadAllText(path));
    }

    [Fact]
    public void WriteNpy_ThenRead_ExactRoundTrip()
    {
        using var t = new TempFolder();
        var original = RandomVectors(100, 300, seed: 4);
        VectorFile.WriteNpy(t.File("v.npy"), original.Values, original.Count, original.Dimensions);
        File.WriteAllLines(t.File("w.txt"), original.Words);
        var (load, _) = Read(t.File("v.npy"), t.File("w.txt"));
        Assert.Equal(original.Values, load.Vectors.Values);
        Assert.Equal(original.Words, load.Vectors.Words);
    }

    [Fact]
    public void Read_ManyRowsAcrossBufferBoundariesFromGzip_ExactRoundTrip()
    {
        // ~3 MB of text: lines straddle the reader's 1 MiB buffer, and without a header the gzip size guess must grow.
        using var t = new TempFolder();
        var original = RandomVectors(6000, 50, seed: 5);
        var text = t.File("v.txt");
        VectorFile.WriteText(text, original, header: false);
        var gz = t.File("v.txt.gz");
        using (var outStream = new GZipStream(File.Create(gz), CompressionLevel.SmallestSize))
            outStream.Write(File.ReadAllBytes(text));
        var (load, _) = Read(gz);
        Assert.Equal(original.Values, load.Vectors.Values);
        Assert.Equal(6000, load.Vectors.Count);
    }

    [Fact]
    public void Read_LineLongerThanBuffer_Parsed()
    {
        using var t = new TempFolder();
        const int Dims = 600_000; // 1.2 MB per line: longer than the reader's 1 MiB buffer
        var sb = new StringBuilder("wide");
        for (int i = 0; i < Dims; i++) sb.Append(' ').Append((i % 7).ToString(CultureInfo.InvariantCulture));
        sb.Append('\n').Append("next");
        for (int i = 0; i < Dims; i++) sb.Append(" 1");
        var (load, _) = Read(t.Write("wide.txt", sb.Append('\n').ToString()));
        Assert.Equal(Dims, load.Vectors.Dimensions);
        foreach (int i in new[] { 0, 1, 6, 7, 523_456, Dims - 1 }) Assert.Equal(i % 7, load.Vectors.Row(0)[i]);
        Assert.Equal(1f, load.Vectors.Row(1)[Dims - 1]);
    }

    [Theory]
    [InlineData("a 1\nb 2\n", 2)]
    [InlineData("a 1\nb 2", 2)]
    [InlineData("a 1\n\nb 2\n", 3)]
    [InlineData("", 0)]
    public void CountLines_TerminatedOrNot(string content, long expected)
    {
        using var t = new TempFolder();
        Assert.Equal(expected, VectorFile.CountLines(t.Write("c.txt", content), CancellationToken.None));
    }

    [Fact]
    public void Read_CrLfBomTabsAndBlankLines_Accepted()
    {
        using var t = new TempFolder();
        var bytes = Encoding.UTF8.GetPreamble().Concat(Encoding.UTF8.GetBytes("2 3\r\n\r\na\t1\t2 3\r\n  b 4  5\t6  \r\n\r\n")).ToArray();
        var (load, _) = Read(t.WriteBytes("crlf.txt", bytes));
        Assert.Equal(["a", "b"], load.Vectors.Words);
        Assert.Equal([1f, 2f, 3f, 4f, 5f, 6f], load.Vectors.Values);
    }

    [Fact]
    public void Read_ZeroVectors_SkippedWithOneWarning()
    {
        using var t = new TempFolder();
        var path = t.Write("z.txt", "a 1 0\nnil 0 0\nb 0 2\nnone -0 0\n");
        var (load, warnings) = Read(path);
        Assert.Equal(["a", "b"], load.Vectors.Words);
        Assert.Equal([1f, 0f, 0f, 2f], load.Vectors.Values);
        Assert.Equal(2, load.ZeroRowsSkipped);
        Assert.Equal(4, load.RowsInFile);
        var w = Assert.Single(warnings);
        Assert.Contains("z.txt", w);
        Assert.Contains("2 zero vectors", w);
        Assert.Contains("'nil' on line 2", w);
    }

    [Fact]
    public void Read_RepeatedWords_KeepFirstWithOneWarning()
    {
        using var t = new TempFolder();
        var path = t.Write("d.txt", "a 1 2\nb 3 4\na 5 6\nb 7 8\nc 9 9\n");
        var (load, warnings) = Read(path);
        Assert.Equal(["a", "b", "c"], load.Vectors.Words);
        Assert.Equal([1f, 2f, 3f, 4f, 9f, 9f], load.Vectors.Values);
        Assert.Equal(2, load.DuplicateRowsSkipped);
        var w = Assert.Single(warnings);
        Assert.Contains("2 repeated words", w);
        Assert.Contains("'a' on line 3, first seen on line 1", w);
    }

    [Fact]
    public void Read_NpyZeroAndRepeatedRows_SkippedWithRowNumbers()
    {
        using var t = new TempFolder();
        float[] values = [1, 2, 0, 0, 3, 4, 5, 6];
        VectorFile.WriteNpy(t.File("v.npy"), values, 4, 2);
        File.WriteAllText(t.File("w.txt"), "a\nb\nc\na\n");
        var (load, warnings) = Read(t.File("v.npy"), t.File("w.txt"));
        Assert.Equal(["a", "c"], load.Vectors.Words);
        Assert.Equal([1f, 2f, 3f, 4f], load.Vectors.Values);
        Assert.Equal(2, warnings.Count);
        Assert.Contains(warnings, w => w.Contains("'b' on row 1"));
        Assert.Contains(warnings, w => w.Contains("'a' on row 3, first seen on row 0"));
    }

    [Fact]
    public void Read_AllRowsZero_Error()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => Read(t.Write("zeros.txt", "a 0 0\nb 0 0\n")));
        Assert.Contains("zeros.txt", e.Message);
        Assert.Contains("nothing is left", e.Message);
    }

    public static TheoryData<string, string, string[]> BadText => new()
    {
        { "ragged-short", "a 1 2 3\nb 1 2\n", ["line 2", "has 2 numbers, expected 3", "first vector"] },
        { "ragged-long", "a 1 2\nb 1 2 3\n", ["line 2, column 7", "has 3 numbers, expected 2"] },
        { "not-number", "a 1 2\nb 1 x2\n", ["line 2, column 5", "'x2' (number 2) is not a number"] },
        { "comma-decimal", "a 1 2\nb 1,5 2\n", ["line 2, column 3", "'1,5'"] },
        { "nan", "a 1 2\nb NaN 2\n", ["line 2, column 3", "'NaN' (number 1) is not a finite float"] },
        { "infinity", "a 1 -Infinity\n", ["line 1, column 5", "'-Infinity'", "not a finite float"] },
        { "overflow", "a 1 2\nb 1 1e39\n", ["line 2, column 5", "'1e39'", "not a finite float"] },
        { "header-more-rows", "1 2\na 1 2\nb 1 2\n", ["line 3", "more rows than the 1 the header on line 1 announces"] },
        { "header-fewer-rows", "3 2\na 1 2\nb 1 2\n", ["header on line 1 announces 3 rows but the file has 2"] },
        { "header-dimension", "2 3\na 1 2 3\nb 1 2\n", ["line 3", "has 2 numbers, expected 3 (the dimension in the header on line 1)"] },
        { "header-dimension-wider", "2 2\na 1 2 3\n", ["line 2, column 7", "has 3 numbers, expected 2 (the dimension in the header"] },
        { "header-zero-dimension", "2 0\na 1\n", ["line 1", "positive dimension"] },
        { "empty", "", ["contains no vectors"] },
        { "blank", "\n  \n\t\n", ["contains no vectors"] },
        { "header-only", "5 3\n", ["has a header but no vectors"] },
        { "word-only", "lonely\n", ["line 1", "'lonely' has no numbers"] },
        { "word-only-later", "a 1 2\nlonely\n", ["line 2", "has 0 numbers, expected 2"] },
    };

    [Theory]
    [MemberData(nameof(BadText))]
    public void Read_BadText_ErrorNamesFileLineAndProblem(string name, string content, string[] fragments)
    {
        using var t = new TempFolder();
        var path = t.Write(name + ".txt", content);
        var e = Assert.Throws<UserFacingException>(() => Read(path));
        Assert.Equal(ExitCodes.BadInput, e.ExitCode);
        Assert.Contains(name + ".txt", e.Message);
        foreach (var f in fragments) Assert.Contains(f, e.Message);
    }

    [Fact]
    public void Read_InvalidUtf8Word_ErrorNamesLineAndColumn()
    {
        using var t = new TempFolder();
        byte[] bytes = [.. "ok 1 2\n"u8, 0xC3, 0x28, (byte)'x', .. " 1 2\n"u8];
        var e = Assert.Throws<UserFacingException>(() => Read(t.WriteBytes("bad-utf8.txt", bytes)));
        Assert.Contains("bad-utf8.txt: line 2, column 1", e.Message);
        Assert.Contains("not valid UTF-8", e.Message);
    }

    [Fact]
    public void Read_ColumnCountsCharactersNotBytes()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => Read(t.Write("col.txt", "東京 1 oops\n")));
        Assert.Contains("line 1, column 6", e.Message); // 東, 京, space, 1, space: the token starts at character 6
    }

    [Fact]
    public void Read_MissingFile_ErrorNamesFile()
    {
        var e = Assert.Throws<UserFacingException>(() => Read("/nonexistent/folder/vectors.txt"));
        Assert.Equal(ExitCodes.BadInput, e.ExitCode);
        Assert.Contains("/nonexistent/folder/vectors.txt", e.Message);
        Assert.Contains("not found", e.Message);
    }

    [Fact]
    public void Read_Folder_ErrorSaysFolder()
    {
        using var t = new TempFolder();
        var e = Assert.Throws<UserFacingException>(() => Read(t.Path));
        Assert.Contains("is a folder", e.Message);
    }

    [Fact]
    public void Read_DamagedGzip_Error()
    {
        using var t = new TempFolder();
        var good = File.ReadAllBytes(TempFolder.Fixture("w2v-style.txt.gz"));
        var bad = good.ToArray();
        for (int i = 12; i < bad.Length - 8; i++) bad[i] ^= 0x5A;
        var e = Assert.Throws<UserFacingException>(() => Read(t.WriteBytes("broken.txt.gz", bad)));
        Assert.Contains("broken.txt.gz", e.Message);
    }

    public static TheoryData<string, string> BadNpy => new()
    {
        { "numpy-fortran.npy", "Fortran" },
        { "numpy-bigendian.npy", "big-endian" },
        { "numpy-1d.npy", "has shape (3); expected a 2-D array" },
        { "numpy-i4.npy", "holds integers" },
    };

    [Theory]
    [MemberData(nameof(BadNpy))]
    public void Read_UnsupportedNpyFixtures_ErrorNamesFileAndReason(string fixture, string fragment)
    {
        using var t = new TempFolder();
        File.WriteAllText(t.File("w.txt"), "a\nb\nc\n");
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture(fixture), t.File("w.txt")));
        Assert.Contains(fixture, e.Message);
        Assert.Contains(fragment, e.Message);
    }

    [Fact]
    public void Read_TruncatedNpy_ErrorNamesRow()
    {
        using var t = new TempFolder();
        var bytes = File.ReadAllBytes(TempFolder.Fixture("numpy-f32.npy"));
        var path = t.WriteBytes("cut.npy", bytes[..^20]); // loses the last 5 floats: row 1 is incomplete
        File.WriteAllText(t.File("w.txt"), "a\nb\nc\n");
        var e = Assert.Throws<UserFacingException>(() => Read(path, t.File("w.txt")));
        Assert.Contains("cut.npy", e.Message);
        Assert.Contains("ends at row 1", e.Message);
        Assert.Contains("(3, 4)", e.Message);
    }

    [Fact]
    public void Read_NpyWithNaN_ErrorNamesRowAndColumn()
    {
        using var t = new TempFolder();
        VectorFile.WriteNpy(t.File("nan.npy"), new float[] { 1, 2, 3, float.NaN }, 2, 2);
        File.WriteAllText(t.File("w.txt"), "a\nb\n");
        var e = Assert.Throws<UserFacingException>(() => Read(t.File("nan.npy"), t.File("w.txt")));
        Assert.Contains("nan.npy: row 1, column 1", e.Message);
        Assert.Contains("not a finite", e.Message);
    }

    [Fact]
    public void Read_WordsFileCountDiffers_ErrorNamesBoth()
    {
        using var t = new TempFolder();
        File.WriteAllText(t.File("w.txt"), "a\nb\n");
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture("numpy-f32.npy"), t.File("w.txt")));
        Assert.Contains("w.txt: has 2 words but", e.Message);
        Assert.Contains("numpy-f32.npy has 3 rows", e.Message);
    }

    [Fact]
    public void Read_WordsFileWithBlankLine_ErrorNamesLine()
    {
        using var t = new TempFolder();
        File.WriteAllText(t.File("w.txt"), "a\n\nc\n");
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture("numpy-f32.npy"), t.File("w.txt")));
        Assert.Contains("w.txt: line 2", e.Message);
        Assert.Contains("empty line", e.Message);
    }

    [Fact]
    public void Read_WordsFileInvalidUtf8_ErrorNamesLine()
    {
        using var t = new TempFolder();
        t.WriteBytes("w.txt", [.. "a\nb\n"u8, 0xFF, (byte)'\n']);
        var e = Assert.Throws<UserFacingException>(() => Read(TempFolder.Fixture("numpy-f32.npy"), t.File("w.txt")));
        Assert.Contains("w.txt: line 3", e.Message);
        Assert.Contains("not valid UTF-8", e.Message);
    }

    [Fact]
    public void Read_CancelledToken_Throws()
    {
        using var cts = new CancellationTokenSource();
        cts.Cancel();
        Assert.ThrowsAny<OperationCanceledException>(() => VectorFile.Read(TempFolder.Fixture("glove-style.txt"), cancellation: cts.Token));
    }

    [Fact]
    public void WriteText_WordWithSpace_Rejected()
    {
        using var t = new TempFolder();
        var v = new WordVectors(["new york"], [1f], 1);
        Assert.Throws<ArgumentException>(() => VectorFile.WriteText(t.File("x.txt"), v));
        Assert.Empty(t.Entries());
    }

    internal static WordVectors RandomVectors(int rows, int dims, int seed)
    {
        var rnd = new Random(seed);
        var values = new float[rows * dims];
        for (int i = 0; i < values.Length; i++) values[i] = (float)(rnd.NextDouble() * 2 - 1) * MathF.Pow(10, rnd.Next(-3, 3));
        var words = Enumerable.Range(0, rows).Select(i => "w" + i.ToString(CultureInfo.InvariantCulture) + (i % 3 == 0 ? "é" : "")).ToArray();
        return new WordVectors(words, values, dims);
    }
}
