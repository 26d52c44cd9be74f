using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.Json.Serialization;
using CsvHelper;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Cli.Reports;

/// <summary>The content of <c>merge-test.json</c>. Fields may be added; none removed or renamed. Non-finite numbers
/// are written as null.</summary>
public sealed record MergeTestSummary
{
    public int FormatVersion { get; init; } = 1;
    public string Tool { get; init; } = "sensesplit";
    public string Verdict { get; init; } = "";
    public IReadOnlyList<string> VerdictReasons { get; init; } = [];
    public double? MedianCosineToSpan { get; init; }
    public int PairsWithCosine { get; init; }
    /// <summary>"absolute" (fold-in: median cosine to span ≥ min_median_cosine) or "relative to noise floor"
    /// (re-embedded vectors: ≥ floor_factor × noise_floor_cosine).</summary>
    public string CosineRule { get; init; } = "absolute";
    /// <summary>Median cosine of the untouched words to their old vectors after alignment; null for fold-in.</summary>
    public double? NoiseFloorCosine { get; init; }
    /// <summary>The least median cosine to span that passes under <see cref="CosineRule"/>.</summary>
    public double? RequiredCosineToSpan { get; init; }
    public double? MedianExcessFactorHighRatio { get; init; }
    public int PairsHighRatio { get; init; }
    public string? BetterLaw { get; init; }
    public string BetterLawCriterion { get; init; } = "bic";
    public LawParameterSummary C { get; init; } = new();
    public LawParameterSummary Gamma { get; init; } = new();
    public double? PowerScale { get; init; }
    public int PowerExcludedPairs { get; init; }
    public int PairsTotal { get; init; }
    public int PairsUsed { get; init; }
    public int PairsWithoutWeights { get; init; }
    public string ErrorMeasure { get; init; } = "rmse of beta/alpha";
    public LawValuesSummary OverallError { get; init; } = new();
    public LawValuesSummary Bic { get; init; } = new();
    public IReadOnlyList<BinErrorSummary> Bins { get; init; } = [];
    public double? MedianExcessFactor { get; init; }
    public double? ShareWellAbove { get; init; }
    public MergeTestParameters Parameters { get; init; } = new();
    public IReadOnlyList<string> Notes { get; init; } = [];
}

public sealed record LawParameterSummary
{
    public double? Estimate { get; init; }
    public double? Lower { get; init; }
    public double? Upper { get; init; }
    public string Interval { get; init; } = "";
    public double? AnalyticLower { get; init; }
    public double? AnalyticUpper { get; init; }
    public int ResamplesUsed { get; init; }
}

public sealed record LawValuesSummary
{
    public double? Proportional { get; init; }
    public double? Logarithmic { get; init; }
    public double? Power { get; init; }
}

public sealed record BinErrorSummary
{
    public int Bin { get; init; }
    public double LowerRatio { get; init; }
    public double UpperRatio { get; init; }
    public int Pairs { get; init; }
    public double? MedianRatio { get; init; }
    public double? MedianWeightRatio { get; init; }
    public LawValuesSummary Error { get; init; } = new();
}

/// <summary>Every setting the numbers depend on, plus what the command adds about the run (inputs, method).</summary>
public sealed record MergeTestParameters
{
    public int Pairs { get; init; }
    public int Bins { get; init; }
    public double MaxRatio { get; init; }
    public long MinRareCount { get; init; }
    public double MaxAbsCosine { get; init; }
    public int Neighbours { get; init; }
    public int SkipMostFrequent { get; init; }
    public bool PlainWordsOnly { get; init; }
    public int SelectionSeed { get; init; }
    public int Resamples { get; init; }
    public int BootstrapSeed { get; init; }
    public double Confidence { get; init; }
    public double WellAboveFactor { get; init; }
    public double MinMedianCosine { get; init; }
    public double HighRatio { get; init; }
    public double MinExcessFactor { get; init; }
    public int MinPairs { get; init; }
    public double FloorFactor { get; init; }
    public double MinNoiseFloor { get; init; }
    public IReadOnlyDictionary<string, object?> Run { get; init; } = new Dictionary<string, object?>();
}

/// <summary>
/// Writes the merge test's results: <c>pairs.csv</c> (one row per pair), <c>merge-test.json</c> (summary, laws,
/// per-bin errors, verdict, parameters) and <c>merge-test.svg</c> (<see cref="MergeTestChart"/>). Each file is written
/// to a temporary file beside it and renamed into place.
/// </summary>
public static class MergeTestReport
{
    public const string PairsFile = "pairs.csv";
    public const string SummaryFile = "merge-test.json";
    public const string ChartFile = "merge-test.svg";

    public static readonly string[] PairColumns = ["w1", "w2", "f1", "f2", "r", "alpha", "beta", "cosine_to_span", "residual"];

    private static readonly JsonSerializerOptions Json = new()
    {
        WriteIndented = true,
        PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower,
        DictionaryKeyPolicy = null,
        DefaultIgnoreCondition = JsonIgnoreCondition.Never,
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };

    /// <summary>Column added to <c>pairs.csv</c> when the pseudo-word names are given.</summary>
    public const string PseudoColumn = "pseudo";

    /// <summary>Writes all three files into <paramref name="directory"/> (created when missing).</summary>
    /// <param name="pseudoWords">The pseudo-word of each pair (same order as the outcome's pairs); when given,
    /// <c>pairs.csv</c> ends with a <c>pseudo</c> column, so it can be read back as a pairs file.</param>
    public static void Write(string directory, MergeTestOutcome outcome, IReadOnlyDictionary<string, object?>? run = null,
        IReadOnlyList<string>? pseudoWords = null)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        try { Directory.CreateDirectory(directory); }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            throw new UserFacingException($"{directory}: cannot create the output folder ({ex.Message})", ExitCodes.WriteFailed);
        }
        WritePairs(Path.Combine(directory, PairsFile), outcome.Pairs, pseudoWords);
        WriteSummary(Path.Combine(directory, SummaryFile), outcome, run);
        WriteAtomically(Path.Combine(directory, ChartFile), stream =>
        {
            using var writer = new StreamWriter(stream, new UTF8Encoding(false));
            writer.Write(MergeTestChart.Render(outcome, standalone: true));
        });
    }

    /// <summary>Writes <c>pairs.csv</c>: w1, w2, f1, f2, r, alpha, beta, cosine_to_span, residual (empty where
    /// undefined), then pseudo when <paramref name="pseudoWords"/> is given.</summary>
    public static void WritePairs(string path, IReadOnlyList<PairFit> pairs, IReadOnlyList<string>? pseudoWords = null)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        if (pseudoWords is not null && pseudoWords.Count != pairs.Count)
            throw new ArgumentException($"{pairs.Count} pairs but {pseudoWords.Count} pseudo-words", nameof(pseudoWords));
        WriteAtomically(path, stream =>
        {
            using var writer = new StreamWriter(stream, new UTF8Encoding(false));
            using var csv = new CsvWriter(writer, CultureInfo.InvariantCulture);
            foreach (var column in PairColumns) csv.WriteField(column);
            if (pseudoWords is not null) csv.WriteField(PseudoColumn);
            csv.NextRecord();
            for (int i = 0; i < pairs.Count; i++)
            {
                var p = pairs[i];
                csv.WriteField(p.Pair.FrequentWord);
                csv.WriteField(p.Pair.RareWord);
                csv.WriteField(p.Pair.FrequentCount.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(p.Pair.RareCount.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(Number(p.Pair.Ratio));
                csv.WriteField(Number(p.Fit.Alpha));
                csv.WriteField(Number(p.Fit.Beta));
                csv.WriteField(Number(p.Fit.CosineToSpan));
                csv.WriteField(Number(p.Fit.RelativeResidual));
                if (pseudoWords is not null) csv.WriteField(pseudoWords[i]);
                csv.NextRecord();
            }
        });
    }

    /// <summary>Writes <c>merge-test.json</c> from <see cref="Summarise"/>.</summary>
    public static void WriteSummary(string path, MergeTestOutcome outcome, IReadOnlyDictionary<string, object?>? run = null)
    {
        var summary = Summarise(outcome, run);
        WriteAtomically(path, stream => JsonSerializer.Serialize(stream, summary, Json));
    }

    /// <summary>Reads a <c>merge-test.json</c> back (for tests and for the audit report).</summary>
    public static MergeTestSummary ReadSummary(string path)
    {
        try
        {
            using var stream = File.OpenRead(path);
            return JsonSerializer.Deserialize<MergeTestSummary>(stream, Json) ?? throw new UserFacingException($"{path}: empty summary");
        }
        catch (JsonException ex)
        {
            throw new UserFacingException($"{path}: line {ex.LineNumber + 1}, position {ex.BytePositionInLine + 1}: {ex.Message}");
        }
    }

    public static MergeTestSummary Summarise(MergeTestOutcome outcome, IReadOnlyDictionary<string, object?>? run = null)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var laws = outcome.Laws;
        var v = outcome.Verdict;
        var s = outcome.Selection;
        string interval = $"percentile pairs bootstrap, {Number(laws.Settings.Confidence * 100)}%, {laws.Settings.Resamples} resamples";
        return new MergeTestSummary
        {
            Verdict = v.Label,
            VerdictReasons = v.Reasons,
            MedianCosineToSpan = Finite(v.MedianCosineToSpan),
            PairsWithCosine = v.PairsWithCosine,
            CosineRule = v.RelativeToFloor ? "relative to noise floor" : "absolute",
            NoiseFloorCosine = Finite(v.NoiseFloor),
            RequiredCosineToSpan = Finite(v.RequiredCosine),
            MedianExcessFactorHighRatio = Finite(v.MedianExcessHighRatio),
            PairsHighRatio = v.PairsHighRatio,
            BetterLaw = laws.BetterLaw is { } law ? WeightLaws.Name(law) : null,
            C = Parameter(laws.C, interval),
            Gamma = Parameter(laws.Gamma, interval),
            PowerScale = Finite(laws.PowerScale),
            PowerExcludedPairs = laws.PowerExcluded,
            PairsTotal = outcome.Pairs.Count,
            PairsUsed = laws.PairsUsed,
            PairsWithoutWeights = laws.PairsWithoutWeights,
            OverallError = Values(laws.OverallRmse),
            Bic = Values(laws.Bic),
            Bins = laws.Bins.Select(b => new BinErrorSummary
            {
                Bin = b.Bin, LowerRatio = b.LowerRatio, UpperRatio = b.UpperRatio, Pairs = b.Pairs,
                MedianRatio = Finite(b.MedianRatio), MedianWeightRatio = Finite(b.MedianWeightRatio), Error = Values(b.Rmse),
            }).ToList(),
            MedianExcessFactor = Finite(laws.MedianExcessFactor),
            ShareWellAbove = Finite(laws.ShareWellAbove),
            Parameters = new MergeTestParameters
            {
                Pairs = s.Pairs, Bins = s.Bins, MaxRatio = s.MaxRatio, MinRareCount = s.MinRareCount, MaxAbsCosine = s.MaxAbsCosine,
                Neighbours = s.Neighbours, SkipMostFrequent = s.SkipMostFrequent, PlainWordsOnly = s.PlainWordsOnly, SelectionSeed = s.Seed,
                Resamples = laws.Settings.Resamples, BootstrapSeed = laws.Settings.Seed, Confidence = laws.Settings.Confidence,
                WellAboveFactor = laws.Settings.WellAboveFactor,
                MinMedianCosine = v.Thresholds.MinMedianCosine, HighRatio = v.Thresholds.HighRatio,
                MinExcessFactor = v.Thresholds.MinExcessFactor, MinPairs = v.Thresholds.MinPairs,
                FloorFactor = v.Thresholds.FloorFactor, MinNoiseFloor = v.Thresholds.MinNoiseFloor,
                Run = run ?? new Dictionary<string, object?>(),
            },
            Notes = outcome.Notes,
        };
    }

    /// <summary>Writes through <paramref name="write"/> into a temporary file beside <paramref name="path"/>, then
    /// renames it over <paramref name="path"/>; the temporary file is removed on failure.</summary>
    public static void WriteAtomically(string path, Action<Stream> write)
    {
        ArgumentNullException.ThrowIfNull(write);
        string full = Path.GetFullPath(path);
        string temp = Path.Combine(Path.GetDirectoryName(full)!, $".{Path.GetFileName(full)}.{Guid.NewGuid():N}.tmp");
        try
        {
            using (var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.Write)) write(stream);
            File.Move(temp, full, overwrite: true);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
        {
            TryDelete(temp);
            throw new UserFacingException($"{path}: cannot write ({ex.Message})", ExitCodes.WriteFailed);
        }
        catch
        {
            TryDelete(temp);
            throw;
        }
    }

    private static void TryDelete(string path)
    {
        try { File.Delete(path); } catch (IOException) { } catch (UnauthorizedAccessException) { }
    }

    private static LawParameterSummary Parameter(LawParameter p, string interval) => new()
    {
        Estimate = Finite(p.Estimate), Lower = Finite(p.Lower), Upper = Finite(p.Upper), Interval = interval,
        AnalyticLower = Finite(p.AnalyticLower), AnalyticUpper = Finite(p.AnalyticUpper), ResamplesUsed = p.ResamplesUsed,
    };

    private static LawValuesSummary Values(LawValues v) => new()
    {
        Proportional = Finite(v.Proportional), Logarithmic = Finite(v.Logarithmic), Power = Finite(v.Power),
    };

    private static double? Finite(double x) => double.IsFinite(x) ? x : null;

    private static string Number(double x) => double.IsFinite(x) ? x.ToString("R", CultureInfo.InvariantCulture) : "";
}
