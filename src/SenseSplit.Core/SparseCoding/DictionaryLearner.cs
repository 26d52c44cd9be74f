namespace SenseSplit.Core.SparseCoding;

/// <summary>Settings of dictionary learning. Defaults are the CLI defaults.</summary>
public sealed record DictionaryOptions
{
    public int Atoms { get; init; } = 2000;
    public int Sparsity { get; init; } = 5;
    public int MaxRounds { get; init; } = 30;
    /// <summary>Stop when the relative error improves by less than this (relative) between rounds.</summary>
    public double Tolerance { get; init; } = 1e-3;
    public int Seed { get; init; } = 1;
    /// <summary>0 means Environment.ProcessorCount.</summary>
    public int Threads { get; init; }
}

/// <summary>What one finished learning round reports (for progress displays).</summary>
public sealed record RoundReport(int Round, int MaxRounds, double RelativeError, int AtomsReplaced);

/// <summary>Learned dictionary (AtomCount×Dimensions, unit rows) and the codes of the training vectors under it.</summary>
public sealed record DictionaryResult(
    float[] Atoms, int AtomCount, int Dimensions, SparseCodes Codes,
    IReadOnlyList<double> ErrorPerRound, IReadOnlyList<int> ReplacedPerRound,
    int RoundsRun, bool Converged, string StopReason);

public static class DictionaryLearner
{
    /// <summary>Learns a dictionary for <paramref name="vectors"/> (rows×dims, row-major).</summary>
    public static DictionaryResult Learn(ReadOnlySpan<float> vectors, int rows, int dims, DictionaryOptions options,
        IProgress<RoundReport>? progress = null, CancellationToken cancellation = default)
        => throw new NotImplementedException("dictionary learning is being written");
}
