using System.CommandLine;
using SenseSplit.Cli.MergeTest;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Cli.Commands;

/// <summary>
/// <c>sensesplit merge-test</c>: does an embedding keep two senses of a word apart? Pairs of unrelated words are merged
/// into pseudo-words; the merged vector is fitted as α·v1 + β·v2 and β/α is compared with the frequency ratio
/// (docs/methods-merge-test.md). Three forms:
/// <c>merge-test --corpus C… --out DIR</c> (built in, on an embedding made by <c>embed</c>; fold-in or <c>--retrain</c>),
/// <c>merge-test prepare</c> (write a merged corpus and pairs.csv for another trainer) and
/// <c>merge-test score</c> (judge vectors that trainer made). Exit code 0 on pass, 5 on fail.
/// </summary>
public static class MergeTestCommand
{
    /// <summary>Where "-" reads from; tests replace it.</summary>
    internal static Func<Stream> StandardInput { get; set; } = Console.OpenStandardInput;

    public static Command Create(CliContext context)
    {
        var command = new Command("merge-test",
            "Check whether an embedding keeps two senses of a word apart: merge pairs of unrelated words into pseudo-words and see how much of the rarer word stays visible. Writes pairs.csv, merge-test.json and merge-test.svg; exit code 0 when the embedding passes, 5 when it fails, 3 on bad input.");
        var corpus = CorpusOption("Corpus files (UTF-8 or gzip), folders (*.txt, *.txt.gz) or '-' for standard input: the corpus the embedding was made from.");
        var output = new Option<string>("--out") { HelpName = "DIR", Description = "Folder for pairs.csv, merge-test.json and merge-test.svg (created if missing; these files are replaced)." };
        var embedding = new Option<string?>("--embedding") { HelpName = "DIR", Description = "Output folder of 'sensesplit embed' for this corpus. Without it the corpus is embedded first, with embed's defaults, into the embedding folder inside --out." };
        var retrain = new Option<bool>("--retrain") { Description = "Re-embed the whole merged corpus (as embed did, same settings) instead of folding the pseudo-words into the stored basis. Slower; the real test of whether the embedding keeps two words apart." };
        var pairsFile = PairsFileOption();
        var threads = new Option<int>("--threads") { HelpName = "N", Description = "Worker threads (0 = all cores). Results do not depend on it.", DefaultValueFactory = _ => 0 };
        var tempDir = new Option<string?>("--temp-dir") { HelpName = "DIR", Description = "Folder for temporary files (default: the system's)." };
        var selection = new SelectionOptions();
        var thresholds = new ThresholdOptions();
        foreach (var o in new Option[] { corpus, output, embedding, retrain, pairsFile, threads, tempDir }) command.Options.Add(o);
        selection.AddTo(command);
        thresholds.AddTo(command);
        command.SetAction(parse =>
        {
            var settings = new BuiltInSettings
            {
                Corpus = parse.GetValue(corpus) ?? [],
                Out = parse.GetValue(output) ?? "",
                Embedding = parse.GetValue(embedding),
                Retrain = parse.GetValue(retrain),
                PairsFile = parse.GetValue(pairsFile),
                Threads = parse.GetValue(threads),
                TempDir = parse.GetValue(tempDir),
                Selection = selection.Bind(parse),
                Thresholds = thresholds.Bind(parse),
            };
            using var interrupt = new ProgressInterrupt();
            return BuiltInRun.Run(context, settings, ProgressDisplay.For(context), StandardInput, interrupt.Token);
        });
        command.Subcommands.Add(CreateScore(context));
        command.Subcommands.Add(CreatePrepare(context));
        return command;
    }

    private static Command CreateScore(CliContext context)
    {
        var command = new Command("score", "Judge an embedding trained elsewhere: the original vectors, the vectors trained on the merged corpus that 'merge-test prepare' wrote, and its pairs.csv. The cosine to span is judged against the noise floor of the two trainings. Exit code 0 on pass, 5 on fail.");
        var original = new Option<string>("--original") { HelpName = "FILE", Description = "Vectors trained on the original corpus (text, gzip or .npy with --original-words).", Required = true };
        var originalWords = new Option<string?>("--original-words") { HelpName = "FILE", Description = "Words file for .npy --original vectors." };
        var merged = new Option<string>("--merged") { HelpName = "FILE", Description = "Vectors trained on the merged corpus; they hold the pseudo-words named in pairs.csv.", Required = true };
        var mergedWords = new Option<string?>("--merged-words") { HelpName = "FILE", Description = "Words file for .npy --merged vectors." };
        var pairs = new Option<string>("--pairs") { HelpName = "FILE", Description = "pairs.csv: columns w1, w2 and optionally pseudo (else w1⊕w2); other columns are ignored.", Required = true };
        var counts = new Option<string>("--counts") { HelpName = "FILE", Description = "Word counts of the original corpus: 'word<TAB>count' lines or CSV with a 'word,count' header.", Required = true };
        var output = new Option<string>("--out") { HelpName = "DIR", Description = "Folder for pairs.csv, merge-test.json and merge-test.svg (created if missing; these files are replaced).", Required = true };
        var thresholds = new ThresholdOptions(absoluteCosine: false);
        foreach (var o in new Option[] { original, originalWords, merged, mergedWords, pairs, counts, output }) command.Options.Add(o);
        thresholds.AddTo(command);
        command.SetAction(parse =>
        {
            var settings = new ScoreSettings
            {
                Original = parse.GetValue(original)!,
                OriginalWords = parse.GetValue(originalWords),
                Merged = parse.GetValue(merged)!,
                MergedWords = parse.GetValue(mergedWords),
                Pairs = parse.GetValue(pairs)!,
                Counts = parse.GetValue(counts)!,
                Out = parse.GetValue(output)!,
                Thresholds = thresholds.Bind(parse),
            };
            using var interrupt = new ProgressInterrupt();
            return ScoreRun.Run(context, settings, ProgressDisplay.For(context), interrupt.Token);
        });
        return command;
    }

    private static Command CreatePrepare(CliContext context)
    {
        var command = new Command("prepare", "Choose pairs and write the merged corpus (every w1 and w2 replaced by its pseudo-word) and pairs.csv, to train with another tool and then judge with 'merge-test score'.");
        var corpus = CorpusOption("Corpus files (UTF-8 or gzip), folders (*.txt, *.txt.gz) or '-' for standard input.");
        corpus.Required = true;
        var vectors = new Option<string>("--vectors") { HelpName = "FILE", Description = "Vectors trained on this corpus (text, gzip or .npy with --words); pairs are chosen among their words.", Required = true };
        var words = new Option<string?>("--words") { HelpName = "FILE", Description = "Words file for .npy vectors." };
        var counts = new Option<string>("--counts") { HelpName = "FILE", Description = "Word counts of the corpus: 'word<TAB>count' lines or CSV with a 'word,count' header.", Required = true };
        var output = new Option<string>("--out") { HelpName = "DIR", Description = "Folder for corpus-merged.txt and pairs.csv (created if missing; these files are replaced).", Required = true };
        var pairsFile = PairsFileOption();
        var keepCase = new Option<bool>("--keep-case") { Description = "Do not lower-case letters (as embed --keep-case)." };
        var foldNumbers = new Option<bool>("--fold-numbers") { Description = "Replace every number by <num> (as embed --fold-numbers)." };
        var writeOriginal = new Option<bool>("--write-original") { Description = "Also write corpus-original.txt, the unmerged token stream, so both embeddings can be trained on text prepared the same way." };
        var selection = new SelectionOptions();
        foreach (var o in new Option[] { corpus, vectors, words, counts, output, pairsFile, keepCase, foldNumbers, writeOriginal }) command.Options.Add(o);
        selection.AddTo(command);
        command.SetAction(parse =>
        {
            var settings = new PrepareSettings
            {
                Corpus = parse.GetValue(corpus) ?? [],
                Vectors = parse.GetValue(vectors)!,
                Words = parse.GetValue(words),
                Counts = parse.GetValue(counts)!,
                Out = parse.GetValue(output)!,
                PairsFile = parse.GetValue(pairsFile),
                KeepCase = parse.GetValue(keepCase),
                FoldNumbers = parse.GetValue(foldNumbers),
                WriteOriginal = parse.GetValue(writeOriginal),
                Selection = selection.Bind(parse),
            };
            using var interrupt = new ProgressInterrupt();
            return PrepareRun.Run(context, settings, ProgressDisplay.For(context), StandardInput, interrupt.Token);
        });
        return command;
    }

    private static Option<string[]> CorpusOption(string description) => new("--corpus")
    {
        HelpName = "FILE", Description = description, Arity = ArgumentArity.OneOrMore, AllowMultipleArgumentsPerToken = true,
    };

    private static Option<string?> PairsFileOption() => new("--pairs-file")
    {
        HelpName = "CSV", Description = "Use these pairs instead of choosing them: CSV with columns w1, w2 (optional pseudo).",
    };

    /// <summary>Options of pair selection (docs/methods-merge-test.md §1).</summary>
    private sealed class SelectionOptions
    {
        private static readonly PairSelectionSettings Defaults = new();
        private readonly Option<int> _pairs = new("--pairs") { HelpName = "N", Description = "Pairs to choose.", DefaultValueFactory = _ => Defaults.Pairs };
        private readonly Option<int> _seed = new("--seed") { HelpName = "N", Description = "Seed of the pair choice (and of nothing else).", DefaultValueFactory = _ => Defaults.Seed };
        private readonly Option<long> _minCount = new("--min-rare-count") { HelpName = "N", Description = "Least corpus count of the rarer word of a pair.", DefaultValueFactory = _ => Defaults.MinRareCount };
        private readonly Option<double> _maxRatio = new("--max-ratio") { HelpName = "R", Description = "Largest frequency ratio f1/f2 of a chosen pair.", DefaultValueFactory = _ => Defaults.MaxRatio };
        private readonly Option<int> _skipFrequent = new("--skip-frequent") { HelpName = "N", Description = "The N most frequent words count as function words and are never paired (0 pairs them too). Tokens without a letter or with a digit are never paired either.", DefaultValueFactory = _ => Defaults.SkipMostFrequent };

        public void AddTo(Command command)
        {
            foreach (var o in new Option[] { _pairs, _seed, _minCount, _maxRatio, _skipFrequent }) command.Options.Add(o);
        }

        public PairSelectionSettings Bind(ParseResult parse) => new()
        {
            Pairs = parse.GetValue(_pairs),
            Seed = parse.GetValue(_seed),
            MinRareCount = parse.GetValue(_minCount),
            MaxRatio = parse.GetValue(_maxRatio),
            SkipMostFrequent = parse.GetValue(_skipFrequent),
        };
    }

    /// <summary>Thresholds of the verdict (docs/methods-merge-test.md §6). <c>score</c> always has a noise floor, so it
    /// gets no <c>--min-cosine</c>.</summary>
    private sealed class ThresholdOptions(bool absoluteCosine = true)
    {
        private static readonly VerdictThresholds Defaults = new();
        private readonly Option<double> _minCosine = new("--min-cosine") { HelpName = "X", Description = "Fold-in (the default path): pass needs the median cosine of a pseudo-word to span(v1, v2) at least this.", DefaultValueFactory = _ => Defaults.MinMedianCosine };
        private readonly Option<double> _floorFactor = new("--floor-factor") { HelpName = "K", Description = "Re-embedded vectors (--retrain, score): pass needs the median cosine to span at least K times the noise floor, the median cosine of untouched words to their old vectors after alignment.", DefaultValueFactory = _ => Defaults.FloorFactor };
        private readonly Option<double> _minFloor = new("--min-floor") { HelpName = "X", Description = "Re-embedded vectors: a noise floor below this fails the test for lack of evidence (the re-embedding is too unstable to judge).", DefaultValueFactory = _ => Defaults.MinNoiseFloor };
        private readonly Option<double> _highRatio = new("--high-ratio") { HelpName = "R", Description = "Pairs with f1/f2 at least this enter the weight criterion.", DefaultValueFactory = _ => Defaults.HighRatio };
        private readonly Option<double> _minExcess = new("--min-excess") { HelpName = "X", Description = "Pass needs the median of (β/α)/(1/r) over those pairs at least this.", DefaultValueFactory = _ => Defaults.MinExcessFactor };
        private readonly Option<int> _minPairs = new("--min-pairs") { HelpName = "N", Description = "Fewest pairs each median needs.", DefaultValueFactory = _ => Defaults.MinPairs };

        public void AddTo(Command command)
        {
            if (absoluteCosine) command.Options.Add(_minCosine);
            foreach (var o in new Option[] { _floorFactor, _minFloor, _highRatio, _minExcess, _minPairs }) command.Options.Add(o);
        }

        public VerdictThresholds Bind(ParseResult parse) => new()
        {
            MinMedianCosine = absoluteCosine ? parse.GetValue(_minCosine) : Defaults.MinMedianCosine,
            HighRatio = parse.GetValue(_highRatio),
            MinExcessFactor = parse.GetValue(_minExcess),
            MinPairs = parse.GetValue(_minPairs),
            FloorFactor = parse.GetValue(_floorFactor),
            MinNoiseFloor = parse.GetValue(_minFloor),
        };
    }
}
