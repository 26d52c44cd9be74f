using System.Text;
using SenseSplit.Cli;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.RealText;

/// <summary>
/// One model of real English shared by the real-text audit tests: all of GCIDE (≈ 4.7 M tokens after markup is
/// stripped) followed by all of FOLDOC (≈ 0.8 M tokens, so that computing senses of words such as "memory" or "virus"
/// are in the vectors too), embedded with the defaults except 30,000 words (PPMI-SVD, 300 dimensions), then 2,000 atoms with at most
/// 5 per word — the setting in which Arora, Li, Liang, Ma &amp; Risteski (2018, TACL 6, §5) describe atoms of real
/// word vectors. Built once per test run through the CLI, in a temporary folder.
/// </summary>
public sealed class GcideModelFixture : IDisposable
{
    public string Folder { get; } = Directory.CreateTempSubdirectory("sensesplit-gcide-model-").FullName;
    public string Corpus => Path.Combine(Folder, "gcide.txt");
    public string ModelDir => Path.Combine(Folder, "model");
    public string BuildLog { get; }
    private readonly Lazy<SenseModel> _model;

    public GcideModelFixture()
    {
        OpenCorpora.RequireGcide();
        OpenCorpora.RequireFoldoc();
        File.WriteAllLines(Corpus, OpenCorpora.GcideLines().Concat(OpenCorpora.FoldocLines()), new UTF8Encoding(false));
        var log = new StringBuilder();
        Run(log, "embed", Corpus, "--out", Path.Combine(Folder, "embedding"), "--max-words", "30000", "--seed", "1");
        Run(log, "atoms", "--vectors", Path.Combine(Folder, "embedding", "vectors.txt"), "--counts", Path.Combine(Folder, "embedding", "counts.tsv"),
            "--out", ModelDir, "--atoms", "2000", "--sparsity", "5", "--seed", "1");
        BuildLog = log.ToString();
        _model = new(() => AuditInputs.BuildSenseModel(AuditInputs.LoadModel(ModelDir, null), new SenseOptions()));
    }

    public SenseModel Model => _model.Value;

    private static void Run(StringBuilder log, params string[] args)
    {
        var stdout = new StringWriter();
        var stderr = new StringWriter();
        int code = CliApp.Run(args, stdout, stderr);
        log.AppendLine(string.Join(' ', args)).Append(stderr);
        Assert.True(code == ExitCodes.Ok, $"sensesplit {string.Join(' ', args)} failed ({code}): {stderr}");
    }

    public void Dispose()
    {
        try { Directory.Delete(Folder, recursive: true); } catch (IOException) { }
    }
}

[CollectionDefinition(Name)]
public sealed class GcideModelCollection : ICollectionFixture<GcideModelFixture>
{
    public const string Name = "GCIDE model";
}
