using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class TargetRowCounterTests
{
    // Stream codes: ids ≥ -1, -2 = line break, -3 = paragraph break.
    private static void Feed(SenseSplit.Core.Text.IIdSink sink, int[] stream)
    {
        foreach (int v in stream)
        {
            if (v == -2) sink.LineBreak();
            else if (v == -3) sink.ParagraphBreak();
            else sink.Id(v);
        }
    }

    [Fact]
    public void Row_SmallStream_MatchesHandCount()
    {
        // Symmetric window with weight 1/d (common practice; Pennington, Socher & Manning 2014, "GloVe", §4.2).
        // Stream a b a c (ids 0 1 0 2), window 2: pairs (a,b) d1, (a,a) d2, (b,a) d1, (b,c) d2, (a,c) d1.
        // Row a: X[a,b] = 1 + 1 = 2, X[a,a] = 2 · 1/2 = 1 (seen from both occurrences), X[a,c] = 1. Row c: X[c,b] = 1/2, X[c,a] = 1.
        var counter = new TargetRowCounter(3, [0, 2], 2, false);
        Feed(counter, [0, 1, 0, 2]);
        var (ctxA, xA) = counter.Row(0);
        Assert.Equal([0, 1, 2], ctxA);
        Assert.Equal([1.0, 2.0, 1.0], xA);
        var (ctxC, xC) = counter.Row(1);
        Assert.Equal([0, 1], ctxC);
        Assert.Equal([1.0, 0.5], xC);
        Assert.Equal(4, counter.RowTotal(0));
        Assert.Equal(2, counter.Occurrences(0));
        Assert.Equal(1, counter.Occurrences(1));
    }

    [Fact]
    public void Row_BreaksAndUnkeptWords_FollowSegmentRules()
    {
        // a -1 b | a  with window 5: -1 keeps its position (a,b at distance 2); a line break ends the segment unless
        // windows run across lines; a paragraph break always does.
        var within = new TargetRowCounter(2, [0], 5, false);
        Feed(within, [0, -1, 1, -2, 0]);
        Assert.Equal([1], within.Row(0).Contexts);
        Assert.Equal([0.5], within.Row(0).Counts);
        var across = new TargetRowCounter(2, [0], 5, true);
        Feed(across, [0, -1, 1, -2, 0]);
        // Across the line (a break takes no position): (b, a) at distance 1 adds to (a, b) at distance 2, and (a, a)
        // at distance 3 gives X[a,a] = 2 · 1/3.
        Assert.Equal([0, 1], across.Row(0).Contexts);
        Assert.Equal(2.0 / 3, across.Row(0).Counts[0], 12);
        Assert.Equal(1.5, across.Row(0).Counts[1], 12);
        var paragraph = new TargetRowCounter(2, [0], 5, true);
        Feed(paragraph, [0, -1, 1, -3, 0]);
        Assert.Equal([1], paragraph.Row(0).Contexts);
    }

    [Theory]
    [InlineData(1, 5, false, 1)]
    [InlineData(2, 3, true, 2)]
    [InlineData(3, 1, false, 3)]
    [InlineData(4, 8, true, 1)]
    public void Row_RandomStreams_EqualEmbedCounterRows(int seed, int window, bool acrossLines, int threads)
    {
        // The fold-in must see exactly the rows the embed pipeline counted: compare with CooccurrenceCounter's full matrix.
        var rng = new Random(seed);
        int words = 60;
        var stream = new int[120_000];
        for (int i = 0; i < stream.Length; i++)
        {
            int r = rng.Next(100);
            stream[i] = r < 4 ? -2 : r < 6 ? -3 : r < 11 ? -1 : (int)Math.Min(words - 1, Math.Floor(Math.Pow(rng.NextDouble(), 2) * words));
        }
        int[] targets = [0, 7, 31, 59];
        var rows = new TargetRowCounter(words, targets, window, acrossLines);
        Feed(rows, stream);
        CooccurrenceCounts full;
        using (var counter = new CooccurrenceCounter(words, new CooccurrenceOptions { Window = window, WindowAcrossLines = acrossLines, Threads = threads }))
        {
            Feed(counter, stream);
            full = counter.Complete();
        }
        var sums = full.RowSums();
        for (int t = 0; t < targets.Length; t++)
        {
            var dense = new double[words];
            var (ctx, x) = rows.Row(t);
            for (int i = 0; i < ctx.Length; i++) dense[ctx[i]] = x[i];
            for (int c = 0; c < words; c++)
            {
                // The embed counter stores float32 values of the same exact sums: agree to float precision.
                double expected = full.Get(targets[t], c);
                Assert.True(Math.Abs(expected - dense[c]) <= 1e-6 * Math.Max(1, expected), $"target {targets[t]}, context {c}: {dense[c]} vs embed {expected}");
            }
            Assert.Equal(sums[targets[t]], rows.RowTotal(t), 1e-6 * sums[targets[t]]);
            Assert.Equal(full.WordCounts[targets[t]], rows.Occurrences(t));
        }
        Assert.Equal(full.Tokens, rows.Tokens);
    }

    [Fact]
    public void Constructor_BadArguments_Throw()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new TargetRowCounter(5, [5], 2, false));
        Assert.Throws<ArgumentException>(() => new TargetRowCounter(5, [1, 1], 2, false));
        Assert.Throws<ArgumentOutOfRangeException>(() => new TargetRowCounter(5, [1], 0, false));
        Assert.Throws<ArgumentOutOfRangeException>(() => new TargetRowCounter(5, [1], 21, false));
        var counter = new TargetRowCounter(5, [1], 2, false);
        Assert.Throws<ArgumentOutOfRangeException>(() => counter.Id(5));
        Assert.Throws<ArgumentOutOfRangeException>(() => counter.Id(-2));
    }
}
