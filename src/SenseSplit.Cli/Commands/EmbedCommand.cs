using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using System.Reflection;
using System.Text.Json;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit embed</c>: train word vectors from a raw corpus: co-occurrence counts, PPMI, truncated randomized SVD.</summary>
public static class EmbedCommand
{
    /// <summary>Where "-" reads from; tests replace it.</summary>
    internal static Func<Stream> StandardInput { get; set; } = Console.OpenStandardInput;

    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public static Command Create(CliContext context)
    {
        var inputs = new Argument<string[]>("inputs") { Description = "Corpus files (UTF-8 text, or gzip), folders (searched for *.txt and *.txt.gz) or '-' for standard input.", Arity = ArgumentArity.OneOrMore };
        var output = new Option<string>("--out") { Description = "Output folder (must not exist unless --overwrite).", Required = true };
        var overwrite = new Option<bool>("--overwrite") { Description = "Replace an existing output folder." };
        var minCount = new Option<int>("--min-count") { Description = "Keep words seen at least this often.", DefaultValueFactory = _ => 5 };
        var maxWords = new Option<int>("--max-words") { Description = "Keep at most this many words (the most frequent).", DefaultValueFactory = _ => 100_000 };
        var keepCase = new Option<bool>("--keep-case") { Description = "Do not lower-case letters." };
        var foldNumbers = new Option<bool>("--fold-numbers") { Description = $"Replace every number by the token {TokenScanner.NumberToken}." };
        var window = new Option<int>("--window") { Description = "Context words on each side (weights 1/distance).", DefaultValueFactory = _ => 5 };
        var acrossLines = new Option<bool>("--window-across-lines") { Description = "Let windows run across line ends within a paragraph (a blank line always ends them)." };
        var phrases = new Option<bool>("--phrases") { Description = "Join frequent two-word collocations (NPMI) into single tokens joined with '_'." };
        var phraseThreshold = new Option<double>("--phrase-threshold") { Description = "Least NPMI (-1..1) of a joined pair.", DefaultValueFactory = _ => 0.5 };
        var phraseMinCount = new Option<int>("--phrase-min-count") { Description = "Least count of a joined pair.", DefaultValueFactory = _ => 10 };
        var phraseList = new Option<string?>("--phrase-list") { Description = "File of phrases to join (one per line, words separated by spaces); greedy longest match." };
        var smoothing = new Option<double>("--context-smoothing") { Description = "Exponent α of the smoothed context distribution (1 = none).", DefaultValueFactory = _ => 0.75 };
        var neg = new Option<double>("--neg") { Description = "Shift PMI by -ln(neg) before clipping at zero (1 = no shift).", DefaultValueFactory = _ => 1.0 };
        var dim = new Option<int>("--dim") { Description = "Dimensions of the word vectors.", DefaultValueFactory = _ => 300 };
        var oversample = new Option<int>("--oversample") { Description = "Extra random directions in the SVD sketch.", DefaultValueFactory = _ => 10 };
        var powerIterations = new Option<int>("--power-iterations") { Description = "Power iterations of the randomized SVD.", DefaultValueFactory = _ => 4 };
        var eigenWeight = new Option<double>("--eigen-weight") { Description = "Word vectors are U·Σ^p; this is p.", DefaultValueFactory = _ => 0.5 };
        var memory = new Option<string>("--memory")
        {
            Description = "Memory budget (e.g. 512M, 4G). A quarter bounds the word table of pass 1 (pruned by lossy counting past it, "
                + "then the kept words are counted again), half the pair counts (sorted runs go to temporary files past it). "
                + "Not covered: the merged counts (8 bytes per stored pair), the PPMI matrix and its transpose (16 bytes per "
                + "positive entry) and the SVD's arrays, 4·V·(2·(dim + oversample) + 2·dim) bytes for V words.",
            DefaultValueFactory = _ => "4G",
        };
        var tempDir = new Option<string?>("--temp-dir") { Description = "Folder for temporary files (default: the system's)." };
        var threads = new Option<int>("--threads") { Description = "Worker threads (0 = all cores). Results do not depend on it.", DefaultValueFactory = _ => 0 };
        var seed = new Option<int>("--seed") { Description = "Seed of the randomized SVD.", DefaultValueFactory = _ => 1 };

        var command = new Command("embed", "Train word vectors from a raw corpus: co-occurrence counts, PPMI, truncated randomized SVD.");
        command.Arguments.Add(inputs);
        foreach (var o in new Option[] { output, overwrite, minCount, maxWords, keepCase, foldNumbers, window, acrossLines, phrases, phraseThreshold,
                     phraseMinCount, phraseList, smoothing, neg, dim, oversample, powerIterations, eigenWeight, memory, tempDir, threads, seed })
            command.Options.Add(o);
        command.SetAction(parse =>
        {
            var settings = new EmbedSettings
            {
                Inputs = parse.GetValue(inputs) ?? [],
                Output = parse.GetValue(output)!,
                Overwrite = parse.GetValue(overwrite),
                MinCount = parse.GetValue(minCount),
                MaxWords = parse.GetValue(maxWords),
                KeepCase = parse.GetValue(keepCase),
                FoldNumbers = parse.GetValue(foldNumbers),
                Window = parse.GetValue(window),
                WindowAcrossLines = parse.GetValue(acrossLines),
                Phrases = parse.GetValue(phrases),
                PhraseThreshold = parse.GetValue(phraseThreshold),
                PhraseMinCount = parse.GetValue(phraseMinCount),
                PhraseList = parse.GetValue(phraseList),
                ContextSmoothing = parse.GetValue(smoothing),
                Neg = parse.GetValue(neg),
                Dimensions = parse.GetValue(dim),
                Oversample = parse.GetValue(oversample),
                PowerIterations = parse.GetValue(powerIterations),
                EigenWeight = parse.GetValue(eigenWeight),
                MemoryBytes = ParseSize(parse.GetValue(memory)!, "--memory"),
                TempDir = parse.GetValue(tempDir),
                Threads = parse.GetValue(threads),
                Seed = parse.GetValue(seed),
            };
            return Run(context, settings);
        });
        return command;
    }

    /// <summary>Everything embed was asked to do.</summary>
    internal sealed record EmbedSettings
    {
        public string[] Inputs { get; init; } = [];
        public string Output { get; init; } = "";
        public bool Overwrite { get; init; }
        public int MinCount { get; init; } = 5;
        public int MaxWords { get; init; } = 100_000;
        public bool KeepCase { get; init; }
        public bool FoldNumbers { get; init; }
        public int Window { get; init; } = 5;
        public bool WindowAcrossLines { get; init; }
        public bool Phrases { get; init; }
        public double PhraseThreshold { get; init; } = 0.5;
        public int PhraseMinCount { get; init; } = 10;
        public string? PhraseList { get; init; }
        public double ContextSmoothing { get; init; } = 0.75;
        public double Neg { get; init; } = 1;
        public int Dimensions { get; init; } = 300;
        public int Oversample { get; init; } = 10;
        public int PowerIterations { get; init; } = 4;
        public double EigenWeight { get; init; } = 0.5;
        public long MemoryBytes { get; init; } = 4L << 30;
        public string? TempDir { get; init; }
        public int Threads { get; init; }
        public int Seed { get; init; } = 1;
    }

    /// <summary>The pass-1 word table's share of the memory budget: a quarter (the pair maps get half, see
    /// <see cref="CooccurrenceOptions.MemoryBytes"/>; the table is still held during the counting pass).</summary>
    internal static long TableBudget(long memoryBytes) => memoryBytes / 4;

    /// <summary>Bytes of the randomized SVD's arrays for V words, d dimensions and oversampling p: two work buffers of
    /// V × min(d + p, V) floats and the factors U and V of V × d floats (<see cref="RandomizedSvd"/>).</summary>
    internal static long SvdBytes(int words, int dims, int oversample)
    {
        long l = Math.Min((long)dims + oversample, words);
        return 4L * words * (2 * l + 2L * dims);
    }

    /// <summary>"4G", "512M", "64K" or a byte count.</summary>
    internal static long ParseSize(string text, string option)
    {
        string t = text.Trim().ToUpperInvariant();
        if (t.EndsWith('B')) t = t[..^1];
        long unit = 1;
        if (t.EndsWith('K')) unit = 1L << 10;
        else if (t.EndsWith('M')) unit = 1L << 20;
        else if (t.EndsWith('G')) unit = 1L << 30;
        else if (t.EndsWith('T')) unit = 1L << 40;
        if (unit > 1) t = t[..^1];
        if (!double.TryParse(t, NumberStyles.Float, C, out double v) || !(v > 0) || v * unit > long.MaxValue / 2)
            throw new UserFacingException($"{option}: '{text}' is not a size (use e.g. 512M or 4G)", ExitCodes.Usage);
        return (long)(v * unit);
    }

    private static void Validate(EmbedSettings s)
    {
        void Check(bool ok, string message) { if (!ok) throw new UserFacingException(message, ExitCodes.Usage); }
        Check(s.MinCount >= 1, $"--min-count ({s.MinCount}) must be at least 1");
        Check(s.MaxWords >= 1, $"--max-words ({s.MaxWords}) must be at least 1");
        Check(s.Window >= 1 && s.Window <= CooccurrenceOptions.MaxWindow, $"--window ({s.Window}) must be between 1 and {CooccurrenceOptions.MaxWindow}");
        Check(s.PhraseThreshold >= -1 && s.PhraseThreshold <= 1, $"--phrase-threshold ({s.PhraseThreshold.ToString(C)}) must be between -1 and 1");
        Check(s.PhraseMinCount >= 1, $"--phrase-min-count ({s.PhraseMinCount}) must be at least 1");
        Check(!(s.Phrases && s.PhraseList is not null), "--phrases and --phrase-list cannot be used together");
        Check(s.ContextSmoothing > 0 && s.ContextSmoothing <= 1, $"--context-smoothing ({s.ContextSmoothing.ToString(C)}) must be in (0, 1]");
        Check(s.Neg >= 1 && double.IsFinite(s.Neg), $"--neg ({s.Neg.ToString(C)}) must be at least 1");
        Check(s.Dimensions >= 1, $"--dim ({s.Dimensions}) must be at least 1");
        Check(s.Oversample >= 0, $"--oversample ({s.Oversample}) must not be negative");
        Check(s.PowerIterations >= 0, $"--power-iterations ({s.PowerIterations}) must not be negative");
        Check(double.IsFinite(s.EigenWeight), "--eigen-weight must be a finite number");
        Check(s.MemoryBytes >= 16L << 20, $"--memory ({s.MemoryBytes} bytes) must be at least 16M");
        Check(s.Threads >= 0, $"--threads ({s.Threads}) must not be negative");
    }

    internal static int Run(CliContext context, EmbedSettings s)
    {
        Validate(s);
        var total = Stopwatch.StartNew();
        var timings = new Dictionary<string, double>();
        var err = context.Err;
        string outDir = Path.GetFullPath(s.Output);
        if (Directory.Exists(outDir) && !s.Overwrite) throw new UserFacingException($"output folder {s.Output} exists (use --overwrite to replace it)", ExitCodes.WriteFailed);
        if (File.Exists(outDir)) throw new UserFacingException($"output {s.Output} is a file, not a folder", ExitCodes.WriteFailed);
        string tempRoot = Path.Combine(s.TempDir ?? Path.GetTempPath(), $"sensesplit-embed-{Environment.ProcessId}-{Guid.NewGuid():N}");
        int threads = s.Threads > 0 ? s.Threads : Environment.ProcessorCount;
        try
        {
            var corpus = CorpusSource.Resolve(s.Inputs, StandardInput, Path.Combine(tempRoot, "stdin"));
            long totalBytes = corpus.Sum(f => f.Bytes);
            err.WriteLine(string.Create(C, $"embed: {corpus.Count} input file(s), {totalBytes / 1e6:F1} MB"));
            var tokenizer = new TokenizerOptions { KeepCase = s.KeepCase, FoldNumbers = s.FoldNumbers };
            var reader = new CorpusReader();

            // Pass 1: vocabulary (with listed phrases joined on the fly).
            var table = new WordTable();
            PhraseSet? phraseSet = null;
            if (s.PhraseList is not null) phraseSet = LoadPhraseList(s.PhraseList, table, tokenizer, context);
            using var spool = new CorpusIdSpool(Path.Combine(tempRoot, "ids.bin"));
            var counter1 = new VocabularyCounter(table, phraseSet is null ? null : new PhraseJoiner(phraseSet), spool, TableBudget(s.MemoryBytes));
            var scanner = new TokenScanner(tokenizer);
            var hashes = ReadAll(corpus, reader, scanner, counter1, err, "pass 1 (vocabulary)", () => counter1.Tokens, totalBytes, timings, "vocabulary");
            long invalidBytes = reader.InvalidBytes;
            spool.Close();
            if (counter1.Tokens == 0)
                throw new UserFacingException($"empty corpus: no tokens in {string.Join(", ", corpus.Select(c => c.Name))}");
            // Later passes replay the id file, or read the text again when pruning made the ids in it stale.
            void Feed(TokenIdMapper mapper, string pass, Func<long> tokens, string? timingName)
            {
                if (!counter1.Pruned)
                {
                    Replay(spool, mapper, err, pass + ", replaying token ids", tokens, timings, timingName);
                    return;
                }
                var again = ReadAll(corpus, reader, new TokenScanner(tokenizer), mapper, err, pass + ", reading the text again", tokens, totalBytes, timings, timingName);
                for (int i = 0; i < corpus.Count; i++)
                    if (again[i] != hashes[i]) throw new UserFacingException($"input {corpus[i].Name} changed while it was being read (SHA-256 differs between passes)");
            }

            // After pruning, the counts of the words left are lower bounds: count them again, exactly (lossy counting keeps
            // every word seen more than T times, so the vocabulary is exact when min count and the max-words cut exceed T).
            if (counter1.Pruned)
            {
                table.ResetCounts();
                var recount = new TableRecount(table);
                var identity = new int[table.Count];
                for (int i = 0; i < identity.Length; i++) identity[i] = i;
                Feed(new TokenIdMapper(table, identity, phraseSet is null ? null : new PhraseJoiner(phraseSet), recount),
                    "pass 1b (exact counts of the words left)", () => recount.Tokens, "recount");
            }

            // Optional pass: collocations by NPMI.
            if (s.Phrases)
            {
                var sw = Stopwatch.StartNew();
                var candidates = Vocabulary.Select(table, s.MinCount, s.MaxWords);
                var bigrams = new BigramCounter();
                var mapper = new TokenIdMapper(table, candidates.TableIdToWordId, null, bigrams);
                Feed(mapper, "pass 2 (phrases)", () => bigrams.Bigrams, null);
                var chosen = PhraseScorer.Select(bigrams.Pairs(), w => candidates.Counts[w], counter1.Tokens, bigrams.Bigrams, s.PhraseMinCount, s.PhraseThreshold);
                phraseSet = new PhraseSet();
                var ids = new int[2];
                foreach (var (a, b, count, _) in chosen)
                {
                    ids[0] = table.Find(candidates.Words[a]);
                    ids[1] = table.Find(candidates.Words[b]);
                    int phraseId = phraseSet.Add(table, ids);
                    // Estimated counts for choosing the vocabulary; counts.tsv gets the exact counts of the next pass.
                    table.Add(phraseId, count);
                    table.Add(ids[0], -Math.Min(count, table.CountOf(ids[0])));
                    table.Add(ids[1], -Math.Min(count, table.CountOf(ids[1])));
                }
                timings["phrases"] = sw.Elapsed.TotalSeconds;
                err.WriteLine(string.Create(C, $"phrases: {chosen.Count} pairs with NPMI ≥ {s.PhraseThreshold} and count ≥ {s.PhraseMinCount}"));
            }

            var vocab = Vocabulary.Select(table, s.MinCount, s.MaxWords);
            if (vocab.Count == 0)
            {
                long best = 0;
                for (int i = 0; i < table.Count; i++) best = Math.Max(best, table.CountOf(i));
                throw new UserFacingException($"vocabulary is empty: no word of {string.Join(", ", corpus.Select(c => c.Name))} occurs at least --min-count {s.MinCount} times (the most frequent occurs {best} times)");
            }
            if (vocab.Count < 2) throw new UserFacingException($"vocabulary has a single word ('{vocab.Words[0]}'): nothing to embed; lower --min-count");
            if (counter1.Pruned)
            {
                long t = table.PruneThreshold;
                bool exact = s.MinCount > t && (vocab.Count < s.MaxWords || vocab.Counts[^1] > t);
                string what = string.Create(C, $"the word table reached its share of --memory ({TableBudget(s.MemoryBytes) / 1e6:F0} MB) and was pruned {table.Prunings} times (lossy counting; every word seen more than {t} times was kept)");
                if (exact) err.WriteLine($"note: {what}; the words left were counted again, so the vocabulary is the same as without pruning");
                else context.Warn(string.Create(C, $"{what}; words seen at most {t} times may be missing, so the vocabulary may differ from a run with more memory (raise --memory, or --min-count above {t})"));
            }
            int dims = s.Dimensions;
            if (dims > vocab.Count)
            {
                context.Warn($"--dim {dims} exceeds the vocabulary ({vocab.Count} words); using {vocab.Count} dimensions");
                dims = vocab.Count;
            }
            err.WriteLine(string.Create(C, $"vocabulary: {vocab.Count} words (of {table.Live} distinct tokens{(counter1.Pruned ? " left after pruning" : "")}; min count {s.MinCount}, max words {s.MaxWords})"));

            // Counting pass.
            CooccurrenceCounts counts;
            int spilled;
            using (var store = new DiskRunStore(Path.Combine(tempRoot, "runs")))
            {
                using var counter = new CooccurrenceCounter(vocab.Count, new CooccurrenceOptions
                {
                    Window = s.Window, WindowAcrossLines = s.WindowAcrossLines, Threads = threads, MemoryBytes = s.MemoryBytes,
                }, store);
                var mapper = new TokenIdMapper(table, vocab.TableIdToWordId, phraseSet is null ? null : new PhraseJoiner(phraseSet), counter);
                Feed(mapper, "pass " + (s.Phrases ? "3" : "2") + " (co-occurrences)", () => counter.Tokens, "counting");
                var sw = Stopwatch.StartNew();
                counts = counter.Complete();
                spilled = counter.SpilledRuns;
                timings["countMerge"] = sw.Elapsed.TotalSeconds;
                err.WriteLine(string.Create(C, $"co-occurrences: {counts.UpperNonZeros} stored pairs, {spilled} spilled runs, merged in {sw.Elapsed.TotalSeconds:F1} s"));
            }

            var swPpmi = Stopwatch.StartNew();
            var ppmi = Ppmi.Compute(counts, new PpmiOptions { ContextSmoothing = s.ContextSmoothing, Shift = s.Neg });
            long cooccurrenceEntries = counts.UpperNonZeros;
            var wordCounts = counts.WordCounts;
            long countedTokens = counts.Tokens;
            counts = null!;
            // The counts, the word table's pass-1 state and the counter's tables are garbage now: free them before the
            // SVD allocates its tall buffers, so the peak is max(counting, SVD) rather than their sum.
            GC.Collect(2, GCCollectionMode.Forced, blocking: true);
            timings["ppmi"] = swPpmi.Elapsed.TotalSeconds;
            err.WriteLine(string.Create(C, $"PPMI: {ppmi.Matrix.NonZeros} positive entries in {swPpmi.Elapsed.TotalSeconds:F1} s"));
            if (ppmi.Matrix.NonZeros == 0) throw new UserFacingException("no word pair has positive PMI: the corpus is too small or too uniform to embed");

            // The SVD's arrays (RandomizedSvd: two work buffers of V × l floats, then U and V of V × d): outside --memory.
            long svdBytes = SvdBytes(vocab.Count, dims, s.Oversample);
            string svdNeed = string.Create(C, $"about {svdBytes / 1e6:F0} MB (4·V·(2·(d + oversample) + 2·d) bytes, V = {vocab.Count}, d = {dims}) besides the PPMI matrix ({ppmi.Matrix.NonZeros * 16L / 1e6:F0} MB)");
            if (svdBytes > s.MemoryBytes) context.Warn(string.Create(C, $"the SVD needs {svdNeed}, more than --memory ({s.MemoryBytes / 1e6:F0} MB); lower --max-words or --dim to need less"));
            else err.WriteLine($"SVD: needs {svdNeed}");
            var swSvd = Stopwatch.StartNew();
            var svd = RandomizedSvd.Compute(ppmi.Matrix, dims, new RandomizedSvdOptions
            {
                Oversample = s.Oversample, PowerIterations = s.PowerIterations, Seed = s.Seed, Threads = threads,
            }, ppmi.Transposed, new Progress(err, swSvd));
            timings["svd"] = swSvd.Elapsed.TotalSeconds;
            err.WriteLine(string.Create(C, $"SVD: {dims} dimensions in {swSvd.Elapsed.TotalSeconds:F1} s (σ₁ = {svd.SingularValues[0]:G5}, σ_{dims} = {svd.SingularValues[dims - 1]:G5})"));
            if (svd.Rank < dims) context.Warn($"the PPMI matrix has numerical rank {svd.Rank} < {dims}: the last {dims - svd.Rank} dimensions are zero");

            // Word vectors U·Σ^p (Levy, Goldberg & Dagan 2015, §3.3 "eigenvalue weighting").
            // Scaled in place: U is not needed afterwards.
            var vectors = svd.U;
            var weights = new float[dims];
            for (int j = 0; j < dims; j++) weights[j] = svd.SingularValues[j] > 0 ? (float)Math.Pow(svd.SingularValues[j], s.EigenWeight) : 0f;
            for (int i = 0; i < vocab.Count; i++)
                System.Numerics.Tensors.TensorPrimitives.Multiply(vectors.AsSpan(i * dims, dims), weights, vectors.AsSpan(i * dims, dims));

            var swWrite = Stopwatch.StartNew();
            string staging = outDir.TrimEnd(Path.DirectorySeparatorChar) + $".partial-{Guid.NewGuid():N}";
            try
            {
                Directory.CreateDirectory(staging);
                // The staging folder as a whole is renamed into place, so the files need no temporary names of their own.
                void WriteFile(string name, Action<Stream> write)
                {
                    using var stream = new FileStream(Path.Combine(staging, name), FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 20);
                    write(stream);
                }
                WriteFile("vectors.txt", f => VectorFile.WriteText(f, new WordVectors(vocab.Words, vectors, dims), header: true));
                WriteFile("counts.tsv", f => CountsFile.Write(f, vocab.Words, wordCounts, header: true));
                WriteFile("basis.npy", f => NpyFile.WriteMatrix<float>(f, svd.V, vocab.Count, dims));
                WriteFile("singular-values.npy", f => NpyFile.WriteVector<double>(f, svd.SingularValues));
                WriteFile("context-counts.npy", f => NpyFile.WriteVector<double>(f, ppmi.ContextCounts));
                timings["write"] = swWrite.Elapsed.TotalSeconds;
                timings["total"] = total.Elapsed.TotalSeconds;
                var manifest = new EmbedManifest
                {
                    ToolVersion = typeof(EmbedCommand).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "0",
                    Inputs = corpus.Select((c, i) => new EmbedManifestInput(c.Name, c.Bytes, hashes[i])).ToList(),
                    Tokens = countedTokens,
                    InvalidUtf8Bytes = invalidBytes,
                    OverlongTokensDropped = scanner.OverlongTokens,
                    DistinctTokens = table.Live,
                    VocabularyPrunings = table.Prunings,
                    VocabularyPruneThreshold = table.PruneThreshold,
                    Words = vocab.Count,
                    Dimensions = dims,
                    Rank = svd.Rank,
                    Phrases = phraseSet?.Count ?? 0,
                    Parameters = new Dictionary<string, object>
                    {
                        ["minCount"] = s.MinCount, ["maxWords"] = s.MaxWords, ["keepCase"] = s.KeepCase, ["foldNumbers"] = s.FoldNumbers,
                        ["numberToken"] = TokenScanner.NumberToken, ["window"] = s.Window, ["weighting"] = "1/distance",
                        ["windowAcrossLines"] = s.WindowAcrossLines, ["phrases"] = s.Phrases, ["phraseThreshold"] = s.PhraseThreshold,
                        ["phraseMinCount"] = s.PhraseMinCount, ["phraseList"] = s.PhraseList ?? "", ["contextSmoothing"] = s.ContextSmoothing,
                        ["neg"] = s.Neg, ["dimensionsRequested"] = s.Dimensions, ["oversample"] = s.Oversample,
                        ["powerIterations"] = s.PowerIterations, ["eigenWeight"] = s.EigenWeight, ["memoryBytes"] = s.MemoryBytes,
                        ["threads"] = threads, ["seed"] = s.Seed, ["maxTokenLength"] = TokenScanner.MaxTokenLength,
                    },
                    SingularValues = svd.SingularValues,
                    PairTotal = ppmi.Total,
                    SmoothedContextTotal = ppmi.SmoothedContextTotal,
                    CooccurrenceEntries = cooccurrenceEntries,
                    PpmiEntries = ppmi.Matrix.NonZeros,
                    SpilledRuns = spilled,
                    TimingsSeconds = timings,
                    PeakMemoryBytes = Process.GetCurrentProcess().PeakWorkingSet64,
                    Files = new Dictionary<string, string>
                    {
                        ["vectors"] = "vectors.txt", ["counts"] = "counts.tsv", ["basis"] = "basis.npy",
                        ["singularValues"] = "singular-values.npy", ["contextCounts"] = "context-counts.npy",
                    },
                };
                File.WriteAllText(Path.Combine(staging, "manifest.json"), JsonSerializer.Serialize(manifest, EmbedManifest.Json) + "\n");
                if (Directory.Exists(outDir)) Directory.Delete(outDir, recursive: true);
                Directory.Move(staging, outDir);
            }
            catch (Exception ex) when (ex is IOException or UnauthorizedAccessException)
            {
                throw new UserFacingException($"output folder {s.Output}: write failed ({ex.Message})", ExitCodes.WriteFailed);
            }
            finally
            {
                if (Directory.Exists(staging)) Directory.Delete(staging, recursive: true);
            }
            err.WriteLine(string.Create(C, $"done: {vocab.Count} words × {dims} dimensions from {countedTokens} tokens in {total.Elapsed.TotalSeconds:F1} s; {invalidBytes} invalid UTF-8 bytes replaced; peak memory {Process.GetCurrentProcess().PeakWorkingSet64 / 1e6:F0} MB; wrote {s.Output}"));
            return ExitCodes.Ok;
        }
        finally
        {
            try { if (Directory.Exists(tempRoot)) Directory.Delete(tempRoot, recursive: true); }
            catch (IOException) { }
        }
    }

    private static List<string> ReadAll(List<CorpusInput> corpus, CorpusReader reader, TokenScanner scanner, ITokenSink sink, TextWriter err,
        string pass, Func<long> tokens, long totalBytes, Dictionary<string, double>? timings, string? timingName)
    {
        var progress = new CorpusProgress(err, pass, totalBytes, tokens);
        var hashes = new List<string>();
        foreach (var input in corpus)
        {
            hashes.Add(reader.Read(input, scanner, sink, progress.Report));
            progress.FileDone(input.Bytes);
        }
        err.WriteLine(progress.Summary());
        if (timings is not null && timingName is not null) timings[timingName] = progress.Elapsed.TotalSeconds;
        return hashes;
    }

    private static void Replay(CorpusIdSpool spool, TokenIdMapper mapper, TextWriter err, string pass, Func<long> tokens,
        Dictionary<string, double>? timings, string? timingName)
    {
        var progress = new CorpusProgress(err, pass, spool.Bytes, tokens);
        spool.Replay(mapper, progress.Report);
        err.WriteLine(progress.Summary());
        if (timings is not null && timingName is not null) timings[timingName] = progress.Elapsed.TotalSeconds;
    }

    private static PhraseSet LoadPhraseList(string path, WordTable table, TokenizerOptions tokenizer, CliContext context)
    {
        if (!File.Exists(path)) throw new UserFacingException($"phrase list not found: {path}");
        var set = new PhraseSet();
        var collect = new PhraseWords();
        int lineNo = 0;
        foreach (var line in File.ReadLines(path))
        {
            lineNo++;
            if (string.IsNullOrWhiteSpace(line) || line.TrimStart().StartsWith('#')) continue;
            collect.Words.Clear();
            var scanner = new TokenScanner(tokenizer);
            scanner.Scan(line.AsSpan(), true, collect);
            if (collect.Words.Count < 2)
            {
                context.Warn($"{path}:{lineNo}: '{line.Trim()}' has fewer than two words after tokenizing; ignored");
                continue;
            }
            set.Add(table, collect.Words.Select(w => table.GetOrAdd(w)).ToArray());
        }
        if (set.Count == 0) throw new UserFacingException($"phrase list {path}: no phrase of two or more words");
        context.Err.WriteLine(string.Create(C, $"phrase list: {set.Count} phrases from {path}"));
        return set;
    }

    private sealed class PhraseWords : ITokenSink
    {
        public readonly List<string> Words = new();
        public void Token(ReadOnlySpan<char> token) => Words.Add(token.ToString());
        public void LineBreak() { }
        public void ParagraphBreak() { }
    }

    private sealed class Progress(TextWriter err, Stopwatch clock) : IProgress<string>
    {
        public void Report(string value) => err.WriteLine(string.Create(C, $"SVD: {value} ({clock.Elapsed.TotalSeconds:F1} s)"));
    }
}
