using SenseSplit.Core.Cooccurrence;

namespace SenseSplit.Tests.Cooccurrence;

public class CooccurrenceCounterTests
{
    /// <summary>A random stream: ids in [-1, words) with occasional line (-2) and paragraph (-3) breaks.</summary>
    private static int[] RandomStream(Random rng, int length, int words)
    {
        var s = new int[length];
        for (int i = 0; i < length; i++)
        {
            int r = rng.Next(100);
            s[i] = r < 5 ? -2 : r < 7 ? -3 : r < 12 ? -1 : (int)Math.Min(words - 1, Math.Floor(Math.Pow(rng.NextDouble(), 3) * words));
        }
        return s;
    }

    /// <summary>Brute force: full matrix, for every position, every earlier position within the window and segment.</summary>
    private static double[,] BruteForce(int[] stream, int words, int window, bool acrossLines)
    {
        var x = new double[words, words];
        var segment = new List<int>();
        void Flush()
        {
            for (int i = 0; i < segment.Count; i++)
                for (int j = Math.Max(0, i - window); j < i; j++)
                {
                    int a = segment[i], b = segment[j];
                    if (a < 0 || b < 0) continue;
                    x[a, b] += 1.0 / (i - j);
                    x[b, a] += 1.0 / (i - j);
                }
            segment.Clear();
        }
        foreach (int v in stream)
        {
            if (v == -3 || (v == -2 && !acrossLines)) Flush();
            else if (v >= -1) segment.Add(v);
        }
        Flush();
        return x;
    }

    private static CooccurrenceCounts Count(int[] stream, int words, CooccurrenceOptions options, IRunStore? store = null)
    {
        using var counter = new CooccurrenceCounter(words, options, store);
        foreach (int v in stream)
        {
            if (v == -2) counter.LineBreak();
            else if (v == -3) counter.ParagraphBreak();
            else counter.Id(v);
        }
        return counter.Complete();
    }

    [Theory]
    [InlineData(1, 5, false, 1)]
    [InlineData(2, 5, false, 2)]
    [InlineData(3, 2, true, 2)]
    [InlineData(4, 7, true, 3)]
    [InlineData(5, 1, false, 1)]
    public void Complete_RandomStreams_MatchBruteForce(int seed, int window, bool acrossLines, int threads)
    {
        var rng = new Random(seed);
        int words = 40;
        // Longer than one internal block (2^18 ids) so pairs across block edges are exercised.
        var stream = RandomStream(rng, 300_000, words);
        var counts = Count(stream, words, new CooccurrenceOptions { Window = window, WindowAcrossLines = acrossLines, Threads = threads });
        var expected = BruteForce(stream, words, window, acrossLines);
        for (int i = 0; i < words; i++)
            for (int j = 0; j < words; j++)
                Assert.True(Math.Abs(expected[i, j] - counts.Get(i, j)) <= 1e-6 * Math.Max(1, expected[i, j]), $"X[{i},{j}] = {counts.Get(i, j)}, brute force {expected[i, j]}");
        Assert.Equal(stream.Count(v => v >= -1), counts.Tokens);
    }

    [Fact]
    public void Complete_WordsAboveDenseCutoff_MatchBruteForce()
    {
        // 3000 words: ids past the dense-table cutoff (2048) go through the hash map.
        var rng = new Random(11);
        int words = 3000;
        var stream = RandomStream(rng, 40_000, words);
        var counts = Count(stream, words, new CooccurrenceOptions { Window = 3, Threads = 2 });
        var expected = BruteForce(stream, words, 3, false);
        for (int i = 0; i < words; i += 7)
            for (int j = 0; j < words; j++)
                Assert.True(Math.Abs(expected[i, j] - counts.Get(i, j)) <= 1e-6 * Math.Max(1, expected[i, j]));
    }

    [Fact]
    public void Complete_TinyBudgetWithSpills_IdenticalToInMemory()
    {
        var rng = new Random(21);
        int words = 20_000;
        var stream = RandomStream(rng, 400_000, words);
        var store = new MemoryRunStore();
        // 1 MB budget: each worker's map holds a few thousand pairs, so it spills many sorted runs.
        var spilled = Count(stream, words, new CooccurrenceOptions { Threads = 2, MemoryBytes = 1 << 20 }, store);
        Assert.True(store.RunCount > 4, $"expected spills, got {store.RunCount} runs");
        var inMemory = Count(stream, words, new CooccurrenceOptions { Threads = 2 });
        AssertIdentical(inMemory, spilled);
    }

    [Fact]
    public void Complete_ThreadCount_DoesNotChangeCounts()
    {
        var rng = new Random(8);
        var stream = RandomStream(rng, 100_000, 5000);
        var one = Count(stream, 5000, new CooccurrenceOptions { Threads = 1 });
        var three = Count(stream, 5000, new CooccurrenceOptions { Threads = 3 });
        AssertIdentical(one, three);
    }

    private static void AssertIdentical(CooccurrenceCounts a, CooccurrenceCounts b)
    {
        Assert.Equal(a.UpperNonZeros, b.UpperNonZeros);
        for (int r = 0; r < a.Words; r++)
        {
            a.GetRow(r, out var ca, out var va);
            b.GetRow(r, out var cb, out var vb);
            Assert.True(ca.SequenceEqual(cb), $"row {r} columns differ");
            Assert.True(va.SequenceEqual(vb), $"row {r} values differ");
        }
    }

    [Theory]
    [InlineData(1, false)]
    [InlineData(2, true)]
    [InlineData(3, false)]
    public void Append_Spans_SameAsValueByValue(int threads, bool acrossLines)
    {
        var rng = new Random(30 + threads);
        int words = 4000;
        var stream = RandomStream(rng, 600_000, words);
        var options = new CooccurrenceOptions { Threads = threads, WindowAcrossLines = acrossLines };
        var one = Count(stream, words, options);
        using var counter = new CooccurrenceCounter(words, options);
        // Uneven span lengths, so that spans end inside blocks and next to marks.
        for (int at = 0; at < stream.Length;)
        {
            int n = Math.Min(stream.Length - at, rng.Next(1, 70_000));
            counter.Append(stream.AsSpan(at, n));
            at += n;
        }
        var bulk = counter.Complete();
        AssertIdentical(one, bulk);
        Assert.Equal(one.WordCounts, bulk.WordCounts);
        Assert.Equal(one.Tokens, bulk.Tokens);
    }

    [Fact]
    public void Append_BadValue_Throws()
    {
        using var counter = new CooccurrenceCounter(3, new CooccurrenceOptions { Threads = 1 });
        Assert.Throws<ArgumentOutOfRangeException>(() => counter.Append([0, 1, 3]));
        Assert.Throws<ArgumentOutOfRangeException>(() => counter.Append([0, -4]));
    }

    [Fact]
    public void Complete_WordCounts_MatchStream()
    {
        var rng = new Random(17);
        var stream = RandomStream(rng, 300_000, 2500);
        var counts = Count(stream, 2500, new CooccurrenceOptions { Threads = 2 });
        var expected = new long[2500];
        foreach (int v in stream) if (v >= 0) expected[v]++;
        Assert.Equal(expected, counts.WordCounts);
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void TextPipeline_LinesAndBlankLines_BoundWindows(bool acrossLines)
    {
        // Tokenizer → word table → ids → counter, as embed runs it. A line end bounds a window unless windows run
        // across lines; a blank line always does (docs/tokenizer.md, "Lines, paragraphs and windows").
        string text = "a b\r\nc d\n\ne f\n";
        var table = new SenseSplit.Core.Text.WordTable();
        var scanner = new SenseSplit.Core.Text.TokenScanner(new SenseSplit.Core.Text.TokenizerOptions());
        var vocabularyPass = new SenseSplit.Core.Text.VocabularyCounter(table);
        scanner.Scan(text, true, vocabularyPass);
        scanner.EndDocument(vocabularyPass);
        var vocab = SenseSplit.Core.Text.Vocabulary.Select(table, 1, 10);
        using var counter = new CooccurrenceCounter(vocab.Count, new CooccurrenceOptions { Window = 5, WindowAcrossLines = acrossLines, Threads = 2 });
        var mapper = new SenseSplit.Core.Text.TokenIdMapper(table, vocab.TableIdToWordId, null, counter);
        scanner.Scan(text, true, mapper);
        scanner.EndDocument(mapper);
        var counts = counter.Complete();
        double X(string p, string q) => counts.Get(Array.IndexOf(vocab.Words, p), Array.IndexOf(vocab.Words, q));
        Assert.Equal(1.0, X("a", "b"));
        Assert.Equal(1.0, X("c", "d"));
        Assert.Equal(1.0, X("e", "f"));
        Assert.Equal(0.0, X("d", "e")); // the blank line
        Assert.Equal(0.0, X("b", "e"));
        Assert.Equal(acrossLines ? 1.0 : 0.0, X("b", "c"));
        Assert.Equal(acrossLines ? 1.0 / 3 : 0.0, X("a", "d"), 6); // stored as float
    }

    [Fact]
    public void Id_OutOfRange_Throws()
    {
        using var counter = new CooccurrenceCounter(3, new CooccurrenceOptions { Threads = 1 });
        Assert.Throws<ArgumentOutOfRangeException>(() => counter.Id(3));
        Assert.Throws<ArgumentOutOfRangeException>(() => new CooccurrenceCounter(3, new CooccurrenceOptions { Window = 21 }));
    }
}
