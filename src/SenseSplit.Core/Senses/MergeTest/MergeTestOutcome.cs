namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>Everything the merge test found: the pairs with their fits, the laws fitted to β/α against r, the
/// verdict, the settings used, and notes (shortfalls, user pairs that break a rule, degenerate fits).</summary>
public sealed record MergeTestOutcome(
    IReadOnlyList<PairFit> Pairs,
    RatioBins Bins,
    WeightLawsResult Laws,
    MergeVerdictResult Verdict,
    PairSelectionSettings Selection,
    IReadOnlyList<string> Notes);

/// <summary>Runs the analysis steps on fitted pairs: <see cref="WeightLaws.Fit"/> then <see cref="MergeVerdict.Decide"/>.</summary>
public static class MergeTestAnalysis
{
    /// <param name="noiseFloor">For re-embedded vectors, the median cosine of untouched words to their old vectors
    /// after alignment (see <see cref="MergeVerdict.Decide"/>); NaN for fold-in.</param>
    public static MergeTestOutcome Analyse(IReadOnlyList<PairFit> pairs, PairSelectionSettings selection,
        WeightLawSettings? laws = null, VerdictThresholds? thresholds = null, IEnumerable<string>? notes = null,
        double noiseFloor = double.NaN)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(selection);
        var bins = new RatioBins(selection.Bins, selection.MaxRatio);
        var lawResult = WeightLaws.Fit(pairs, bins, laws);
        var verdict = MergeVerdict.Decide(pairs, thresholds, noiseFloor);
        var allNotes = new List<string>(notes ?? []);
        foreach (var p in pairs.Where(p => p.Fit.IsDegenerate))
            allNotes.Add($"pair ({p.Pair.FrequentWord}, {p.Pair.RareWord}): no weights, {p.Fit.Diagnostic}");
        return new MergeTestOutcome(pairs, bins, lawResult, verdict, selection, allNotes);
    }
}
