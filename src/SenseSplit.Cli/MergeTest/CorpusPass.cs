using System.Globalization;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Text;

namespace SenseSplit.Cli.MergeTest;

/// <summary>One streaming pass over the corpus inputs through a tokenizer into a sink, with progress lines on stderr
/// and cancellation checked between chunks. Returns the SHA-256 of each input, in order.</summary>
internal static class CorpusPass
{
    public static List<string> Run(IReadOnlyList<CorpusInput> corpus, TokenizerOptions tokenizer, ITokenSink sink, TextWriter err,
        string pass, Func<long> tokens, CancellationToken cancellation)
    {
        var reader = new CorpusReader();
        var scanner = new TokenScanner(tokenizer);
        long totalBytes = corpus.Sum(c => c.Bytes);
        var progress = new CorpusProgress(err, pass, totalBytes, tokens);
        var hashes = new List<string>(corpus.Count);
        foreach (var input in corpus)
        {
            hashes.Add(reader.Read(input, scanner, sink, bytes =>
            {
                cancellation.ThrowIfCancellationRequested();
                progress.Report(bytes);
            }));
            progress.FileDone(input.Bytes);
        }
        err.WriteLine(progress.Summary());
        if (reader.InvalidBytes > 0)
            err.WriteLine($"warning: {reader.InvalidBytes.ToString(CultureInfo.InvariantCulture)} invalid UTF-8 bytes were read as U+FFFD (a token separator)");
        return hashes;
    }

    /// <summary>Checks that the corpus is the one an embed run read (same number of inputs, sizes and SHA-256, in order).</summary>
    public static void CheckSameAsEmbedded(IReadOnlyList<CorpusInput> corpus, IReadOnlyList<string>? hashes, IReadOnlyList<EmbedManifestInput> embedded, string manifestPath)
    {
        if (embedded.Count == 0) return;
        string Names() => string.Join(", ", embedded.Select(e => e.Name));
        if (corpus.Count != embedded.Count)
            throw new UserFacingException($"--corpus names {corpus.Count.ToString(CultureInfo.InvariantCulture)} input(s) but {manifestPath} records {embedded.Count.ToString(CultureInfo.InvariantCulture)} ({Names()}); give the corpus the embedding was made from, in the same order");
        for (int i = 0; i < corpus.Count; i++)
        {
            if (corpus[i].Bytes != embedded[i].Bytes)
                throw new UserFacingException($"input {corpus[i].Name}: has {corpus[i].Bytes.ToString(CultureInfo.InvariantCulture)} bytes but the embedding was made from {embedded[i].Name} of {embedded[i].Bytes.ToString(CultureInfo.InvariantCulture)} bytes ({manifestPath}); give the same corpus");
            if (hashes is not null && !string.Equals(hashes[i], embedded[i].Sha256, StringComparison.OrdinalIgnoreCase))
                throw new UserFacingException($"input {corpus[i].Name}: differs from {embedded[i].Name} that the embedding was made from (SHA-256 {hashes[i]} vs {embedded[i].Sha256} in {manifestPath})");
        }
    }
}
