using System.Diagnostics;
using System.Globalization;

namespace SenseSplit.Cli;

/// <summary>
/// Progress of a long command on stderr, shared by every command. On a terminal one live line is rewritten in place
/// (carriage return, throttled to ten redraws a second); when stderr is a file or pipe each update is a plain line
/// (optionally at most one per <c>plainInterval</c>) so logs stay readable. The clock lives here, in the CLI; the
/// numerical core only reports counts through <see cref="IProgress{T}"/>. Safe to call from worker threads.
/// </summary>
public sealed class ProgressDisplay
{
    private static readonly TimeSpan RedrawInterval = TimeSpan.FromMilliseconds(100);
    private readonly TextWriter _err;
    private readonly Func<TimeSpan> _clock;
    private readonly TimeSpan _plainInterval;
    private readonly Lock _lock = new();
    private TimeSpan _stageStart;
    private TimeSpan? _lastDraw; // null: nothing drawn in this stage yet
    private string? _stage;
    private int _liveLength; // characters of the live line currently on screen (terminal mode)

    /// <param name="err">Where to write (stderr).</param>
    /// <param name="interactive">True when <paramref name="err"/> is a terminal: rewrite one line in place.</param>
    /// <param name="clock">Elapsed time since start; a <see cref="Stopwatch"/> when null (tests pass a fake).</param>
    /// <param name="plainInterval">In plain mode, the least time between two progress lines (zero: every update).</param>
    public ProgressDisplay(TextWriter err, bool interactive, Func<TimeSpan>? clock = null, TimeSpan? plainInterval = null)
    {
        _err = err;
        Interactive = interactive;
        if (clock is null)
        {
            var watch = Stopwatch.StartNew();
            clock = () => watch.Elapsed;
        }
        _clock = clock;
        _plainInterval = plainInterval ?? TimeSpan.Zero;
    }

    /// <summary>A display for a command's stderr: interactive exactly when it is the process's real, unredirected stderr.</summary>
    public static ProgressDisplay For(CliContext context, TimeSpan? plainInterval = null)
        => new(context.Err, ReferenceEquals(context.Err, Console.Error) && !Console.IsErrorRedirected, null, plainInterval);

    public bool Interactive { get; }

    /// <summary>Time since the display was created.</summary>
    public TimeSpan Elapsed => _clock();

    /// <summary>Starts a named stage ("reading vectors"); prints it as a line.</summary>
    public void Stage(string name)
    {
        lock (_lock)
        {
            ClearLive();
            _stage = name;
            _stageStart = _clock();
            _lastDraw = null;
            _err.WriteLine($"{name}...");
        }
    }

    /// <summary>Ends the current stage with its duration and an optional result ("400000 words, 300 dimensions").</summary>
    public void EndStage(string? result = null)
    {
        lock (_lock)
        {
            ClearLive();
            var took = _clock() - _stageStart;
            _err.WriteLine($"{_stage ?? "done"}: {(result is null ? "" : result + ", ")}{FormatSeconds(took)}");
            _stage = null;
        }
    }

    /// <summary>Reports <paramref name="done"/> of <paramref name="total"/> units of the current stage, e.g.
    /// "round 3/30  error 0.41234  elapsed 0:12  about 1:05 left". The estimate extrapolates the stage's pace;
    /// when work can stop early (convergence) it is an upper bound.</summary>
    public void Update(string unit, long done, long total, string? detail = null)
    {
        lock (_lock)
        {
            var now = _clock();
            bool last = done >= total;
            var interval = Interactive ? RedrawInterval : _plainInterval;
            if (!last && _lastDraw is { } previous && now - previous < interval)
                return;
            _lastDraw = now;
            string line = FormatUpdate(unit, done, total, detail, now - _stageStart, now);
            if (Interactive)
            {
                _err.Write('\r');
                int width = Math.Max(line.Length, _liveLength); // pad over what a longer earlier draw left on screen
                _err.Write(line.PadRight(width));
                _liveLength = width;
                _err.Flush();
            }
            else
            {
                _err.WriteLine(line);
            }
        }
    }

    /// <summary>A line of information (not a warning), printed below any live line.</summary>
    public void Message(string text)
    {
        lock (_lock) { ClearLive(); _err.WriteLine(text); }
    }

    /// <summary>A warning: "warning: ..." on its own line; processing continues.</summary>
    public void Warn(string text)
    {
        lock (_lock) { ClearLive(); _err.WriteLine($"warning: {text}"); }
    }

    /// <summary>The closing summary: a title and aligned "label: value" rows.</summary>
    public void Summary(string title, IReadOnlyList<(string Label, string Value)> rows)
    {
        lock (_lock)
        {
            ClearLive();
            _err.WriteLine(title);
            int width = rows.Count == 0 ? 0 : rows.Max(r => r.Label.Length);
            foreach (var (label, value) in rows)
                _err.WriteLine($"  {(label + ":").PadRight(width + 1)} {value}");
        }
    }

    internal static string FormatUpdate(string unit, long done, long total, string? detail, TimeSpan stageElapsed, TimeSpan totalElapsed)
    {
        var sb = new System.Text.StringBuilder();
        sb.Append(unit).Append(' ').Append(done.ToString(CultureInfo.InvariantCulture)).Append('/').Append(total.ToString(CultureInfo.InvariantCulture));
        if (!string.IsNullOrEmpty(detail)) sb.Append("  ").Append(detail);
        sb.Append("  elapsed ").Append(FormatClock(totalElapsed));
        if (done > 0 && done < total)
        {
            var left = TimeSpan.FromTicks((long)(stageElapsed.Ticks / (double)done * (total - done)));
            sb.Append("  at most ~").Append(FormatClock(left)).Append(" left");
        }
        return sb.ToString();
    }

    /// <summary>"m:ss" below an hour, "h:mm:ss" from an hour on.</summary>
    public static string FormatClock(TimeSpan t)
    {
        if (t < TimeSpan.Zero) t = TimeSpan.Zero;
        long s = (long)t.TotalSeconds;
        return s >= 3600
            ? string.Create(CultureInfo.InvariantCulture, $"{s / 3600}:{s / 60 % 60:00}:{s % 60:00}")
            : string.Create(CultureInfo.InvariantCulture, $"{s / 60}:{s % 60:00}");
    }

    /// <summary>"0.42 s", "12.3 s", "2:05" (minutes) for durations in summaries.</summary>
    public static string FormatSeconds(TimeSpan t)
        => t.TotalSeconds < 1 ? string.Create(CultureInfo.InvariantCulture, $"{t.TotalSeconds:0.00} s")
         : t.TotalSeconds < 60 ? string.Create(CultureInfo.InvariantCulture, $"{t.TotalSeconds:0.0} s")
         : FormatClock(t);

    private void ClearLive()
    {
        if (_liveLength == 0) return;
        _err.Write('\r');
        _err.Write(new string(' ', _liveLength));
        _err.Write('\r');
        _liveLength = 0;
    }
}
