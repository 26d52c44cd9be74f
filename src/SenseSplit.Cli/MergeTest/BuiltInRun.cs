using System.Globalization;
using SenseSplit.Cli.Commands;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.Senses.MergeTest;
using SenseSplit.Core.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.MergeTest;

/// <summary>What the built-in <c>merge-test</c> was asked to do.</summary>
internal sealed record BuiltInSettings
{
    public string[] Corpus { get; init; } = [];
    public string Out { get; init; } = "";
    public string? Embedding { get; init; }
    public bool Retrain { get; init; }
    public string? PairsFile { get; init; }
    public int Threads { get; init; }
    public string? TempDir { get; init; }
    public PairSelectionSettings Selection { get; init; } = new();
    public VerdictThresholds Thresholds { get; init; } = new();
}

/// <summary>
/// The built-in merge test on an embedding made by <c>sensesplit embed</c>: pairs are chosen from its vectors, and
/// each pseudo-word's vector is got either by folding its merged co-occurrence row into the stored basis (default),
/// or by re-embedding the whole merged corpus with the embed pipeline and the same settings (<c>--retrain</c>),
/// rotated onto the original by orthogonal Procrustes. Both count, weight and factorise exactly as embed did: the
/// tokenizer, window, line handling, phrase joining, PPMI smoothing and shift and eigenvalue weight come from the
/// embedding's manifest.
/// </summary>
internal static class BuiltInRun
{
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public static int Run(CliContext context, BuiltInSettings s, ProgressDisplay progress, Func<Stream> standardInput, CancellationToken cancellation)
    {
        MergeTestSteps.CheckSelection(s.Selection);
        MergeTestSteps.CheckThresholds(s.Thresholds);
        if (s.Threads < 0) throw new UserFacingException($"--threads ({s.Threads.ToString(C)}) must not be negative (0 uses every core)", ExitCodes.Usage);
        if (s.Corpus.Length == 0) throw new UserFacingException("merge-test: name the corpus with --corpus FILE... (or use 'merge-test score' / 'merge-test prepare')", ExitCodes.Usage);
        if (string.IsNullOrWhiteSpace(s.Out)) throw new UserFacingException("merge-test: --out DIR is required", ExitCodes.Usage);
        string temp = Path.Combine(s.TempDir ?? Path.GetTempPath(), $"sensesplit-merge-{Environment.ProcessId}-{Guid.NewGuid():N}");
        try
        {
            var corpus = CorpusSource.Resolve(s.Corpus, standardInput, Path.Combine(temp, "stdin"));
            string embeddingDir = s.Embedding ?? Path.Combine(s.Out, "embedding");
            if (s.Embedding is null)
            {
                if (File.Exists(Path.Combine(embeddingDir, "manifest.json")))
                    progress.Message($"using the embedding in {embeddingDir} (made by an earlier run; delete it to embed again)");
                else
                {
                    progress.Message($"no --embedding given: embedding the corpus into {embeddingDir} with embed's default settings");
                    int code = EmbedCommand.Run(context, new EmbedCommand.EmbedSettings
                    {
                        Inputs = corpus.Select(c => c.Path).ToArray(), Output = embeddingDir, Threads = s.Threads, TempDir = s.TempDir,
                    });
                    if (code != ExitCodes.Ok) return code;
                }
            }

            progress.Stage("reading the embedding");
            var folder = EmbedFolder.Load(embeddingDir, progress.Warn, cancellation);
            string manifestPath = Path.Combine(embeddingDir, "manifest.json");
            CorpusPass.CheckSameAsEmbedded(corpus, null, folder.Inputs, manifestPath);
            var vectors = folder.Vectors;
            progress.EndStage($"{vectors.Count.ToString(C)} words, {vectors.Dimensions.ToString(C)} dimensions");
            cancellation.ThrowIfCancellationRequested();

            progress.Stage(s.PairsFile is null ? "choosing pairs" : "checking pairs");
            string vectorsPath = folder.FilePath("vectors", "vectors.txt");
            var pairs = MergeTestSteps.Choose(vectors, folder.Counts, s.Selection, vectorsPath, s.PairsFile, MergeTestSteps.Unmergeable(vectors.Words));
            var run = MergeTestSteps.RunBase(s.Retrain ? "retrain" : "fold-in");
            progress.EndStage(s.PairsFile is null ? MergeTestSteps.ChoiceLine(pairs, s.Selection, run) : $"{pairs.Pairs.Count.ToString(C)} pairs");
            cancellation.ThrowIfCancellationRequested();

            run["embedding"] = Path.GetFullPath(embeddingDir);
            run["corpus"] = corpus.Select(c => c.Name).ToArray();
            run["dimensions"] = vectors.Dimensions;
            run["vectors_normalised"] = false;
            var notes = new List<string>(pairs.Selection.Notes);
            List<PairFit> fits;
            string[] pseudo;
            double floor = double.NaN; // fold-in changes no other word: no noise floor, the absolute cosine rule applies
            if (s.Retrain)
                (fits, pseudo, floor) = Retrain(folder, corpus, pairs, s, temp, manifestPath, run, notes, progress, context.Err, cancellation);
            else
                (fits, pseudo) = FoldInPairs(folder, corpus, pairs, manifestPath, run, notes, progress, context.Err, cancellation);
            return MergeTestSteps.Finish(context, progress, s.Out, fits, pseudo, s.Selection with { Pairs = pairs.Pairs.Count }, s.Thresholds, run, notes, floor);
        }
        finally
        {
            try { if (Directory.Exists(temp)) Directory.Delete(temp, recursive: true); }
            catch (IOException) { }
        }
    }

    /// <summary>
    /// Fold-in: one pass collects the co-occurrence rows of w1 and w2 of every pair (embed's window and weighting);
    /// the pseudo-word's row is their sum. Each of the three rows is weighted with PPMI against the stored context
    /// totals and projected onto the stored basis, v = PPMI(row) · V · Σ^(p−1). The merged vector is fitted against
    /// the fold-ins of w1's and w2's own rows rather than their stored vectors, so that the fit compares like with
    /// like (the randomized SVD's U Σ and A V agree only approximately); how close those fold-ins come to the stored
    /// vectors is reported.
    /// </summary>
    private static (List<PairFit>, string[]) FoldInPairs(EmbedFolder folder, List<CorpusInput> corpus, ChosenPairs pairs, string manifestPath,
        Dictionary<string, object?> run, List<string> notes, ProgressDisplay progress, TextWriter err, CancellationToken cancellation)
    {
        var settings = folder.Settings;
        var vectors = folder.Vectors;
        int words = vectors.Count;
        var table = new WordTable();
        foreach (var w in vectors.Words) table.GetOrAdd(w);
        var phrases = Phrases(folder, table, progress);
        var tableToWord = new int[table.Count];
        for (int i = 0; i < tableToWord.Length; i++) tableToWord[i] = i < words ? i : -1;
        var targets = new List<int>(pairs.Pairs.Count * 2);
        foreach (var p in pairs.Pairs) { targets.Add(p.FrequentIndex); targets.Add(p.RareIndex); }
        var rows = new TargetRowCounter(words, targets, settings.Window, settings.WindowAcrossLines);
        var mapper = new TokenIdMapper(table, tableToWord, phrases is null ? null : new PhraseJoiner(phrases), rows);
        var hashes = CorpusPass.Run(corpus, settings.Tokenizer, mapper, err, "counting the pairs' contexts", () => rows.Tokens, cancellation);
        CorpusPass.CheckSameAsEmbedded(corpus, hashes, folder.Inputs, manifestPath);

        progress.Stage("folding in");
        var data = folder.LoadFoldIn();
        // Occurrences must equal counts.tsv exactly, and row totals the stored context totals: else the counting
        // differs from embed's (e.g. phrases joined differently) and the note says by how much.
        int offCount = 0;
        double worst = 0;
        string? worstWord = null;
        for (int t = 0; t < targets.Count; t++)
        {
            int id = targets[t];
            double stored = data.ContextTotals[id], mine = rows.RowTotal(t);
            double rel = stored > 0 ? Math.Abs(mine - stored) / stored : (mine == 0 ? 0 : 1);
            if (rows.Occurrences(t) != folder.Counts[id] || rel > 1e-5)
            {
                offCount++;
                if (rel >= worst) { worst = rel; worstWord = vectors.Words[id]; }
            }
        }
        if (offCount > 0)
        {
            string message = $"{offCount.ToString(C)} of {targets.Count.ToString(C)} pair words were counted differently from the embedding (largest relative difference of a row total {worst.ToString("G3", C)}, '{worstWord}'); the fold-in is approximate";
            progress.Warn(message);
            notes.Add(message);
        }

        // Dimensions with σ = 0 (numerical rank below the requested dimensions) hold zero in every stored vector; fold into the others.
        int rank = 0;
        while (rank < data.SingularValues.Length && data.SingularValues[rank] > 0) rank++;
        if (rank == 0) throw new UserFacingException($"{folder.FilePath("singularValues", "singular-values.npy")}: every singular value is zero");
        int dims = vectors.Dimensions;
        float[] basis = data.Basis;
        if (rank < dims)
        {
            basis = new float[(long)words * rank];
            for (int i = 0; i < words; i++) data.Basis.AsSpan(i * dims, rank).CopyTo(basis.AsSpan(i * rank, rank));
            notes.Add($"fold-in uses the first {rank.ToString(C)} of {dims.ToString(C)} dimensions (the others have singular value 0)");
        }
        var sigma = new float[rank];
        for (int j = 0; j < rank; j++) sigma[j] = (float)data.SingularValues[j];
        if (!(data.PairTotal > 0)) throw new UserFacingException($"{manifestPath}: pairTotal ({data.PairTotal.ToString("R", C)}) must be positive");
        var fold = new FoldIn(basis, words, rank, sigma, settings.EigenWeight);
        var weighting = new PpmiWeighting(data.ContextTotals, data.PairTotal, settings.ContextSmoothing, settings.Neg);

        float[] Vector(int[] contexts, double[] counts, double total)
        {
            if (total <= 0) return new float[rank]; // no co-occurrence at all: a zero vector, reported as a degenerate fit
            try { return fold.Word(contexts, counts, total, weighting); }
            catch (ArgumentException e) { throw new UserFacingException($"fold-in failed: {e.Message}; the corpus does not match {manifestPath}"); }
        }

        var fits = new List<PairFit>(pairs.Pairs.Count);
        var ownCosines = new List<double>();
        for (int i = 0; i < pairs.Pairs.Count; i++)
        {
            var p = pairs.Pairs[i];
            var (c1, x1) = rows.Row(2 * i);
            var (c2, x2) = rows.Row(2 * i + 1);
            double t1 = rows.RowTotal(2 * i), t2 = rows.RowTotal(2 * i + 1);
            var v1 = Vector(c1, x1, t1);
            var v2 = Vector(c2, x2, t2);
            var merged = Vector([.. c1, .. c2], [.. x1, .. x2], t1 + t2);
            fits.Add(new PairFit(p, MixtureFit.Fit(merged, v1, v2)));
            ownCosines.Add(MergeTestSteps.Cosine(v1, vectors.Row(p.FrequentIndex)[..rank]));
            ownCosines.Add(MergeTestSteps.Cosine(v2, vectors.Row(p.RareIndex)[..rank]));
            if ((i & 15) == 0) cancellation.ThrowIfCancellationRequested();
        }
        double ownMedian = WeightLaws.Median(ownCosines.Where(double.IsFinite));
        progress.EndStage($"{pairs.Pairs.Count.ToString(C)} pseudo-words; fold-ins of the pair words' own rows have median cosine {ownMedian.ToString("F4", C)} to their stored vectors");
        run["fold_in_dimensions"] = rank;
        run["fold_in_own_row_median_cosine"] = double.IsFinite(ownMedian) ? ownMedian : null;
        run["fit_against"] = "fold-ins of w1's and w2's own rows";
        run["context_smoothing"] = settings.ContextSmoothing;
        run["neg"] = settings.Neg;
        run["eigen_weight"] = settings.EigenWeight;
        run["window"] = settings.Window;
        run["words_counted_differently"] = offCount;
        return (fits, pairs.PseudoWords);
    }

    /// <summary>
    /// Full re-embedding of the merged corpus: the embed pipeline (vocabulary pass, co-occurrence counting, PPMI,
    /// randomized SVD, U·Σ^p) with the embedding's settings on the token stream in which w1 and w2 of every pair are
    /// replaced by the pseudo-word; then orthogonal Procrustes onto the original vectors on the untouched shared words,
    /// and the fit of each rotated pseudo-word against the stored v1 and v2. Also returns the noise floor, the median
    /// cosine of the untouched words to their stored vectors after the rotation, which the verdict judges against.
    /// </summary>
    private static (List<PairFit>, string[], double NoiseFloor) Retrain(EmbedFolder folder, List<CorpusInput> corpus, ChosenPairs pairs, BuiltInSettings s,
        string temp, string manifestPath, Dictionary<string, object?> run, List<string> notes, ProgressDisplay progress, TextWriter err,
        CancellationToken cancellation)
    {
        var settings = folder.Settings;
        var original = folder.Vectors;
        int threads = s.Threads > 0 ? s.Threads : Environment.ProcessorCount;
        var triples = pairs.Triples();

        var table = new WordTable();
        var phrases = Phrases(folder, table, progress);
        var counter1 = new VocabularyCounter(table, phrases is null ? null : new PhraseJoiner(phrases));
        var merger1 = new TokenMerger<VocabularyCounter>(triples, counter1);
        var hashes = CorpusPass.Run(corpus, settings.Tokenizer, merger1, err, "re-embedding, pass 1 (vocabulary)", () => counter1.Tokens, cancellation);
        CorpusPass.CheckSameAsEmbedded(corpus, hashes, folder.Inputs, manifestPath);
        var vocab = Vocabulary.Select(table, settings.MinCount, settings.MaxWords);
        int dims = Math.Min(original.Dimensions, vocab.Count);
        if (dims < original.Dimensions)
            throw new UserFacingException($"the merged corpus keeps only {vocab.Count.ToString(C)} words, fewer than the embedding's {original.Dimensions.ToString(C)} dimensions");

        WordVectors merged;
        using (var store = new DiskRunStore(Path.Combine(temp, "runs")))
        {
            CooccurrenceCounts counts;
            using (var counter = new CooccurrenceCounter(vocab.Count, new CooccurrenceOptions
            {
                Window = settings.Window, WindowAcrossLines = settings.WindowAcrossLines, Threads = threads, MemoryBytes = settings.MemoryBytes,
            }, store))
            {
                var mapper = new TokenIdMapper(table, vocab.TableIdToWordId, phrases is null ? null : new PhraseJoiner(phrases), counter);
                var merger2 = new TokenMerger<TokenIdMapper>(triples, mapper);
                var hashes2 = CorpusPass.Run(corpus, settings.Tokenizer, merger2, err, "re-embedding, pass 2 (co-occurrences)", () => counter.Tokens, cancellation);
                for (int i = 0; i < corpus.Count; i++)
                    if (hashes[i] != hashes2[i]) throw new UserFacingException($"input {corpus[i].Name} changed while it was being read (SHA-256 differs between passes)");
                counts = counter.Complete();
            }
            cancellation.ThrowIfCancellationRequested();
            progress.Stage("re-embedding: PPMI and SVD");
            var ppmi = Ppmi.Compute(counts, new PpmiOptions { ContextSmoothing = settings.ContextSmoothing, Shift = settings.Neg });
            counts = null!;
            if (ppmi.Matrix.NonZeros == 0) throw new UserFacingException("the merged corpus has no word pair with positive PMI");
            var svd = RandomizedSvd.Compute(ppmi.Matrix, dims, new RandomizedSvdOptions
            {
                Oversample = settings.Oversample, PowerIterations = settings.PowerIterations, Seed = settings.Seed, Threads = threads,
            }, ppmi.Transposed, new Progress<string>(m => progress.Message($"SVD: {m}")));
            // Word vectors U·Σ^p, as embed writes them.
            var values = new float[(long)vocab.Count * dims];
            for (int j = 0; j < dims; j++)
            {
                float w = svd.SingularValues[j] > 0 ? (float)Math.Pow(svd.SingularValues[j], settings.EigenWeight) : 0f;
                for (int i = 0; i < vocab.Count; i++) values[(long)i * dims + j] = svd.U[(long)i * dims + j] * w;
            }
            merged = new WordVectors(vocab.Words, values, dims);
            progress.EndStage($"{vocab.Count.ToString(C)} words, numerical rank {svd.Rank.ToString(C)}");
        }
        cancellation.ThrowIfCancellationRequested();

        progress.Stage("aligning the re-embedding");
        var alignment = MergeTestSteps.Align(original, merged, pairs, VectorsPath(folder), "the re-embedding of the merged corpus", progress);
        var rotated = alignment.Pseudo;
        progress.EndStage(MergeTestSteps.AlignmentLine(alignment));

        var fits = new List<PairFit>();
        var pseudo = new List<string>();
        for (int i = 0; i < pairs.Pairs.Count; i++)
        {
            var p = pairs.Pairs[i];
            if (rotated[i] is not { } v)
            {
                notes.Add($"pair ({p.FrequentWord}, {p.RareWord}): the pseudo-word {pairs.PseudoWords[i]} did not make the re-embedding's vocabulary; pair left out");
                continue;
            }
            fits.Add(new PairFit(p, MixtureFit.Fit(v, original.Row(p.FrequentIndex), original.Row(p.RareIndex))));
            pseudo.Add(pairs.PseudoWords[i]);
        }
        if (fits.Count == 0) throw new UserFacingException("no pseudo-word made the re-embedding's vocabulary");
        run["fit_against"] = "stored vectors of w1 and w2";
        run["retrain_words"] = vocab.Count;
        MergeTestSteps.Describe(alignment, "re-embedding onto original", run);
        run["context_smoothing"] = settings.ContextSmoothing;
        run["neg"] = settings.Neg;
        run["eigen_weight"] = settings.EigenWeight;
        run["window"] = settings.Window;
        run["svd_seed"] = settings.Seed;
        return (fits, pseudo.ToArray(), alignment.MedianCosineShared);
    }

    private static string VectorsPath(EmbedFolder folder) => folder.FilePath("vectors", "vectors.txt");

    /// <summary>
    /// The phrases embed joined, added to <paramref name="table"/>: the phrase list named in the manifest when that file
    /// is still there (tokenized as embed tokenized it), else the joined words of the vocabulary (words with '_'),
    /// which misses phrases that did not make the vocabulary (a warning says so). Null when embed joined none.
    /// </summary>
    private static PhraseSet? Phrases(EmbedFolder folder, WordTable table, ProgressDisplay progress)
    {
        var settings = folder.Settings;
        if (!settings.Phrases && settings.PhraseList.Length == 0) return null;
        var set = new PhraseSet();
        if (settings.PhraseList.Length > 0 && File.Exists(settings.PhraseList))
        {
            var words = new PhraseWords();
            foreach (var line in File.ReadLines(settings.PhraseList))
            {
                if (string.IsNullOrWhiteSpace(line) || line.TrimStart().StartsWith('#')) continue;
                words.Words.Clear();
                new TokenScanner(settings.Tokenizer).Scan(line.AsSpan(), true, words);
                if (words.Words.Count < 2) continue;
                set.Add(table, words.Words.Select(w => table.GetOrAdd(w)).ToArray());
            }
        }
        else
        {
            foreach (var w in folder.Vectors.Words)
            {
                if (!w.Contains(PhraseSet.Joiner)) continue;
                var parts = w.Split(PhraseSet.Joiner);
                if (parts.Length < 2 || parts.Any(p => p.Length == 0)) continue;
                set.Add(table, parts.Select(part => table.GetOrAdd(part)).ToArray());
            }
            progress.Warn(settings.Phrases
                ? "the embedding joined phrases chosen by NPMI; only those in its vocabulary can be joined again, so counts near the others may differ slightly"
                : $"phrase list {settings.PhraseList} is gone; joining only the phrases in the embedding's vocabulary");
        }
        return set.Count == 0 ? null : set;
    }

    private sealed class PhraseWords : ITokenSink
    {
        public readonly List<string> Words = new();
        public void Token(ReadOnlySpan<char> token) => Words.Add(token.ToString());
        public void LineBreak() { }
        public void ParagraphBreak() { }
    }
}
