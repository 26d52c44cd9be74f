using System.Text.Json;
using System.Text.Json.Serialization;

namespace SenseSplit.Cli.IO;

/// <summary>What <c>manifest.json</c> of an embed output folder records (docs/file-formats.md, "embed output").</summary>
public sealed record EmbedManifest
{
    public int FormatVersion { get; init; } = 1;
    public string Tool { get; init; } = "sensesplit embed";
    public string ToolVersion { get; init; } = "";
    public List<EmbedManifestInput> Inputs { get; init; } = [];
    /// <summary>Tokens of the counted stream (a joined phrase counts once).</summary>
    public long Tokens { get; init; }
    public long InvalidUtf8Bytes { get; init; }
    public long OverlongTokensDropped { get; init; }
    /// <summary>Distinct tokens in the word table after pass 1 (after pruning, the ones left).</summary>
    public long DistinctTokens { get; init; }
    /// <summary>How often the word table was pruned to stay within its share of the memory budget (0: counts exact).</summary>
    public int VocabularyPrunings { get; init; }
    /// <summary>The last pruning threshold T: every word seen more than T times was kept (0 without pruning).</summary>
    public long VocabularyPruneThreshold { get; init; }
    public int Words { get; init; }
    public int Dimensions { get; init; }
    public int Rank { get; init; }
    public int Phrases { get; init; }
    public Dictionary<string, object> Parameters { get; init; } = new();
    public double[] SingularValues { get; init; } = [];
    /// <summary>|D| = Σ_wc X_wc, the total co-occurrence weight.</summary>
    public double PairTotal { get; init; }
    /// <summary>Z = Σ_c #(c)^α (α = contextSmoothing), the normaliser of the smoothed context distribution.</summary>
    public double SmoothedContextTotal { get; init; }
    public long CooccurrenceEntries { get; init; }
    public long PpmiEntries { get; init; }
    public int SpilledRuns { get; init; }
    public Dictionary<string, double> TimingsSeconds { get; init; } = new();
    public long PeakMemoryBytes { get; init; }
    public Dictionary<string, string> Files { get; init; } = new();

    public static readonly JsonSerializerOptions Json = new()
    {
        WriteIndented = true,
        PropertyNamingPolicy = JsonNamingPolicy.CamelCase,
        DefaultIgnoreCondition = JsonIgnoreCondition.Never,
    };
}

public sealed record EmbedManifestInput(string Name, long Bytes, string Sha256);
