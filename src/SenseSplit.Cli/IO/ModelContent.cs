using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.IO;

/// <summary>What <c>manifest.json</c> of a model folder records. Fields may be added; none removed or renamed.</summary>
public sealed record ModelManifest
{
    public int FormatVersion { get; init; } = 1;
    public string Tool { get; init; } = "sensesplit";
    public string VectorsFile { get; init; } = "";
    /// <summary>SHA-256 (hex) of the vectors file the model was learned from.</summary>
    public string VectorsSha256 { get; init; } = "";
    public int Words { get; init; }
    public int Dimensions { get; init; }
    public int Atoms { get; init; }
    public int Sparsity { get; init; }
    public int Seed { get; init; }
    public bool HasCounts { get; init; }
    public double[] ErrorPerRound { get; init; } = [];
    public int RoundsRun { get; init; }
    public bool Converged { get; init; }
    public string StopReason { get; init; } = "";
}

/// <summary>A loaded model folder: the (normalised) coded vectors, the atoms (AtomCount×Dimensions, unit rows),
/// every word's code, and word counts when the model was built with them (same order as the words).</summary>
public sealed record ModelContent(ModelManifest Manifest, WordVectors Vectors, float[] Atoms, int AtomCount, SparseCodes Codes, long[]? Counts);

public static class ModelFolder
{
    /// <summary>Writes a model folder atomically (temporary folder beside <paramref name="directory"/>, then rename).</summary>
    public static void Write(string directory, ModelContent model) => throw new NotImplementedException("model folder writer is being written");

    /// <summary>Loads a model folder; rejects one whose manifest and arrays disagree with a <see cref="UserFacingException"/>.</summary>
    public static ModelContent Load(string directory) => throw new NotImplementedException("model folder reader is being written");
}
