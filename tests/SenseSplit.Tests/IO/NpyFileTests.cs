using SenseSplit.Cli;
using SenseSplit.Cli.IO;

namespace SenseSplit.Tests.IO;

public class NpyFileTests
{
    [Fact]
    public void WriteMatrix_Float32_BytesIdenticalToNumpySave()
    {
        // tests/TestData/io/numpy-f32.npy was written by numpy.save (NumPy 1.24.2) from these values.
        float[] values = [0.5f, -1.25f, 3f, 0f, 2f, 0.125f, -8f, 1f, -0.75f, 4.5f, 0.25f, -2f];
        var ours = new MemoryStream();
        NpyFile.WriteMatrix<float>(ours, values, 3, 4);
        Assert.Equal(File.ReadAllBytes(TempFolder.Fixture("numpy-f32.npy")), ours.ToArray());
    }

    [Fact]
    public void WriteMatrix_Int32_BytesIdenticalToNumpySave()
    {
        int[] values = [0, -1, 3, 2];
        var ours = new MemoryStream();
        NpyFile.WriteMatrix<int>(ours, values, 2, 2);
        Assert.Equal(File.ReadAllBytes(TempFolder.Fixture("numpy-i4.npy")), ours.ToArray());
    }

    [Fact]
    public void WriteMatrix_Float64_BytesIdenticalToNumpySave()
    {
        // tests/TestData/io/numpy-f64.npy: numpy.save (NumPy 1.24.2) of these values as '<f8'.
        double[] values = [0.1, -0.2, 0.3, 1e-3, 2.5, -7.0];
        var ours = new MemoryStream();
        NpyFile.WriteMatrix<double>(ours, values, 2, 3);
        Assert.Equal(File.ReadAllBytes(TempFolder.Fixture("numpy-f64.npy")), ours.ToArray());
    }

    [Fact]
    public void WriteVector_OneAxis_BytesIdenticalToNumpySave()
    {
        // tests/TestData/io/numpy-1d.npy: numpy.save (NumPy 1.24.2) of the 1-D '<f4' array [1, 2, 3]; shape "(3,)".
        var ours = new MemoryStream();
        NpyFile.WriteVector<float>(ours, [1f, 2f, 3f]);
        Assert.Equal(File.ReadAllBytes(TempFolder.Fixture("numpy-1d.npy")), ours.ToArray());
    }

    [Fact]
    public void WriteMatrix_ShapeMismatch_Throws()
    {
        Assert.Throws<ArgumentException>(() => NpyFile.WriteMatrix<float>(new MemoryStream(), new float[5], 2, 3));
    }

    [Theory]
    [InlineData(0, 1)]
    [InlineData(1, 1)]
    [InlineData(400_000, 300)]
    [InlineData(1_234_567_890_123, 7)]
    public void HeaderBytes_AnyShape_DataStartsAt64ByteBoundaryAndParsesBack(long rows, long cols)
    {
        var header = NpyFile.HeaderBytes("<f4", rows, cols);
        Assert.Equal(0, header.Length % 64); // numpy/lib/format.py: ARRAY_ALIGN = 64
        Assert.Equal((byte)'\n', header[^1]);
        var parsed = NpyFile.ReadHeader(new MemoryStream(header), "h.npy");
        Assert.Equal(new[] { rows, cols }, parsed.Shape);
        Assert.Equal(NpyType.Float32, parsed.Type);
        Assert.Equal(header.Length, parsed.DataOffset);
    }

    [Fact]
    public void ReadHeader_NumpyVersion2Fixture_Parsed()
    {
        using var s = File.OpenRead(TempFolder.Fixture("numpy-v2.npy"));
        var h = NpyFile.ReadHeader(s, "numpy-v2.npy");
        Assert.Equal(new long[] { 3, 4 }, h.Shape);
        Assert.Equal(s.Position, h.DataOffset);
    }

    [Theory]
    [InlineData("{'descr': '<f4', 'fortran_order': False, 'shape': (3L, 4L), }", 3, 4)] // Python 2 era numpy
    [InlineData("{\"shape\": (2, 5), \"descr\": \"<f8\", \"fortran_order\": False}", 2, 5)]
    [InlineData("{'descr':'<f4','fortran_order':False,'shape':(7,1,)}", 7, 1)]
    public void ParseHeader_LiteralVariants_Accepted(string dict, long rows, long cols)
    {
        var h = NpyFile.ParseHeader(dict, "x.npy", 128);
        Assert.Equal(new[] { rows, cols }, h.Shape);
    }

    [Theory]
    [InlineData("{'descr': '<f2', 'fortran_order': False, 'shape': (3, 4), }", "'<f2'")]
    [InlineData("{'fortran_order': False, 'shape': (3, 4), }", "'descr'")]
    [InlineData("{'descr': '<f4', 'shape': (3, 4), }", "'fortran_order'")]
    [InlineData("{'descr': '<f4', 'fortran_order': False, 'shape': (3, -4), }", "malformed")]
    [InlineData("{'descr': '<f4', 'fortran_order': False, 'shape': (3, 4)", "malformed")]
    public void ParseHeader_Malformed_ErrorNamesFile(string dict, string fragment)
    {
        var e = Assert.Throws<UserFacingException>(() => NpyFile.ParseHeader(dict, "bad.npy", 128));
        Assert.Contains("bad.npy", e.Message);
        Assert.Contains(fragment, e.Message);
    }

    [Fact]
    public void ReadHeader_NotNpy_ErrorMentionsMagic()
    {
        var e = Assert.Throws<UserFacingException>(() => NpyFile.ReadHeader(new MemoryStream("hello world, not numpy"u8.ToArray()), "x.npy"));
        Assert.Contains("x.npy", e.Message);
        Assert.Contains("magic", e.Message);
    }
}
