using SenseSplit.Cli;

namespace SenseSplit.Tests.Cli;

public class ProgressDisplayTests
{
    private sealed class FakeClock
    {
        public TimeSpan Now;
        public TimeSpan Read() => Now;
    }

    [Fact]
    public void Update_PlainMode_OneLinePerUpdateWithElapsedAndEstimate()
    {
        var err = new StringWriter();
        var clock = new FakeClock();
        var p = new ProgressDisplay(err, interactive: false, clock.Read);
        p.Stage("learning");
        clock.Now = TimeSpan.FromSeconds(12);
        p.Update("round", 3, 30, "error 0.41234");
        clock.Now = TimeSpan.FromSeconds(16);
        p.Update("round", 4, 30, "error 0.40000");
        var lines = err.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries);
        Assert.Equal("learning...", lines[0]);
        // 12 s for 3 rounds -> 4 s a round -> 27 rounds left = 108 s = 1:48.
        Assert.Equal("round 3/30  error 0.41234  elapsed 0:12  at most ~1:48 left", lines[1]);
        Assert.Equal("round 4/30  error 0.40000  elapsed 0:16  at most ~1:44 left", lines[2]);
        Assert.DoesNotContain('\r', err.ToString());
    }

    [Fact]
    public void Update_PlainModeWithInterval_ThrottlesButAlwaysPrintsTheLast()
    {
        var err = new StringWriter();
        var clock = new FakeClock();
        var p = new ProgressDisplay(err, interactive: false, clock.Read, plainInterval: TimeSpan.FromSeconds(5));
        p.Stage("counting");
        for (int i = 1; i <= 10; i++)
        {
            clock.Now = TimeSpan.FromSeconds(i);
            p.Update("line", i, 10);
        }
        var lines = err.ToString().Split('\n', StringSplitOptions.RemoveEmptyEntries).Skip(1).ToArray();
        Assert.Equal(["line 1/10  elapsed 0:01  at most ~0:09 left", "line 6/10  elapsed 0:06  at most ~0:04 left", "line 10/10  elapsed 0:10"], lines);
    }

    [Fact]
    public void Update_Interactive_RewritesOneLineAndClearsItForMessages()
    {
        var err = new StringWriter();
        var clock = new FakeClock();
        var p = new ProgressDisplay(err, interactive: true, clock.Read);
        p.Stage("learning");
        clock.Now = TimeSpan.FromSeconds(1);
        p.Update("round", 1, 3, "error 0.5");
        clock.Now = TimeSpan.FromSeconds(1.05); // within 100 ms: not redrawn
        p.Update("round", 1, 3, "error 0.4");
        clock.Now = TimeSpan.FromSeconds(2);
        p.Update("round", 2, 3);
        p.Warn("slow");
        string s = err.ToString();
        Assert.Contains("\rround 1/3  error 0.5  elapsed 0:01", s);
        Assert.DoesNotContain("error 0.4", s);
        // The second draw pads over the longer first one, then the warning clears the live line first.
        string second = "round 2/3  elapsed 0:02  at most ~0:01 left";
        Assert.Contains("\r" + second.PadRight("round 1/3  error 0.5  elapsed 0:01  at most ~0:02 left".Length), s);
        Assert.EndsWith("\r" + new string(' ', "round 1/3  error 0.5  elapsed 0:01  at most ~0:02 left".Length) + "\rwarning: slow" + Environment.NewLine, s);
    }

    [Fact]
    public void EndStageAndSummary_Formatted()
    {
        var err = new StringWriter();
        var clock = new FakeClock();
        var p = new ProgressDisplay(err, interactive: false, clock.Read);
        p.Stage("reading vectors");
        clock.Now = TimeSpan.FromSeconds(2.345);
        p.EndStage("3 words");
        p.Summary("done", [("words", "3"), ("final error", "0.1")]);
        Assert.Equal(string.Join(Environment.NewLine, "reading vectors...", "reading vectors: 3 words, 2.3 s", "done", "  words:       3", "  final error: 0.1", ""), err.ToString());
    }

    [Theory]
    [InlineData(0, "0:00")]
    [InlineData(59.9, "0:59")]
    [InlineData(61, "1:01")]
    [InlineData(3725, "1:02:05")]
    [InlineData(-5, "0:00")]
    public void FormatClock_MinutesAndHours(double seconds, string expected)
        => Assert.Equal(expected, ProgressDisplay.FormatClock(TimeSpan.FromSeconds(seconds)));
}
