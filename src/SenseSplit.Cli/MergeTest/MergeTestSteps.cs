using System.Globalization;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses.MergeTest;
using SenseSplit.Core.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.MergeTest;

/// <summary>The pairs of one merge-test run: the selection (pairs with counts, bins, notes) and each pair's pseudo-word.</summary>
internal sealed record ChosenPairs(PairSelection Selection, string[] PseudoWords)
{
    public IReadOnlyList<MergePair> Pairs => Selection.Pairs;

    /// <summary>(w1, w2, pseudo) per pair, as <see cref="TokenMerger{TSink}"/> takes them.</summary>
    public List<(string First, string Second, string Pseudo)> Triples()
        => Pairs.Select((p, i) => (p.FrequentWord, p.RareWord, PseudoWords[i])).ToList();
}

/// <summary>The result of rotating one embedding onto another: each pseudo-word's rotated vector (null where missing),
/// the Procrustes fit, the words it rests on, and the median cosine of those words to themselves after rotation.</summary>
internal sealed record Alignment(float[]?[] Pseudo, ProcrustesResult Fit, int SharedWords, double MedianCosineShared);

/// <summary>Steps shared by the three ways of running the merge test: choosing or checking pairs, aligning two
/// embeddings, fitting, judging and writing the report.</summary>
internal static class MergeTestSteps
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    /// <summary>Words never put into a pair: the number token, joined phrases and the words phrases are made of
    /// (merging inside a phrase would change how the text is joined), and anything that already looks like a pseudo-word.</summary>
    public static HashSet<string> Unmergeable(IEnumerable<string> vocabulary)
    {
        var set = new HashSet<string>(StringComparer.Ordinal) { TokenScanner.NumberToken };
        foreach (var w in vocabulary)
        {
            if (w.Contains(PhraseSet.Joiner))
            {
                set.Add(w);
                foreach (var part in w.Split(PhraseSet.Joiner)) if (part.Length > 0) set.Add(part);
            }
            if (PseudoWord.IsPseudoWord(w)) set.Add(w);
        }
        return set;
    }

    /// <summary>What the pair choice left out, for the progress line, and the same in <paramref name="run"/>.</summary>
    public static string ChoiceLine(ChosenPairs pairs, PairSelectionSettings settings, Dictionary<string, object?>? run)
    {
        var s = pairs.Selection;
        if (run is not null)
        {
            run["skipped_function_words"] = s.SkippedFrequent;
            run["skipped_not_plain_words"] = s.SkippedNotPlain;
            run["most_frequent_pairable_count"] = s.MostFrequentPairable;
        }
        return $"{pairs.Pairs.Count.ToString(C)} pairs; skipped the {s.SkippedFrequent.ToString(C)} most frequent words (function words, --skip-frequent {settings.SkipMostFrequent.ToString(C)}) and {s.SkippedNotPlain.ToString(C)} tokens without letters or with digits; the most frequent pairable word occurs {s.MostFrequentPairable.ToString(C)} times";
    }

    /// <summary>Chooses pairs with <see cref="PairSelector.Select"/>, or checks the pairs of a pairs file; names the
    /// pseudo-words (the file's, or w1⊕w2 made unique against the vocabulary).</summary>
    public static ChosenPairs Choose(WordVectors vectors, long[] counts, PairSelectionSettings settings, string vectorsPath,
        string? pairsPath, ISet<string> unmergeable)
    {
        var selector = new PairSelector(vectors.Words, vectors.Values, vectors.Dimensions, counts);
        var known = new HashSet<string>(vectors.Words, StringComparer.Ordinal);
        if (pairsPath is null)
        {
            var selection = selector.Select(settings with { Excluded = unmergeable.ToHashSet(StringComparer.Ordinal) });
            if (selection.Pairs.Count == 0)
                throw new UserFacingException($"{vectorsPath}: no pair of words could be chosen among {selection.EligibleWords.ToString(C)} words with count >= {settings.MinRareCount.ToString(C)} after skipping the {selection.SkippedFrequent.ToString(C)} most frequent words and {selection.SkippedNotPlain.ToString(C)} tokens without letters or with digits (lower --min-rare-count or --skip-frequent, or name pairs with --pairs-file)");
            var names = selection.Pairs.Select(p => PseudoWord.Choose(p.FrequentWord, p.RareWord, known.Contains)).ToArray();
            return new ChosenPairs(selection, names);
        }
        var rows = MergePairsFile.Read(pairsPath);
        foreach (var row in rows)
            foreach (var w in new[] { row.First, row.Second })
            {
                if (!known.Contains(w)) throw new UserFacingException($"{pairsPath}: line {row.Line.ToString(C)}: '{Printable.Word(w)}' is not a word of {vectorsPath}");
                if (unmergeable.Contains(w)) throw new UserFacingException($"{pairsPath}: line {row.Line.ToString(C)}: '{Printable.Word(w)}' cannot be merged (the number token, a joined phrase or a word inside one)");
            }
        var user = FromUser(selector, rows, pairsPath, settings);
        return new ChosenPairs(user, PseudoNames(user, rows, pairsPath, w => known.Contains(w), choose: true));
    }

    /// <summary><see cref="PairSelector.FromUser"/> with its errors turned into messages naming the pairs file.</summary>
    public static PairSelection FromUser(PairSelector selector, List<MergePairsRow> rows, string pairsPath, PairSelectionSettings settings)
    {
        try { return selector.FromUser(rows.Select(r => (r.First, r.Second)).ToList(), settings with { Pairs = rows.Count }); }
        catch (ArgumentException e)
        {
            // Messages start "pair N (a, b): ..."; N is the N-th data row.
            string message = e.Message;
            int space = message.IndexOf(' ', 5);
            if (message.StartsWith("pair ", StringComparison.Ordinal) && space > 5 && int.TryParse(message.AsSpan(5, space - 5), NumberStyles.None, C, out int n) && n >= 1 && n <= rows.Count)
                message = $"line {rows[n - 1].Line.ToString(C)}: {message}";
            throw new UserFacingException($"{pairsPath}: {message}");
        }
    }

    /// <summary>Pseudo-words for user pairs: the file's <c>pseudo</c> column, else w1⊕w2 (made unique against
    /// <paramref name="isKnown"/> when <paramref name="choose"/>). A given name must not be a word or contain white space.</summary>
    public static string[] PseudoNames(PairSelection selection, List<MergePairsRow> rows, string pairsPath, Func<string, bool> isKnown, bool choose)
    {
        var names = new string[rows.Count];
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        for (int i = 0; i < rows.Count; i++)
        {
            var p = selection.Pairs[i];
            string name;
            if (rows[i].Pseudo is { } given)
            {
                if (given.Any(char.IsWhiteSpace)) throw new UserFacingException($"{pairsPath}: line {rows[i].Line.ToString(C)}: pseudo-word '{Printable.Word(given)}' contains white space");
                if (choose && isKnown(given)) throw new UserFacingException($"{pairsPath}: line {rows[i].Line.ToString(C)}: pseudo-word '{Printable.Word(given)}' is already a word of the vocabulary");
                name = given;
            }
            else name = choose ? PseudoWord.Choose(p.FrequentWord, p.RareWord, isKnown) : PseudoWord.Compose(p.FrequentWord, p.RareWord);
            if (!seen.TryAdd(name, i)) throw new UserFacingException($"{pairsPath}: line {rows[i].Line.ToString(C)}: pseudo-word '{Printable.Word(name)}' is also the pseudo-word on line {rows[seen[name]].Line.ToString(C)}");
            names[i] = name;
        }
        return names;
    }

    /// <summary>
    /// Rotates <paramref name="merged"/> onto <paramref name="original"/> by orthogonal Procrustes on the words both
    /// hold that the merge did not touch (neither word of a pair, nor a pseudo-word), and returns the rotated vector of
    /// every pseudo-word (null where the merged embedding has none) with the fit.
    /// </summary>
    public static Alignment Align(WordVectors original, WordVectors merged,
        ChosenPairs pairs, string originalName, string mergedName, ProgressDisplay progress)
    {
        int dims = original.Dimensions;
        if (merged.Dimensions != dims)
            throw new UserFacingException($"{mergedName}: has {merged.Dimensions.ToString(C)} dimensions but {originalName} has {dims.ToString(C)}; both embeddings need the same dimensions");
        var touched = new HashSet<string>(StringComparer.Ordinal);
        foreach (var p in pairs.Pairs) { touched.Add(p.FrequentWord); touched.Add(p.RareWord); }
        foreach (var name in pairs.PseudoWords) touched.Add(name);
        var mergedIndex = Index(merged.Words);
        var shared = new List<(int Original, int Merged)>();
        for (int i = 0; i < original.Count; i++)
            if (!touched.Contains(original.Words[i]) && mergedIndex.TryGetValue(original.Words[i], out int m)) shared.Add((i, m));
        var leftOver = pairs.Pairs.SelectMany(p => new[] { p.FrequentWord, p.RareWord }).Where(mergedIndex.ContainsKey).ToList();
        if (leftOver.Count > 0)
            progress.Warn($"{mergedName}: still holds {leftOver.Count.ToString(C)} words that should have been merged away (first: '{Printable.Word(leftOver[0])}'); was it trained on the merged corpus? They are left out of the alignment");
        if (shared.Count < dims)
            throw new UserFacingException($"{mergedName}: shares only {shared.Count.ToString(C)} untouched words with {originalName}; aligning {dims.ToString(C)} dimensions needs at least {dims.ToString(C)}");
        var source = new float[(long)shared.Count * dims];
        var target = new float[(long)shared.Count * dims];
        for (int k = 0; k < shared.Count; k++)
        {
            merged.Row(shared[k].Merged).CopyTo(source.AsSpan(k * dims, dims));
            original.Row(shared[k].Original).CopyTo(target.AsSpan(k * dims, dims));
        }
        var fit = Procrustes.Fit(source, target, shared.Count, dims);
        // The noise floor: how close the untouched words come to themselves after the rotation.
        var aligned = new float[source.Length];
        Procrustes.Apply(source, shared.Count, fit, aligned);
        var cosines = new double[shared.Count];
        for (int k = 0; k < shared.Count; k++)
            cosines[k] = Cosine(aligned.AsSpan(k * dims, dims), target.AsSpan(k * dims, dims));
        double floor = WeightLaws.Median(cosines.Where(double.IsFinite));
        var rotated = new float[]?[pairs.PseudoWords.Length];
        for (int p = 0; p < rotated.Length; p++)
        {
            if (!mergedIndex.TryGetValue(pairs.PseudoWords[p], out int row)) continue;
            var v = new float[dims];
            Procrustes.Apply(merged.Row(row), 1, fit, v);
            rotated[p] = v;
        }
        return new Alignment(rotated, fit, shared.Count, floor);
    }

    /// <summary>Records what an alignment found in <paramref name="run"/>; its median cosine of untouched words is the
    /// noise floor the verdict judges the cosine to span against (see <see cref="MergeVerdict.Decide"/>).</summary>
    public static void Describe(Alignment a, string what, Dictionary<string, object?> run)
    {
        run["alignment"] = $"orthogonal procrustes, {what}";
        run["alignment_words"] = a.SharedWords;
        run["alignment_residual_before"] = a.Fit.RelativeResidualBefore;
        run["alignment_residual_after"] = a.Fit.RelativeResidual;
        run["alignment_reflection"] = a.Fit.IsReflection;
        run["alignment_median_cosine"] = double.IsFinite(a.MedianCosineShared) ? a.MedianCosineShared : null;
    }

    public static double Cosine(ReadOnlySpan<float> a, ReadOnlySpan<float> b)
    {
        double ab = 0, aa = 0, bb = 0;
        for (int i = 0; i < a.Length; i++) { ab += (double)a[i] * b[i]; aa += (double)a[i] * a[i]; bb += (double)b[i] * b[i]; }
        return aa > 0 && bb > 0 ? ab / Math.Sqrt(aa * bb) : double.NaN;
    }

    public static string AlignmentLine(Alignment a)
        => $"{a.SharedWords.ToString(C)} shared words, relative residual {a.Fit.RelativeResidualBefore.ToString("F3", C)} before, {a.Fit.RelativeResidual.ToString("F3", C)} after; median cosine of untouched words to themselves {a.MedianCosineShared.ToString("F3", C)}";

    public static Dictionary<string, int> Index(string[] words)
    {
        var index = new Dictionary<string, int>(words.Length, StringComparer.Ordinal);
        for (int i = 0; i < words.Length; i++) index.TryAdd(words[i], i);
        return index;
    }

    /// <summary>Analyses the fits, writes pairs.csv, merge-test.json and merge-test.svg into <paramref name="outDir"/>,
    /// prints the summary and the JSON path, and returns the exit code of the verdict.</summary>
    public static int Finish(CliContext context, ProgressDisplay progress, string outDir, IReadOnlyList<PairFit> fits,
        IReadOnlyList<string> pseudoWords, PairSelectionSettings selection, VerdictThresholds thresholds,
        Dictionary<string, object?> run, IEnumerable<string> notes, double noiseFloor = double.NaN)
    {
        progress.Stage("fitting weight laws");
        var outcome = MergeTestAnalysis.Analyse(fits, selection, null, thresholds, notes, noiseFloor);
        progress.EndStage($"{outcome.Laws.PairsUsed.ToString(C)} pairs with weights");
        progress.Stage("writing report");
        MergeTestReport.Write(outDir, outcome, run, pseudoWords);
        progress.EndStage(Path.GetFullPath(outDir));

        var v = outcome.Verdict;
        var laws = outcome.Laws;
        var rows = new List<(string, string)>
        {
            ("verdict", v.Label),
            ("pairs", $"{fits.Count.ToString(C)} ({laws.PairsUsed.ToString(C)} with weights)"),
        };
        if (v.RelativeToFloor)
            rows.Add(("noise floor", $"{Num(v.NoiseFloor, "F3")} (median cosine of untouched words to their old vectors after alignment)"));
        rows.AddRange(
        [

            ("median cosine to span", v.RelativeToFloor
                ? $"{Num(v.MedianCosineToSpan, "F3")} (pass at >= {thresholds.FloorFactor.ToString("G", C)} × noise floor = {Num(v.RequiredCosine, "F3")})"
                : $"{Num(v.MedianCosineToSpan, "F3")} (pass at >= {thresholds.MinMedianCosine.ToString("G", C)})"),
            ($"median r·β/α for r >= {thresholds.HighRatio.ToString("G", C)}", $"{Num(v.MedianExcessHighRatio, "G3")} over {v.PairsHighRatio.ToString(C)} pairs (pass at >= {thresholds.MinExcessFactor.ToString("G", C)})"),
            ($"share with β/α > {laws.Settings.WellAboveFactor.ToString("G", C)}/r", double.IsFinite(laws.ShareWellAbove) ? $"{(100 * laws.ShareWellAbove).ToString("F0", C)}% of pairs (median r·β/α over all pairs {Num(laws.MedianExcessFactor, "G3")})" : "n/a"),
            ("better law (BIC)", laws.BetterLaw is { } law ? WeightLaws.Name(law) : "none"),
            ("c (β/α = 1 − c·log10 r)", $"{Num(laws.C.Estimate, "G3")} [{Num(laws.C.Lower, "G3")}, {Num(laws.C.Upper, "G3")}]"),
            ("γ (β/α = A·r^−γ)", $"{Num(laws.Gamma.Estimate, "G3")} [{Num(laws.Gamma.Lower, "G3")}, {Num(laws.Gamma.Upper, "G3")}]"),
        ]);
        foreach (var reason in v.Reasons) rows.Add(("reason", reason));
        rows.Add(("report", Path.GetFullPath(Path.Combine(outDir, MergeTestReport.SummaryFile))));
        foreach (var note in outcome.Notes.Take(5)) progress.Message($"note: {note}");
        if (outcome.Notes.Count > 5) progress.Message($"note: {(outcome.Notes.Count - 5).ToString(C)} more notes in {MergeTestReport.SummaryFile}");
        progress.Summary($"merge test: {v.Label}", rows);
        context.Out.WriteLine(Path.GetFullPath(Path.Combine(outDir, MergeTestReport.SummaryFile)));
        return v.Pass ? ExitCodes.Ok : ExitCodes.MergeTestFailed;
    }

    /// <summary>The selection and verdict settings a run was given, and the pairs it produced, for <c>run</c> in the JSON.</summary>
    public static Dictionary<string, object?> RunBase(string method)
        => new() { ["method"] = method, ["tool_version"] = typeof(MergeTestSteps).Assembly.GetName().Version?.ToString() ?? "0" };

    public static void CheckThresholds(VerdictThresholds t)
    {
        void Fail(string message) => throw new UserFacingException(message, ExitCodes.Usage);
        if (!(t.MinMedianCosine >= -1 && t.MinMedianCosine <= 1)) Fail($"--min-cosine ({t.MinMedianCosine.ToString(C)}) must lie in [-1, 1]");
        if (!(t.HighRatio >= 1) || !double.IsFinite(t.HighRatio)) Fail($"--high-ratio ({t.HighRatio.ToString(C)}) must be a finite number >= 1");
        if (!(t.MinExcessFactor > 0) || !double.IsFinite(t.MinExcessFactor)) Fail($"--min-excess ({t.MinExcessFactor.ToString(C)}) must be a positive number");
        if (!(t.FloorFactor > 0) || !double.IsFinite(t.FloorFactor)) Fail($"--floor-factor ({t.FloorFactor.ToString(C)}) must be a positive number");
        if (!(t.MinNoiseFloor >= -1 && t.MinNoiseFloor <= 1)) Fail($"--min-floor ({t.MinNoiseFloor.ToString(C)}) must lie in [-1, 1]");
        if (t.MinPairs < 1) Fail($"--min-pairs ({t.MinPairs.ToString(C)}) must be at least 1");
    }

    public static void CheckSelection(PairSelectionSettings s)
    {
        void Fail(string message) => throw new UserFacingException(message, ExitCodes.Usage);
        if (s.Pairs < 1) Fail($"--pairs ({s.Pairs.ToString(C)}) must be at least 1");
        if (s.MinRareCount < 1) Fail($"--min-rare-count ({s.MinRareCount.ToString(C)}) must be at least 1");
        if (!(s.MaxRatio > 1) || !double.IsFinite(s.MaxRatio)) Fail($"--max-ratio ({s.MaxRatio.ToString(C)}) must be a finite number above 1");
        if (s.SkipMostFrequent < 0) Fail($"--skip-frequent ({s.SkipMostFrequent.ToString(C)}) must not be negative (0 skips none)");
    }

    private static string Num(double x, string format) => double.IsFinite(x) ? x.ToString(format, C) : "n/a";
}
