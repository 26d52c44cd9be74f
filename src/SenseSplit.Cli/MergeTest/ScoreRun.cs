using System.Globalization;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Cli.MergeTest;

/// <summary>What <c>merge-test score</c> was asked to do.</summary>
internal sealed record ScoreSettings
{
    public string Original { get; init; } = "";
    public string? OriginalWords { get; init; }
    public string Merged { get; init; } = "";
    public string? MergedWords { get; init; }
    public string Pairs { get; init; } = "";
    public string Counts { get; init; } = "";
    public string Out { get; init; } = "";
    public VerdictThresholds Thresholds { get; init; } = new();
    public PairSelectionSettings Selection { get; init; } = new();
}

/// <summary>
/// <c>merge-test score</c>: the merge test for embeddings trained elsewhere. Reads the original vectors and the vectors
/// trained on the merged corpus, rotates the merged ones onto the original by orthogonal Procrustes on the untouched
/// words, fits every pseudo-word as α·v1 + β·v2 and writes the report. As for <c>--retrain</c>, the cosine criterion
/// is judged against the noise floor of the two trainings (the untouched words' median cosine after the rotation).
/// </summary>
internal static class ScoreRun
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public static int Run(CliContext context, ScoreSettings s, ProgressDisplay progress, CancellationToken cancellation)
    {
        MergeTestSteps.CheckThresholds(s.Thresholds);

        progress.Stage("reading vectors");
        var original = VectorFile.Read(s.Original, s.OriginalWords, progress.Warn, cancellation).Vectors;
        cancellation.ThrowIfCancellationRequested();
        var merged = VectorFile.Read(s.Merged, s.MergedWords, progress.Warn, cancellation).Vectors;
        progress.EndStage($"{original.Count.ToString(C)} original and {merged.Count.ToString(C)} merged words, {original.Dimensions.ToString(C)} dimensions");
        if (merged.Dimensions != original.Dimensions)
            throw new UserFacingException($"{s.Merged}: has {merged.Dimensions.ToString(C)} dimensions but {s.Original} has {original.Dimensions.ToString(C)}; both embeddings need the same dimensions");

        var countMap = CountsFile.Read(s.Counts, progress.Warn);
        var rows = MergePairsFile.Read(s.Pairs);
        var originalIndex = MergeTestSteps.Index(original.Words);
        var mergedIndex = MergeTestSteps.Index(merged.Words);
        int countMismatches = 0;
        string? firstMismatch = null;
        foreach (var row in rows)
        {
            string at = $"pair on line {row.Line.ToString(C)} of {s.Pairs}";
            foreach (var (w, given) in new[] { (row.First, row.FirstCount), (row.Second, row.SecondCount) })
            {
                if (!originalIndex.ContainsKey(w)) throw new UserFacingException($"{s.Original}: has no vector for '{Printable.Word(w)}' ({at})");
                if (!countMap.TryGetValue(w, out long count)) throw new UserFacingException($"{s.Counts}: has no count for '{Printable.Word(w)}' ({at})");
                if (count <= 0) throw new UserFacingException($"{s.Counts}: the count of '{Printable.Word(w)}' is 0 ({at}); a merged word needs occurrences");
                if (given is long g && g != count && countMismatches++ == 0) firstMismatch = $"'{Printable.Word(w)}' on line {row.Line.ToString(C)}: {g.ToString(C)} vs {count.ToString(C)}";
            }
        }
        if (countMismatches > 0)
            progress.Warn($"{s.Pairs}: {countMismatches.ToString(C)} counts differ from {s.Counts} (first: {firstMismatch}); the counts file is used");

        var counts = CountsFile.Align(original.Words, countMap, s.Counts, null);
        var selector = new PairSelector(original.Words, original.Values, original.Dimensions, counts);
        var selection = MergeTestSteps.FromUser(selector, rows, s.Pairs, s.Selection);
        var pseudo = MergeTestSteps.PseudoNames(selection, rows, s.Pairs, _ => false, choose: false);
        for (int i = 0; i < pseudo.Length; i++)
        {
            if (mergedIndex.ContainsKey(pseudo[i])) continue;
            string where = $"{s.Merged}: has no vector for the pseudo-word '{Printable.Word(pseudo[i])}' of the pair on line {rows[i].Line.ToString(C)} of {s.Pairs} ({Printable.Word(rows[i].First)}, {Printable.Word(rows[i].Second)})";
            // Both halves still there: the trainer cut the name at the marker, as a tokenizer that keeps only letters
            // and digits does (sensesplit embed among them).
            if (mergedIndex.ContainsKey(rows[i].First) && mergedIndex.ContainsKey(rows[i].Second))
                throw new UserFacingException($"{where}, but it has both '{Printable.Word(rows[i].First)}' and '{Printable.Word(rows[i].Second)}': the trainer split the pseudo-words at '{PseudoWord.Marker}'. Train with a tool that splits on white space only; for an embedding made by sensesplit embed, use 'sensesplit merge-test --retrain'");
            throw new UserFacingException($"{where}; was it trained on the merged corpus?");
        }
        var pairs = new ChosenPairs(selection, pseudo);
        cancellation.ThrowIfCancellationRequested();

        progress.Stage("aligning the merged embedding");
        var alignment = MergeTestSteps.Align(original, merged, pairs, s.Original, s.Merged, progress);
        var rotated = alignment.Pseudo;
        progress.EndStage(MergeTestSteps.AlignmentLine(alignment));

        var fits = new List<PairFit>(pairs.Pairs.Count);
        for (int i = 0; i < pairs.Pairs.Count; i++)
        {
            var p = pairs.Pairs[i];
            fits.Add(new PairFit(p, MixtureFit.Fit(rotated[i]!, original.Row(p.FrequentIndex), original.Row(p.RareIndex))));
        }

        var run = MergeTestSteps.RunBase("score");
        run["original"] = Path.GetFullPath(s.Original);
        run["merged"] = Path.GetFullPath(s.Merged);
        run["pairs_file"] = Path.GetFullPath(s.Pairs);
        run["counts"] = Path.GetFullPath(s.Counts);
        run["dimensions"] = original.Dimensions;
        run["vectors_normalised"] = false;
        var notes = new List<string>(selection.Notes);
        MergeTestSteps.Describe(alignment, "merged onto original", run);
        return MergeTestSteps.Finish(context, progress, s.Out, fits, pseudo, s.Selection with { Pairs = rows.Count },
            s.Thresholds, run, notes, alignment.MedianCosineShared);
    }
}
