using System.Diagnostics;
using System.Globalization;

namespace SenseSplit.Cli.IO;

/// <summary>Progress of one pass over the corpus on stderr, at most one line every <c>interval</c>: bytes read of the
/// total, tokens, tokens per second and an estimate of the time left.</summary>
public sealed class CorpusProgress(TextWriter err, string pass, long totalBytes, Func<long> tokens, TimeSpan? interval = null)
{
    private readonly Stopwatch _clock = Stopwatch.StartNew();
    private readonly TimeSpan _interval = interval ?? TimeSpan.FromSeconds(2);
    private TimeSpan _last;
    private long _doneBefore;

    public TimeSpan Elapsed => _clock.Elapsed;

    /// <summary>A file has been read completely.</summary>
    public void FileDone(long bytes) => _doneBefore += bytes;

    /// <summary><paramref name="bytesInFile"/> bytes of the current file have been read.</summary>
    public void Report(long bytesInFile)
    {
        var now = _clock.Elapsed;
        if (now - _last < _interval) return;
        _last = now;
        err.WriteLine(Line(_doneBefore + bytesInFile, now));
    }

    public string Summary() => Line(totalBytes, _clock.Elapsed, done: true);

    private string Line(long bytes, TimeSpan elapsed, bool done = false)
    {
        var c = CultureInfo.InvariantCulture;
        double seconds = Math.Max(1e-3, elapsed.TotalSeconds);
        long t = tokens();
        double fraction = totalBytes > 0 ? Math.Min(1, (double)bytes / totalBytes) : 1;
        string text = string.Create(c, $"{pass}: {bytes / 1e6:F1} MB of {totalBytes / 1e6:F1} MB ({fraction * 100:F0}%), {t / 1e6:F2} M tokens, {t / seconds / 1e6:F2} M tokens/s");
        if (done) return text + string.Create(c, $", {seconds:F1} s");
        if (fraction > 0.001) text += string.Create(c, $", about {seconds * (1 - fraction) / fraction:F0} s left");
        return text;
    }
}
