using System.Globalization;
using SenseSplit.Cli;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Vectors;
using SenseSplit.Tests.IO;

namespace SenseSplit.Tests.Cli;

public class AtomsCommandTests
{
    private static (int Code, string Out, string Err) Run(params string[] args)
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(args, stdout, stderr);
        return (code, stdout.ToString(), stderr.ToString());
    }

    [Fact]
    public void Help_DocumentsEveryOptionWithItsDefault()
    {
        var (code, output, _) = Run("atoms", "--help");
        Assert.Equal(ExitCodes.Ok, code);
        // Defaults are DictionaryOptions' (the CLI defaults by its own documentation) and --remove-top 0.
        string[] withDefaults =
        [
            "--atoms <K>", "[default: 2000]", "--sparsity <S>", "[default: 5]", "--rounds <R>", $"[default: {new SenseSplit.Core.SparseCoding.DictionaryOptions().MaxRounds}]",
            "--tolerance <T>", "[default: 0.001]", "--seed <N>", "[default: 1]", "--threads <T>", "--remove-top <N>",
        ];
        foreach (var s in withDefaults) Assert.Contains(s, output);
        foreach (var s in new[] { "--vectors <FILE>", "--out <DIR>", "--words <FILE>", "--counts <FILE>" }) Assert.Contains(s, output);
        Assert.Contains("Worker threads; 0 uses every core. Results do not depend on it. [default: 0]", output);
        Assert.Contains("Rows are always scaled to unit length. [default: 0]", output);
    }

    [Fact]
    public void ParseSettings_AllOptions_ReachTheSettings()
    {
        var s = AtomsCommand.ParseSettings("--vectors", "v.txt", "--out", "m", "--words", "w.txt", "--counts", "c.tsv",
            "--atoms", "300", "--sparsity", "4", "--rounds", "12", "--tolerance", "2.5e-4", "--seed", "42", "--threads", "2", "--remove-top", "3");
        Assert.Equal(("v.txt", "m", "w.txt", "c.tsv", 3), (s.Vectors, s.Out, s.Words, s.Counts, s.RemoveTop));
        Assert.Equal(300, s.Dictionary.Atoms);
        Assert.Equal(4, s.Dictionary.Sparsity);
        Assert.Equal(12, s.Dictionary.MaxRounds);
        Assert.Equal(2.5e-4, s.Dictionary.Tolerance);
        Assert.Equal(42, s.Dictionary.Seed);
        Assert.Equal(2, s.Dictionary.Threads);
    }

    [Fact]
    public void ParseSettings_OnlyRequired_DefaultsOfDictionaryOptions()
    {
        var s = AtomsCommand.ParseSettings("--vectors", "v.txt", "--out", "m");
        Assert.Equal(new SenseSplit.Core.SparseCoding.DictionaryOptions(), s.Dictionary);
        Assert.Equal(0, s.RemoveTop);
        Assert.Null(s.Words);
        Assert.Null(s.Counts);
    }

    [Fact]
    public void Run_MissingRequiredOptions_FailsNamingThem()
    {
        var (code, _, err) = Run("atoms", "--atoms", "5");
        Assert.NotEqual(ExitCodes.Ok, code);
        Assert.Contains("--vectors", err);
        Assert.Contains("--out", err);
    }

    [Fact]
    public void Run_NonNumericOptionValue_Fails()
    {
        var (code, _, err) = Run("atoms", "--vectors", "v", "--out", "m", "--atoms", "many");
        Assert.NotEqual(ExitCodes.Ok, code);
        Assert.Contains("many", err);
    }

    [Theory]
    [InlineData("--atoms", "0", "--atoms (0) must be at least 1")]
    [InlineData("--sparsity", "0", "--sparsity (0) must be at least 1")]
    [InlineData("--sparsity", "2001", "--sparsity (2001) must not exceed --atoms (2000)")]
    [InlineData("--rounds", "0", "--rounds (0) must be at least 1")]
    [InlineData("--tolerance", "-0.5", "--tolerance (-0.5) must be a finite number >= 0")]
    [InlineData("--threads", "-1", "--threads (-1) must not be negative")]
    [InlineData("--remove-top", "-2", "--remove-top (-2) must not be negative")]
    public void Run_OutOfRangeOption_UsageErrorWithNumbers(string option, string value, string message)
    {
        using var t = new TempFolder();
        var (code, _, err) = Run("atoms", "--vectors", TempFolder.Fixture("glove-style.txt"), "--out", t.File("m"), option, value);
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains(message, err);
        Assert.Empty(t.Entries());
    }

    [Fact]
    public void Run_MoreAtomsThanWords_UsageErrorNamingBoth()
    {
        using var t = new TempFolder();
        var (code, _, err) = Run("atoms", "--vectors", TempFolder.Fixture("glove-style.txt"), "--out", t.File("m"), "--atoms", "4", "--sparsity", "2");
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--atoms (4) must not exceed the number of words (3 in", err);
        Assert.Empty(t.Entries());
    }

    [Fact]
    public void Run_SparsityAboveDimensions_UsageError()
    {
        using var t = new TempFolder();
        var v = t.Write("v.txt", "a 1 0\nb 0 1\nc 1 1\nd 1 2\n");
        var (code, _, err) = Run("atoms", "--vectors", v, "--out", t.File("m"), "--atoms", "3", "--sparsity", "3");
        Assert.Equal(ExitCodes.Usage, code);
        Assert.Contains("--sparsity (3) must not exceed the dimensions (2 in", err);
    }

    [Fact]
    public void Run_BadVectorsFile_BadInputNamingFileAndLine()
    {
        using var t = new TempFolder();
        var bad = t.Write("bad.txt", "a 1 2\nb 1 oops\n");
        var (code, output, err) = Run("atoms", "--vectors", bad, "--out", t.File("m"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("reading vectors", err);
        Assert.Contains("error: ", err);
        Assert.Contains("bad.txt: line 2, column 5", err);
        Assert.Equal("", output);
        Assert.Equal(["bad.txt"], t.Entries());
    }

    [Fact]
    public void Run_MissingVectorsFile_BadInput()
    {
        using var t = new TempFolder();
        var (code, _, err) = Run("atoms", "--vectors", t.File("absent.txt"), "--out", t.File("m"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("absent.txt: file not found", err);
    }

    [Fact]
    public void Run_OutIsFolderThatIsNotAModel_WriteFailedBeforeReading()
    {
        using var t = new TempFolder();
        Directory.CreateDirectory(t.File("docs"));
        File.WriteAllText(Path.Combine(t.File("docs"), "notes.txt"), "mine");
        var (code, _, err) = Run("atoms", "--vectors", t.File("absent.txt"), "--out", t.File("docs"));
        Assert.Equal(ExitCodes.WriteFailed, code); // checked before the (missing) input is even opened
        Assert.Contains("not a model folder", err);
        Assert.Equal("mine", File.ReadAllText(Path.Combine(t.File("docs"), "notes.txt")));
    }

    [Fact]
    public void Run_Cancelled_CancelledExitAndNothingWritten()
    {
        using var t = new TempFolder();
        var vectors = t.File("v.txt");
        VectorFile.WriteText(vectors, VectorFileTests.RandomVectors(50, 8, seed: 1));
        var settings = AtomsCommand.ParseSettings("--vectors", vectors, "--out", t.File("m"), "--atoms", "10", "--sparsity", "2");
        var err = new StringWriter();
        var context = new CliContext(new StringWriter(), err);
        using var cts = new CancellationTokenSource();
        cts.Cancel();
        var e = Assert.ThrowsAny<OperationCanceledException>(() => AtomsCommand.Run(settings, context, new ProgressDisplay(err, false), cts.Token));
        Assert.Equal(ExitCodes.Cancelled, CliApp.Report(context, e));
        Assert.Contains("cancelled", err.ToString());
        Assert.Equal(["v.txt"], t.Entries());
    }

    [Fact]
    public void Run_WarningsOfTheReaderGoToStderr()
    {
        using var t = new TempFolder();
        // Only reading runs to completion here (3 words < 2000 atoms stops the command), so this does not need the numerics.
        var path = t.Write("dup.txt", "a 1 2\na 3 4\nz 0 0\nb 1 1\n");
        var (_, output, err) = Run("atoms", "--vectors", path, "--out", t.File("m"));
        Assert.Contains("warning: ", err);
        Assert.Contains("1 zero vector", err);
        Assert.Contains("1 repeated word", err);
        Assert.Equal("", output);
    }

    /// <summary>End to end on a small random matrix: options, learning, model folder written and loaded back.</summary>
    [Fact]
    public void Run_SmallRandomMatrix_WritesConsistentModel()
    {
        using var t = new TempFolder();
        var input = VectorFileTests.RandomVectors(300, 16, seed: 21);
        var vectors = t.File("v.txt");
        VectorFile.WriteText(vectors, input);
        var counts = t.Write("c.tsv", string.Join("\n", input.Words.Take(250).Select((w, i) => $"{w}\t{i + 1}")) + "\n");
        var modelDir = t.File("model");
        var (code, output, err) = Run("atoms", "--vectors", vectors, "--out", modelDir, "--counts", counts,
            "--atoms", "20", "--sparsity", "3", "--rounds", "5", "--seed", "3", "--threads", "1");
        Assert.True(code == ExitCodes.Ok, err);
        Assert.Equal(Path.GetFullPath(modelDir), output.Trim());
        Assert.Contains("/5  error ", err); // at least one round reported on stderr
        Assert.Contains("atoms learned", err);
        Assert.Contains("50 of 300 words have no count", err);

        var model = ModelFolder.Load(modelDir);
        var m = model.Manifest;
        Assert.Equal((300, 16, 20, 3, 3), (m.Words, m.Dimensions, m.Atoms, m.Sparsity, m.Seed));
        Assert.Equal(5, m.MaxRounds);
        Assert.InRange(m.RoundsRun, 1, 5);
        Assert.InRange(m.ErrorPerRound.Length, 1, m.RoundsRun + 1); // one error per round (perhaps plus the starting one)
        Assert.False(string.IsNullOrEmpty(m.StopReason));
        Assert.Equal(Convert.ToHexStringLower(System.Security.Cryptography.SHA256.HashData(File.ReadAllBytes(vectors))), m.VectorsSha256);
        Assert.Equal(input.Words, model.Vectors.Words);
        Assert.Equal(1L, model.Counts![0]);
        Assert.Equal(0L, model.Counts[299]);

        for (int i = 0; i < 300; i++)
        {
            // Stored vectors are the input rows scaled to unit length (no --remove-top).
            double norm = Math.Sqrt(input.Row(i).ToArray().Sum(v => (double)v * v));
            for (int j = 0; j < 16; j++) Assert.Equal(input.Row(i)[j] / norm, model.Vectors.Row(i)[j], 1e-6); // float32 rounding of a unit vector
        }
        for (int k = 0; k < 20; k++)
            Assert.Equal(1.0, Math.Sqrt(model.Atoms.AsSpan(k * 16, 16).ToArray().Sum(v => (double)v * v)), 1e-4);

        // The stored codes reconstruct the stored vectors better than nothing: ||x - D a|| < ||x|| = 1 summed over rows.
        double residual = 0;
        for (int i = 0; i < 300; i++)
        {
            var r = model.Vectors.Row(i).ToArray().Select(v => (double)v).ToArray();
            var ids = model.Codes.AtomsOf(i);
            var w = model.Codes.WeightsOf(i);
            Assert.True(ids.ToArray().Count(id => id >= 0) <= 3);
            for (int slot = 0; slot < 3; slot++)
                if (ids[slot] >= 0)
                    for (int j = 0; j < 16; j++) r[j] -= w[slot] * model.Atoms[ids[slot] * 16 + j];
            residual += r.Sum(x => x * x);
        }
        Assert.True(Math.Sqrt(residual / 300) < 1.0, $"relative residual {Math.Sqrt(residual / 300)}");
        Assert.Equal(["c.tsv", "model", "v.txt"], t.Entries());
    }
}
