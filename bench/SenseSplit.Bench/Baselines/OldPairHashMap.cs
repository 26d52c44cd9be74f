// The pair map as it was at commit 909f2ad (keys and sums in two arrays), for the "before" counter of `bench embed`.

namespace SenseSplit.Bench.Baselines;

/// <summary>
/// Open-addressing (linear probing) map from a non-zero 64-bit pair key to a 64-bit sum, grown by doubling up to a
/// byte limit. <see cref="TryAdd"/> returns false when the map is full at that limit; the caller then drains it
/// (<see cref="DrainSorted"/>) and goes on.
/// </summary>
internal sealed class OldPairHashMap
{
    private const int BytesPerSlot = 16;
    private ulong[] _keys;
    private long[] _values;
    private int _count;
    private int _mask;
    private int _growAt;
    private readonly long _maxSlots;

    /// <param name="initialSlots">Starting slot count (rounded up to a power of two).</param>
    /// <param name="maxBytes">Most bytes the slot arrays may take, counting the old and new arrays during a resize.</param>
    public OldPairHashMap(int initialSlots, long maxBytes)
    {
        // A resize holds the old (s/2) and new (s) arrays at once: 1.5 s slots.
        long maxSlots = 1024;
        while (maxSlots * 2 * BytesPerSlot * 3 / 2 <= maxBytes && maxSlots * 2 <= 1 << 30) maxSlots *= 2;
        _maxSlots = maxSlots;
        int slots = 1024;
        while (slots < initialSlots && slots < _maxSlots) slots *= 2;
        _keys = new ulong[slots];
        _values = new long[slots];
        _mask = slots - 1;
        _growAt = GrowThreshold(slots);
    }

    public int Count => _count;
    public int Slots => _keys.Length;
    public long Bytes => (long)_keys.Length * BytesPerSlot;

    private static int GrowThreshold(int slots) => (int)(slots * 0.7);

    private static int Slot(ulong key, int mask) => (int)((key * 0x9E3779B97F4A7C15UL) >> 32) & mask;

    /// <summary>Adds <paramref name="amount"/> to the sum of <paramref name="key"/> (not 0). False: the map is full.</summary>
    public bool TryAdd(ulong key, long amount)
    {
        var keys = _keys;
        int mask = _mask;
        int s = Slot(key, mask);
        while (true)
        {
            ulong k = keys[s];
            if (k == key) { _values[s] += amount; return true; }
            if (k == 0) break;
            s = (s + 1) & mask;
        }
        if (_count >= _growAt)
        {
            if (_keys.Length >= _maxSlots) return false;
            Grow();
            return TryAdd(key, amount);
        }
        keys[s] = key;
        _values[s] = amount;
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
        int s = Slot(key, _mask);
        while (true)
        {
            ulong k = _keys[s];
            if (k == key) return _values[s];
            if (k == 0) return 0;
            s = (s + 1) & _mask;
        }
    }

    private void Grow()
    {
        var oldKeys = _keys;
        var oldValues = _values;
        int slots = oldKeys.Length * 2;
        var keys = new ulong[slots];
        var values = new long[slots];
        int mask = slots - 1;
        for (int i = 0; i < oldKeys.Length; i++)
        {
            ulong k = oldKeys[i];
            if (k == 0) continue;
            int s = Slot(k, mask);
            while (keys[s] != 0) s = (s + 1) & mask;
            keys[s] = k;
            values[s] = oldValues[i];
        }
        _keys = keys;
        _values = values;
        _mask = mask;
        _growAt = GrowThreshold(slots);
    }

    /// <summary>Every (key, sum), in slot order.</summary>
    public IEnumerable<(ulong Key, long Value)> Entries()
    {
        for (int i = 0; i < _keys.Length; i++)
            if (_keys[i] != 0) yield return (_keys[i], _values[i]);
    }

    /// <summary>Moves every entry to the front of the slot arrays, sorts them by key and hands them to
    /// <paramref name="consume"/>; the map is empty afterwards (same capacity).</summary>
    public void DrainSorted(Action<ReadOnlyMemory<ulong>, ReadOnlyMemory<long>> consume)
    {
        ArgumentNullException.ThrowIfNull(consume);
        int n = CompactSorted();
        consume(_keys.AsMemory(0, n), _values.AsMemory(0, n));
        Array.Clear(_keys);
        _count = 0;
    }

    /// <summary>Sorts the entries into the front of the slot arrays (destroying the hash layout) and returns them;
    /// call <see cref="Clear"/> before using the map again.</summary>
    internal (ulong[] Keys, long[] Values, int Count) SortedView() => (_keys, _values, CompactSorted());

    /// <summary>Empties the map (same capacity).</summary>
    public void Clear()
    {
        Array.Clear(_keys);
        _count = 0;
    }

    /// <summary>Sorts the entries into the front of the arrays (destroying the hash layout) and returns them; the map
    /// must not be used afterwards.</summary>
    internal (ulong[] Keys, long[] Values, int Count) TakeSorted()
    {
        int n = CompactSorted();
        var result = (_keys, _values, n);
        _keys = [];
        _values = [];
        _count = 0;
        return result;
    }

    private int CompactSorted()
    {
        int n = 0;
        for (int i = 0; i < _keys.Length; i++)
        {
            if (_keys[i] == 0) continue;
            _keys[n] = _keys[i];
            _values[n] = _values[i];
            n++;
        }
        Array.Sort(_keys, _values, 0, n);
        return n;
    }
}
