using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.IO;

public class ModelFolderTests
{
    private static ModelContent Sample(bool withCounts)
    {
        var vectors = new WordVectors(["port", "crane", "fern"], [1, 0, 0, 1, 0.6f, 0.8f], 2);
        var codes = new SparseCodes(3, 2, [0, -1, 1, -1, 0, 1], [1, 0, 1, 0, 0.6f, 0.8f]);
        var manifest = new ModelManifest { Words = 3, Dimensions = 2, Atoms = 2, Sparsity = 2, ErrorPerRound = [0.5, 0.1] };
        return new ModelContent(manifest, vectors, [1, 0, 0, 1], 2, codes, withCounts ? [10, 20, 30] : null);
    }

    [Theory]
    [InlineData(true)]
    [InlineData(false)]
    public void WriteLoad_RoundTrip_SameContent(bool withCounts)
    {
        using var t = new TempFolder();
        var dir = Path.Combine(t.Path, "model");
        var m = Sample(withCounts);
        ModelFolder.Write(dir, m);
        var back = ModelFolder.Load(dir);
        Assert.Equal(m.Vectors.Words, back.Vectors.Words);
        Assert.Equal(m.Vectors.Values, back.Vectors.Values);
        Assert.Equal(m.Atoms, back.Atoms);
        Assert.Equal(m.Codes.AtomIds, back.Codes.AtomIds);
        Assert.Equal(m.Codes.Weights, back.Codes.Weights);
        Assert.Equal(m.Manifest.ErrorPerRound, back.Manifest.ErrorPerRound);
        Assert.Equal(withCounts, back.Counts is not null);
        if (withCounts) Assert.Equal(m.Counts, back.Counts);
    }

    [Fact]
    public void Write_ExistingFolder_ReplacedAndNoTemporaryLeft()
    {
        using var t = new TempFolder();
        var dir = Path.Combine(t.Path, "model");
        Directory.CreateDirectory(dir);
        File.WriteAllText(Path.Combine(dir, "stale.txt"), "old");
        ModelFolder.Write(dir, Sample(false));
        Assert.False(File.Exists(Path.Combine(dir, "stale.txt")));
        Assert.Single(Directory.GetDirectories(t.Path));
    }

    [Fact]
    public void Load_ArrayDisagreesWithManifest_RejectedNamingTheFile()
    {
        using var t = new TempFolder();
        var dir = Path.Combine(t.Path, "model");
        ModelFolder.Write(dir, Sample(false));
        NpyFile.Write(Path.Combine(dir, ModelFolder.AtomsFile), new float[] { 1, 0, 0, 1, 1, 1 }, 3, 2);
        var ex = Assert.Throws<UserFacingException>(() => ModelFolder.Load(dir));
        Assert.Contains("atoms.npy", ex.Message);
        Assert.Contains("3×2", ex.Message);
    }

    [Fact]
    public void Load_AtomIdOutOfRange_Rejected()
    {
        using var t = new TempFolder();
        var dir = Path.Combine(t.Path, "model");
        ModelFolder.Write(dir, Sample(false));
        NpyFile.Write(Path.Combine(dir, ModelFolder.CodeAtomsFile), new[] { 0, 7, 1, -1, 0, 1 }, 3, 2);
        var ex = Assert.Throws<UserFacingException>(() => ModelFolder.Load(dir));
        Assert.Contains("atom 7", ex.Message);
    }

    [Fact]
    public void Load_MissingFolderOrFile_ClearError()
    {
        using var t = new TempFolder();
        Assert.Contains("no such model folder", Assert.Throws<UserFacingException>(() => ModelFolder.Load(Path.Combine(t.Path, "none"))).Message);
        var dir = Path.Combine(t.Path, "model");
        ModelFolder.Write(dir, Sample(false));
        File.Delete(Path.Combine(dir, ModelFolder.WordsFile));
        Assert.Contains("words.txt: missing", Assert.Throws<UserFacingException>(() => ModelFolder.Load(dir)).Message);
    }
}
