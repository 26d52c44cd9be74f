using SenseSplit.Core.Cooccurrence;

namespace SenseSplit.Tests.Cooccurrence;

public class PairHashMapTests
{
    [Fact]
    public void TryAdd_RandomKeys_SumsMatchDictionary()
    {
        // Reference: System.Collections.Generic.Dictionary (BCL) summing the same stream.
        var rng = new Random(3);
        var map = new PairHashMap(16, long.MaxValue);
        var reference = new Dictionary<ulong, long>();
        for (int i = 0; i < 200_000; i++)
        {
            ulong key = ((ulong)rng.Next(1, 3000) << 20) | (uint)rng.Next(1 << 20);
            long amount = rng.Next(1, 60);
            Assert.True(map.TryAdd(key, amount));
            reference[key] = reference.GetValueOrDefault(key) + amount;
        }
        Assert.Equal(reference.Count, map.Count);
        foreach (var (key, sum) in reference) Assert.Equal(sum, map.Get(key));
        Assert.Equal(0, map.Get(12345));
    }

    [Fact]
    public void TryAdd_AtByteLimit_ReturnsFalseAndKeepsEntries()
    {
        // 1024 slots at most (16 KB, with room for a resize): 70% of them fill, the next new key is refused.
        var map = new PairHashMap(1024, 1024 * 16 * 3 / 2);
        int added = 0;
        ulong key = 1;
        while (map.TryAdd(key, 1)) { added++; key++; }
        Assert.Equal((int)(1024 * 0.7), added);
        Assert.Equal(added, map.Count);
        Assert.True(map.TryAdd(1, 5)); // an existing key still adds
        Assert.Equal(6, map.Get(1));
    }

    [Fact]
    public void SortedView_ThenClear_SortedAndEmpty()
    {
        var rng = new Random(5);
        var map = new PairHashMap(1024, long.MaxValue);
        var keys = new HashSet<ulong>();
        while (keys.Count < 5000) keys.Add((ulong)rng.NextInt64(1, 1L << 40));
        foreach (ulong k in keys) map.TryAdd(k, (long)(k % 97));
        var (entries, n) = map.SortedView(new PairEntry[map.Count], 40);
        var expected = keys.OrderBy(k => k).ToArray();
        Assert.Equal(expected.Length, n);
        for (int i = 0; i < n; i++)
        {
            Assert.Equal(expected[i], entries[i].Key);
            Assert.Equal((long)(expected[i] % 97), entries[i].Value);
        }
        map.Clear();
        Assert.Equal(0, map.Count);
        Assert.Equal(0, map.Get(expected[0]));
    }
}

public class PairSortTests
{
    [Theory]
    [InlineData(0, 8)]
    [InlineData(1, 8)]
    [InlineData(2, 1)]
    [InlineData(1000, 11)]
    [InlineData(1000, 12)]
    [InlineData(5000, 30)]
    [InlineData(5000, 34)]
    [InlineData(3000, 48)]
    [InlineData(3000, 64)]
    public void ByKey_RandomKeys_MatchesComparisonSort(int count, int keyBits)
    {
        // Reference: Array.Sort (the BCL's comparison sort) of the same keys.
        var rng = new Random(count * 100 + keyBits);
        ulong limit = keyBits == 64 ? ulong.MaxValue : (1UL << keyBits) - 1;
        var keys = new HashSet<ulong>();
        while (keys.Count < count && (ulong)keys.Count <= limit)
        {
            ulong k = (ulong)rng.NextInt64() | ((ulong)rng.Next(2) << 63);
            keys.Add(k & limit);
        }
        var entries = keys.Select(k => new PairEntry { Key = k, Value = (long)(k * 31 % 1009) }).ToArray();
        var expected = keys.ToArray();
        Array.Sort(expected);
        PairSort.ByKey(entries, new PairEntry[entries.Length], keyBits);
        Assert.Equal(expected, entries.Select(e => e.Key).ToArray());
        Assert.All(entries, e => Assert.Equal((long)(e.Key * 31 % 1009), e.Value));
    }

    [Fact]
    public void ByKey_ShortScratch_Throws()
    {
        var entries = new PairEntry[4];
        Assert.Throws<ArgumentException>(() => PairSort.ByKey(entries, new PairEntry[3], 10));
        Assert.Throws<ArgumentOutOfRangeException>(() => PairSort.ByKey(entries, new PairEntry[4], 0));
    }
}
