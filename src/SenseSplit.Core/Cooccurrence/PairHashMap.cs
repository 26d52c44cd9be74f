using System.Runtime.InteropServices;

namespace SenseSplit.Core.Cooccurrence;

/// <summary>One slot of a <see cref="PairHashMap"/>: a pair key (0 = empty) and its sum, side by side so that a probe
/// touches one cache line.</summary>
[StructLayout(LayoutKind.Sequential)]
public struct PairEntry
{
    public ulong Key;
    public long Value;
}

/// <summary>
/// Open-addressing (linear probing) map from a non-zero 64-bit pair key to a 64-bit sum, grown by doubling up to a
/// byte limit. <see cref="TryAdd"/> returns false when the map is full at that limit; the caller then empties it
/// (<see cref="SortedView"/>, <see cref="Clear"/>) and goes on.
/// </summary>
/// <remarks>Slots hold key and sum together (16 bytes), so a hit costs one memory access rather than two. The slot
/// of a key is taken from bits 32 and up of key · ⌊2^64/φ⌋ (multiplicative hashing, Knuth, TAOCP vol. 3, §6.4), which
/// spreads the packed (row, column) keys; the co-occurrence counter picks its bucket from the top 6 bits of the same
/// product, so the bits used here stay independent of the bucket while a map has fewer than 2^26 slots.</remarks>
public sealed class PairHashMap
{
    private const int BytesPerSlot = 16;
    private PairEntry[] _slots = [];
    private int _count;
    private int _growAt;
    private readonly long _maxSlots;

    /// <param name="initialSlots">Starting slot count (rounded up to a power of two).</param>
    /// <param name="maxBytes">Most bytes the slot array may take, counting the old and new arrays during a resize.</param>
    public PairHashMap(int initialSlots, long maxBytes)
    {
        // A resize holds the old (s/2) and new (s) arrays at once: 1.5 s slots.
        long maxSlots = 1024;
        while (maxSlots * 2 * BytesPerSlot * 3 / 2 <= maxBytes && maxSlots * 2 <= 1 << 30) maxSlots *= 2;
        _maxSlots = maxSlots;
        int slots = 1024;
        while (slots < initialSlots && slots < _maxSlots) slots *= 2;
        Allocate(slots);
    }

    public int Count => _count;
    public int Slots => _slots.Length;
    public long Bytes => (long)_slots.Length * BytesPerSlot;

    private static int GrowThreshold(int slots) => (int)(slots * 0.7);

    private void Allocate(int slots)
    {
        _slots = new PairEntry[slots];
        _growAt = GrowThreshold(slots);
    }

    private static int Slot(ulong key, int mask) => (int)((key * 0x9E3779B97F4A7C15UL) >> 32) & mask;

    /// <summary>Adds <paramref name="amount"/> to the sum of <paramref name="key"/> (not 0). False: the map is full.</summary>
    public bool TryAdd(ulong key, long amount)
    {
        var slots = _slots;
        int mask = slots.Length - 1;
        int s = Slot(key, mask);
        while (true)
        {
            ref var e = ref slots[s];
            if (e.Key == key) { e.Value += amount; return true; }
            if (e.Key == 0) break;
            s = (s + 1) & mask;
        }
        if (_count >= _growAt)
        {
            if (slots.Length >= _maxSlots) return false;
            Grow();
            return TryAdd(key, amount);
        }
        slots[s].Key = key;
        slots[s].Value = amount;
        _count++;
        return true;
    }

    /// <summary>Adds, growing without limit (for maps whose limit is effectively unbounded).</summary>
    public void Add(ulong key, long amount)
    {
        if (!TryAdd(key, amount)) throw new InvalidOperationException($"pair map is full ({_count} pairs in {Bytes} bytes)");
    }

    public long Get(ulong key)
    {
        int mask = _slots.Length - 1;
        int s = Slot(key, mask);
        while (true)
        {
            ref var e = ref _slots[s];
            if (e.Key == key) return e.Value;
            if (e.Key == 0) return 0;
            s = (s + 1) & mask;
        }
    }

    private void Grow()
    {
        var old = _slots;
        Allocate(old.Length * 2);
        var slots = _slots;
        int mask = slots.Length - 1;
        foreach (var e in old)
        {
            if (e.Key == 0) continue;
            int s = Slot(e.Key, mask);
            while (slots[s].Key != 0) s = (s + 1) & mask;
            slots[s] = e;
        }
    }

    /// <summary>Every (key, sum), in slot order.</summary>
    public IEnumerable<(ulong Key, long Value)> Entries()
    {
        for (int i = 0; i < _slots.Length; i++)
            if (_slots[i].Key != 0) yield return (_slots[i].Key, _slots[i].Value);
    }

    /// <summary>Sorts the entries into the front of the slot array (destroying the hash layout) by a radix sort over the
    /// low <paramref name="keyBits"/> key bits and returns them; call <see cref="Clear"/> before using the map again.</summary>
    /// <param name="scratch">At least <see cref="Count"/> entries.</param>
    internal (PairEntry[] Entries, int Count) SortedView(PairEntry[] scratch, int keyBits)
    {
        int n = Compact();
        PairSort.ByKey(_slots.AsSpan(0, n), scratch, keyBits);
        return (_slots, n);
    }

    /// <summary>Empties the map (same capacity).</summary>
    public void Clear()
    {
        Array.Clear(_slots);
        _count = 0;
    }

    private int Compact()
    {
        int n = 0;
        for (int i = 0; i < _slots.Length; i++)
            if (_slots[i].Key != 0) _slots[n++] = _slots[i];
        return n;
    }
}

/// <summary>
/// Least-significant-digit radix sort of pair entries by key (Knuth, TAOCP vol. 3, §5.2.5, "radix sorting"): stable
/// counting passes over digits of at most 11 bits, the lowest digit first; only the low <c>keyBits</c> bits of the
/// keys are looked at (keys below 2^keyBits), in ⌈keyBits / 11⌉ passes of one read and one write each. The test
/// compares it with a comparison sort.
/// </summary>
public static class PairSort
{
    private const int MaxDigitBits = 11;

    /// <param name="entries">Entries with keys below 2^<paramref name="keyBits"/>; sorted in place.</param>
    /// <param name="scratch">At least as long as <paramref name="entries"/>; overwritten.</param>
    /// <param name="keyBits">Bits of the keys (1..64).</param>
    public static void ByKey(Span<PairEntry> entries, Span<PairEntry> scratch, int keyBits)
    {
        if (keyBits < 1 || keyBits > 64) throw new ArgumentOutOfRangeException(nameof(keyBits), keyBits, $"key bits ({keyBits}) must be between 1 and 64");
        Guard.AtLeastLength(scratch.Length, entries.Length, "scratch");
        if (entries.Length < 2) return;
        int passes = (keyBits + MaxDigitBits - 1) / MaxDigitBits;
        int digitBits = (keyBits + passes - 1) / passes;
        int radix = 1 << digitBits;
        ulong digitMask = (ulong)radix - 1;
        // All digit histograms in one read.
        var counts = new int[passes * radix];
        foreach (ref readonly var e in entries)
            for (int p = 0; p < passes; p++) counts[p * radix + (int)((e.Key >> (p * digitBits)) & digitMask)]++;
        Span<PairEntry> from = entries, to = scratch[..entries.Length];
        for (int p = 0; p < passes; p++)
        {
            var offsets = counts.AsSpan(p * radix, radix);
            // A digit that is the same for every entry moves nothing.
            if (offsets.IndexOf(entries.Length) >= 0) continue;
            int sum = 0;
            for (int d = 0; d < radix; d++) { int c = offsets[d]; offsets[d] = sum; sum += c; }
            int shift = p * digitBits;
            foreach (ref readonly var e in from) to[offsets[(int)((e.Key >> shift) & digitMask)]++] = e;
            var t = from; from = to; to = t;
        }
        if (from != entries) from.CopyTo(entries);
    }
}
