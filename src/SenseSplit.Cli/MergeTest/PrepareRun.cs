using System.Globalization;
using System.Text;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses.MergeTest;
using SenseSplit.Core.Text;

namespace SenseSplit.Cli.MergeTest;

/// <summary>What <c>merge-test prepare</c> was asked to do.</summary>
internal sealed record PrepareSettings
{
    public string[] Corpus { get; init; } = [];
    public string Vectors { get; init; } = "";
    public string? Words { get; init; }
    public string Counts { get; init; } = "";
    public string Out { get; init; } = "";
    public string? PairsFile { get; init; }
    public bool KeepCase { get; init; }
    public bool FoldNumbers { get; init; }
    public bool WriteOriginal { get; init; }
    public PairSelectionSettings Selection { get; init; } = new();
}

/// <summary>
/// <c>merge-test prepare</c>: chooses pairs (or checks the user's), then writes in one streaming pass the merged
/// corpus, where every token w1 or w2 of a pair is replaced by its pseudo-word, and <c>pairs.csv</c>.
/// The corpus is written as the normalised token stream (see <see cref="TokenStreamWriter"/>), for three reasons:
/// a token can only be recognised as w1 or w2 after the tokenizer's normalisation, so writing tokens guarantees that
/// the replaced occurrences are exactly those counted in counts.tsv (pseudo-word count = f1 + f2); the pseudo-word
/// name survives any trainer that splits on white space; and the scanner does not report where a token sat in the raw
/// text. With <c>--write-original</c> the unmerged token stream is written too, so that both embeddings can be trained
/// on text prepared the same way.
/// </summary>
internal static class PrepareRun
{
    public const string MergedCorpusFile = "corpus-merged.txt";
    public const string OriginalCorpusFile = "corpus-original.txt";
    private static readonly CultureInfo C = CultureInfo.InvariantCulture;

    public static int Run(CliContext context, PrepareSettings s, ProgressDisplay progress, Func<Stream> standardInput, CancellationToken cancellation)
    {
        MergeTestSteps.CheckSelection(s.Selection);
        string spool = Path.Combine(Path.GetTempPath(), $"sensesplit-merge-{Environment.ProcessId}-{Guid.NewGuid():N}");
        try
        {
            var corpus = CorpusSource.Resolve(s.Corpus, standardInput, spool);

            progress.Stage("reading vectors");
            var load = VectorFile.Read(s.Vectors, s.Words, progress.Warn, cancellation);
            var vectors = load.Vectors;
            var counts = CountsFile.Align(vectors.Words, CountsFile.Read(s.Counts, progress.Warn), s.Counts, progress.Warn);
            progress.EndStage($"{vectors.Count.ToString(C)} words, {vectors.Dimensions.ToString(C)} dimensions");
            cancellation.ThrowIfCancellationRequested();

            progress.Stage(s.PairsFile is null ? "choosing pairs" : "checking pairs");
            var pairs = MergeTestSteps.Choose(vectors, counts, s.Selection, s.Vectors, s.PairsFile, MergeTestSteps.Unmergeable(vectors.Words));
            progress.EndStage(s.PairsFile is null ? MergeTestSteps.ChoiceLine(pairs, s.Selection, null) : $"{pairs.Pairs.Count.ToString(C)} pairs");
            foreach (var note in pairs.Selection.Notes) progress.Message($"note: {note}");
            cancellation.ThrowIfCancellationRequested();

            try { Directory.CreateDirectory(s.Out); }
            catch (Exception e) when (e is IOException or UnauthorizedAccessException)
            {
                throw new UserFacingException($"{s.Out}: cannot create the output folder ({e.Message})", ExitCodes.WriteFailed);
            }
            var tokenizer = new TokenizerOptions { KeepCase = s.KeepCase, FoldNumbers = s.FoldNumbers };
            long[] replaced = WriteCorpus(corpus, tokenizer, pairs, s, context.Err, cancellation);
            MergePairsFile.Write(Path.Combine(s.Out, MergeTestReport.PairsFile), pairs.Pairs, pairs.PseudoWords);

            int off = 0;
            string? first = null;
            for (int i = 0; i < pairs.Pairs.Count; i++)
            {
                var p = pairs.Pairs[i];
                if (replaced[i] != p.FrequentCount + p.RareCount && off++ == 0)
                    first = $"{pairs.PseudoWords[i]}: {replaced[i].ToString(C)} tokens replaced, counts say {(p.FrequentCount + p.RareCount).ToString(C)}";
            }
            if (off > 0)
                progress.Warn($"{off.ToString(C)} of {pairs.Pairs.Count.ToString(C)} pairs occur in the corpus another number of times than {s.Counts} says (first: {first}); were the counts made from this corpus with the same --keep-case/--fold-numbers?");

            string mergedPath = Path.GetFullPath(Path.Combine(s.Out, MergedCorpusFile));
            progress.Summary("merge test prepared", [
                ("pairs", $"{pairs.Pairs.Count.ToString(C)} ({Path.GetFullPath(Path.Combine(s.Out, MergeTestReport.PairsFile))})"),
                ("merged corpus", mergedPath),
                ("next", $"train your embedding on {MergedCorpusFile} with a tool that splits on white space only (sensesplit embed would split the pseudo-words; for it use merge-test --retrain), then: sensesplit merge-test score --original {s.Vectors} --merged MERGED_VECTORS --pairs {Path.Combine(s.Out, MergeTestReport.PairsFile)} --counts {s.Counts} --out RESULTS"),
            ]);
            context.Out.WriteLine(mergedPath);
            return ExitCodes.Ok;
        }
        finally
        {
            try { if (Directory.Exists(spool)) Directory.Delete(spool, recursive: true); }
            catch (IOException) { }
        }
    }

    /// <summary>The streaming pass: tokens → (original stream) → merger → merged stream. Returns the replaced
    /// tokens per pair. Each output goes to a temporary file renamed into place when complete.</summary>
    private static long[] WriteCorpus(List<CorpusInput> corpus, TokenizerOptions tokenizer, ChosenPairs pairs, PrepareSettings s,
        TextWriter err, CancellationToken cancellation)
    {
        long[] replaced = new long[pairs.Pairs.Count];
        var utf8 = new UTF8Encoding(false);
        void Pass(TextWriter? originalOut, Stream mergedStream)
        {
            using var mergedOut = new StreamWriter(mergedStream, utf8, 1 << 20, leaveOpen: true) { NewLine = "\n" };
            var mergedWriter = new TokenStreamWriter(mergedOut);
            var merger = new TokenMerger<TokenStreamWriter>(pairs.Triples(), mergedWriter);
            ITokenSink sink = originalOut is null ? merger : new Tee(new TokenStreamWriter(originalOut), merger);
            CorpusPass.Run(corpus, tokenizer, sink, err, "merging", () => mergedWriter.Tokens, cancellation);
            mergedOut.Flush();
            for (int i = 0; i < replaced.Length; i++) replaced[i] = merger.Replaced(i);
        }
        string mergedPath = Path.Combine(s.Out, MergedCorpusFile);
        if (!s.WriteOriginal)
        {
            AtomicFile.Write(mergedPath, stream => Pass(null, stream));
            return replaced;
        }
        AtomicFile.Write(Path.Combine(s.Out, OriginalCorpusFile), originalStream =>
        {
            using var originalOut = new StreamWriter(originalStream, utf8, 1 << 20, leaveOpen: true) { NewLine = "\n" };
            AtomicFile.Write(mergedPath, stream => Pass(originalOut, stream));
            originalOut.Flush();
        });
        return replaced;
    }

    /// <summary>Sends every event to two sinks.</summary>
    private sealed class Tee(ITokenSink first, ITokenSink second) : ITokenSink
    {
        public void Token(ReadOnlySpan<char> token) { first.Token(token); second.Token(token); }
        public void LineBreak() { first.LineBreak(); second.LineBreak(); }
        public void ParagraphBreak() { first.ParagraphBreak(); second.ParagraphBreak(); }
    }
}
