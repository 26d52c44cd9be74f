using System.Globalization;
using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Tests.Cli;

public class AtomsCommandTests
{
    private static string WritePlanted(TempFolder t, int rows, int dims, int atoms, out PlantedProblem problem)
    {
        problem = PlantedDictionary.Generate(new PlantedOptions { Rows = rows, Dimensions = dims, Atoms = atoms, Sparsity = 3, Noise = 0.0, Seed = 5 });
        var sb = new StringBuilder();
        for (int i = 0; i < rows; i++)
        {
            sb.Append("w").Append(i.ToString(CultureInfo.InvariantCulture));
            for (int j = 0; j < dims; j++) sb.Append(' ').Append(problem.Vectors[i * dims + j].ToString("R", CultureInfo.InvariantCulture));
            sb.Append('\n');
        }
        return t.File("planted.txt", sb.ToString());
    }

    [Fact]
    public void Atoms_PlantedMatrix_WritesLoadableModelWithValidCodes()
    {
        using var t = new TempFolder();
        string vectors = WritePlanted(t, 1500, 20, 50, out var problem);
        string counts = t.File("counts.tsv", string.Join("\n", Enumerable.Range(0, 1500).Select(i => $"w{i}\t{1000 - i % 1000}")) + "\n");
        string model = Path.Combine(t.Path, "model");
        var (code, stdout, stderr) = CliRunner.Run("atoms", "--vectors", vectors, "--out", model, "--atoms", "50", "--sparsity", "3", "--rounds", "40", "--counts", counts, "--seed", "3");
        Assert.True(code == ExitCodes.Ok, stderr);
        Assert.Contains(Path.GetFullPath(model), stdout);
        Assert.Contains("round 1/", stderr);
        var m = ModelFolder.Load(model);
        Assert.Equal(1500, m.Vectors.Count);
        Assert.Equal(50, m.AtomCount);
        Assert.Equal(AtomsCommand_Sha(vectors), m.Manifest.VectorsSha256);
        Assert.Equal(1000, m.Counts![0]);
        for (int k = 0; k < m.AtomCount; k++)
        {
            double norm = Math.Sqrt(m.Atoms.AsSpan(k * 20, 20).ToArray().Sum(v => (double)v * v));
            Assert.InRange(norm, 0.999, 1.001);
        }
        for (int i = 0; i < m.Codes.Rows; i++) Assert.True(m.Codes.AtomsOf(i).ToArray().Count(a => a >= 0) <= 3);
        // Same planted set-up as the K-SVD paper's synthetic test (Aharon, Elad & Bruckstein 2006, §V-A), smaller:
        // without noise most planted atoms must come back at |cos| > 0.99.
        int found = PlantedDictionary.CountRecovered(problem.Atoms, 50, m.Atoms, 50, 20);
        Assert.True(found >= 40, $"recovered {found} of 50 planted atoms");
        var errors = m.Manifest.ErrorPerRound;
        Assert.True(errors[^1] < errors[0], "the error should fall over the rounds");
    }

    private static string AtomsCommand_Sha(string path) =>
        Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(path)));

    [Fact]
    public void Atoms_MoreAtomsThanWords_UsageErrorNamesNumbers()
    {
        using var t = new TempFolder();
        string vectors = t.File("v.txt", "a 1 0\nb 0 1\nc 1 1\n");
        var (code, _, stderr) = CliRunner.Run("atoms", "--vectors", vectors, "--out", Path.Combine(t.Path, "m"), "--atoms", "3", "--sparsity", "1");
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--atoms (3) must be below the number of words (3)", stderr);
        Assert.False(Directory.Exists(Path.Combine(t.Path, "m")));
    }

    [Fact]
    public void Atoms_BadVectorsFile_BadInputAndNoModel()
    {
        using var t = new TempFolder();
        string vectors = t.File("v.txt", "a 1 0\nb 0 x\n");
        var (code, _, stderr) = CliRunner.Run("atoms", "--vectors", vectors, "--out", Path.Combine(t.Path, "m"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("v.txt:2:5: 'x' is not a number", stderr);
        Assert.False(Directory.Exists(Path.Combine(t.Path, "m")));
    }

    [Fact]
    public void Atoms_Help_DocumentsEveryOptionWithDefault()
    {
        var (code, stdout, _) = CliRunner.Run("atoms", "--help");
        Assert.Equal(ExitCodes.Ok, code);
        foreach (var option in new[] { "--vectors", "--words", "--out", "--counts", "--atoms", "--sparsity", "--rounds", "--tolerance", "--seed", "--threads", "--remove-top" })
            Assert.Contains(option, stdout);
        Assert.Contains("default 2000", stdout);
        Assert.Contains("default 5", stdout);
    }
}
