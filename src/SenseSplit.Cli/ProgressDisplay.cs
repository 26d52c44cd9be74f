using System.Diagnostics;
using System.Globalization;

namespace SenseSplit.Cli;

/// <summary>
/// Progress on stderr: one line rewritten in place when stderr is a terminal, plain lines (at most one every
/// <see cref="MinInterval"/>) otherwise, so logs stay readable. The clock lives here, never in the core.
/// </summary>
public sealed class ProgressDisplay(TextWriter err, string task, bool? interactive = null)
{
    public static readonly TimeSpan MinInterval = TimeSpan.FromSeconds(2);
    private readonly Stopwatch _clock = Stopwatch.StartNew();
    private readonly bool _interactive = interactive ?? (!Console.IsErrorRedirected && ReferenceEquals(err, Console.Error));
    private TimeSpan _last = TimeSpan.MinValue;
    private bool _open;

    public TimeSpan Elapsed => _clock.Elapsed;

    /// <summary>Reports <paramref name="done"/> of <paramref name="total"/> units with a message; estimates the time left.</summary>
    public void Report(double done, double total, string message, bool force = false)
    {
        var now = _clock.Elapsed;
        if (!force && now - _last < (_interactive ? TimeSpan.FromMilliseconds(200) : MinInterval)) return;
        _last = now;
        string eta = "";
        if (total > 0 && done > 0 && done < total)
            eta = ", about " + Format(TimeSpan.FromSeconds(now.TotalSeconds * (total - done) / done)) + " left";
        string line = string.Create(CultureInfo.InvariantCulture, $"{task}: {message} [{Format(now)}{eta}]");
        if (_interactive) { err.Write("\r" + line.PadRight(100)); _open = true; }
        else err.WriteLine(line);
    }

    /// <summary>Ends the progress line and prints a final message.</summary>
    public void Done(string message)
    {
        if (_open) { err.WriteLine(); _open = false; }
        err.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{task}: {message} [{Format(_clock.Elapsed)}]"));
    }

    public static string Format(TimeSpan t) =>
        t.TotalHours >= 1 ? $"{(int)t.TotalHours}h{t.Minutes:00}m" : t.TotalMinutes >= 1 ? $"{(int)t.TotalMinutes}m{t.Seconds:00}s" : string.Create(CultureInfo.InvariantCulture, $"{t.TotalSeconds:0.0}s");
}
