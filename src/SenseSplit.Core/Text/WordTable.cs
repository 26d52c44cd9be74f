using System.Numerics;
using System.Runtime.InteropServices;

namespace SenseSplit.Core.Text;

/// <summary>
/// Open-addressing hash table from token text (a char span) to a dense id (0, 1, 2, ... in order of first sight)
/// with an occurrence count per id. Lookups take spans, so counting a corpus allocates nothing per token; the text
/// of all words lives in one growing char arena.
/// </summary>
/// <remarks>
/// The table can be pruned to stay within a memory budget (<see cref="Prune"/>), by lossy counting (Manku &amp; Motwani
/// 2002, "Approximate frequency counts over data streams", VLDB, §4.2) with the threshold raised whenever the table is
/// full instead of at fixed bucket boundaries. Every entry carries, besides its count f since it was (re)inserted, an
/// error bound Δ: the threshold T in force at insertion, which bounds the occurrences missed before. Pruning raises T
/// and removes the entries with f + Δ ≤ T. Hence, with T the last threshold: every word that occurs more than T times
/// is in the table, and f ≤ true count ≤ f + Δ ≤ f + T. Removed ids are reused by later words.
/// </remarks>
public sealed class WordTable
{
    private char[] _chars = new char[1 << 16];
    private int _charCount;
    private int[] _offset = new int[1024];
    // Length of the word; -1 marks a free id (pruned, waiting for reuse).
    private int[] _length = new int[1024];
    private uint[] _hash = new uint[1024];
    private long[] _counts = new long[1024];
    // Error bound Δ per id (lossy counting); zero until the first pruning.
    private long[] _delta = new long[1024];
    private int[] _free = [];
    private int _freeCount;
    // Slot = (hash << 32) | (id + 1); 0 = empty. The hash in the slot spares a visit to the entry on a mismatch.
    private ulong[] _slots = new ulong[2048];
    private int _count;
    private int _live;

    /// <summary>Size of the id space: ids are below this (pruned ids are free and have count 0 and an empty text).</summary>
    public int Count => _count;

    /// <summary>Words in the table now (ids in use).</summary>
    public int Live => _live;

    /// <summary>The pruning threshold T: 0 until the first pruning.</summary>
    public long PruneThreshold { get; private set; }

    /// <summary>How often the table was pruned.</summary>
    public int Prunings { get; private set; }

    /// <summary>Words removed by pruning, in total (a word removed twice counts twice).</summary>
    public long PrunedWords { get; private set; }

    /// <summary>Bytes held by the table's arrays (their allocated sizes).</summary>
    public long ApproximateBytes => BytesFor(_chars.Length, _offset.Length, _slots.Length);

    // Per id: offset, length, hash (4 bytes each), count and Δ (8 each), and the free list's slot (4, allocated at the
    // first pruning).
    private static long BytesFor(long chars, long ids, long slots) => chars * 2 + ids * 32 + slots * 8;

    public ReadOnlySpan<char> Word(int id) => _length[id] < 0 ? default : _chars.AsSpan(_offset[id], _length[id]);
    public string WordString(int id) => new(Word(id));
    public long CountOf(int id) => _counts[id];
    /// <summary>The error bound Δ of an id: its true count is at most <see cref="CountOf"/> + Δ.</summary>
    public long ErrorOf(int id) => _delta[id];
    public void Add(int id, long amount) => _counts[id] += amount;

    /// <summary>Id of <paramref name="word"/>, or -1.</summary>
    public int Find(ReadOnlySpan<char> word)
    {
        uint h = Hash(word);
        return Probe(word, h, out _);
    }

    /// <summary>Id of the word (or -1) and the slot where the probe ended.</summary>
    private int Probe(ReadOnlySpan<char> word, uint h, out int slot)
    {
        var slots = _slots;
        int mask = slots.Length - 1;
        int s = (int)(h & (uint)mask);
        while (true)
        {
            ulong v = slots[s];
            if (v == 0) { slot = s; return -1; }
            if ((uint)(v >> 32) == h)
            {
                int id = (int)(uint)v - 1;
                if (word.SequenceEqual(_chars.AsSpan(_offset[id], _length[id]))) { slot = s; return id; }
            }
            s = (s + 1) & mask;
        }
    }

    /// <summary>Id of <paramref name="word"/>, adding it (count 0) when new.</summary>
    public int GetOrAdd(ReadOnlySpan<char> word)
    {
        uint h = Hash(word);
        int id = Probe(word, h, out int s);
        return id >= 0 ? id : Insert(word, h, s);
    }

    /// <summary>Counts one occurrence of <paramref name="word"/> and returns its id.</summary>
    public int Increment(ReadOnlySpan<char> word)
    {
        int id = GetOrAdd(word);
        _counts[id]++;
        return id;
    }

    /// <summary>Bytes the table would hold after adding one new word of <paramref name="length"/> chars (the arrays
    /// grow by doubling).</summary>
    public long BytesAfterAdding(int length)
    {
        long chars = _chars.Length;
        if (_charCount + length > chars) chars = Math.Max(chars * 2, _charCount + length);
        long ids = _offset.Length;
        if (_freeCount == 0 && _count == ids) ids *= 2;
        long slots = _slots.Length;
        if ((_live + 1) * 2L > slots) slots *= 2;
        return BytesFor(chars, ids, slots);
    }

    private int Insert(ReadOnlySpan<char> word, uint h, int slot)
    {
        if (_charCount + word.Length > _chars.Length)
        {
            long size = Math.Max((long)_chars.Length * 2, _charCount + word.Length);
            if (size > Array.MaxLength) throw new InvalidOperationException($"word table: more than {Array.MaxLength} chars of distinct words");
            Array.Resize(ref _chars, (int)size);
        }
        int id;
        if (_freeCount > 0) id = _free[--_freeCount];
        else
        {
            if (_count == _offset.Length)
            {
                int size = _count * 2;
                Array.Resize(ref _offset, size);
                Array.Resize(ref _length, size);
                Array.Resize(ref _hash, size);
                Array.Resize(ref _counts, size);
                Array.Resize(ref _delta, size);
            }
            id = _count++;
        }
        word.CopyTo(_chars.AsSpan(_charCount));
        _offset[id] = _charCount;
        _length[id] = word.Length;
        _hash[id] = h;
        _counts[id] = 0;
        _delta[id] = PruneThreshold;
        _charCount += word.Length;
        _slots[slot] = ((ulong)h << 32) | (uint)(id + 1);
        _live++;
        if (_live * 2L > _slots.Length) Rehash(_slots.Length * 2);
        return id;
    }

    private void Rehash(int size)
    {
        var slots = size == _slots.Length ? _slots : new ulong[size];
        if (slots == _slots) Array.Clear(slots);
        int mask = size - 1;
        for (int id = 0; id < _count; id++)
        {
            if (_length[id] < 0) continue;
            int s = (int)(_hash[id] & (uint)mask);
            while (slots[s] != 0) s = (s + 1) & mask;
            slots[s] = ((ulong)_hash[id] << 32) | (uint)(id + 1);
        }
        _slots = slots;
    }

    /// <summary>
    /// One lossy-counting step: raises the threshold T to at least T + 1 and to the median of f + Δ over the removable
    /// words, so that at least half of them go, and removes every removable word with f + Δ ≤ T. Ids below
    /// <paramref name="keepBelow"/> and those in <paramref name="keep"/> are never removed. Removed ids become free
    /// (count 0, empty text) and are reused; ids handed out earlier for removed words must not be used again.
    /// </summary>
    /// <returns>The words removed (0 when every word is kept).</returns>
    public int Prune(int keepBelow, ReadOnlySpan<int> keep)
    {
        var protect = new HashSet<int>();
        foreach (int id in keep) protect.Add(id);
        bool Removable(int id) => id >= keepBelow && _length[id] >= 0 && !protect.Contains(id);
        // Median of f + Δ − T over the removable words, from a histogram (values past its end are simply large).
        const int Bins = 1 << 16;
        var histogram = new int[Bins + 1];
        int removable = 0;
        for (int id = 0; id < _count; id++)
        {
            if (!Removable(id)) continue;
            long excess = _counts[id] + _delta[id] - PruneThreshold;
            histogram[(int)Math.Clamp(excess, 0, Bins)]++;
            removable++;
        }
        if (removable == 0) return 0;
        long raise = 1;
        for (int seen = 0, b = 0; b <= Bins; b++)
        {
            seen += histogram[b];
            if (seen * 2L >= removable) { raise = Math.Max(1, b); break; }
        }
        PruneThreshold += raise;
        Prunings++;
        int removed = 0;
        if (_free.Length < _offset.Length) Array.Resize(ref _free, _offset.Length);
        for (int id = 0; id < _count; id++)
        {
            if (!Removable(id) || _counts[id] + _delta[id] > PruneThreshold) continue;
            _length[id] = -1;
            _counts[id] = 0;
            _free[_freeCount++] = id;
            removed++;
        }
        _live -= removed;
        PrunedWords += removed;
        CompactChars();
        Rehash(_slots.Length);
        return removed;
    }

    /// <summary>Sets every count and error bound to 0 (before counting the words in the table again, exactly); the
    /// pruning threshold stays as a record of what the table may lack.</summary>
    public void ResetCounts()
    {
        Array.Clear(_counts);
        Array.Clear(_delta);
    }

    /// <summary>Moves the text of the words still in use to the front of the arena, in order of their offsets.</summary>
    private void CompactChars()
    {
        var ids = new int[_live];
        var offsets = new int[_live];
        int n = 0;
        for (int id = 0; id < _count; id++)
        {
            if (_length[id] < 0) continue;
            ids[n] = id;
            offsets[n] = _offset[id];
            n++;
        }
        Array.Sort(offsets, ids);
        int at = 0;
        foreach (int id in ids)
        {
            // Offsets only move down, and in increasing order, so a word never overwrites one still to be moved.
            _chars.AsSpan(_offset[id], _length[id]).CopyTo(_chars.AsSpan(at));
            _offset[id] = at;
            at += _length[id];
        }
        _charCount = at;
    }

    /// <summary>Fast non-cryptographic hash of a char span (four chars per 64-bit step, multiply-rotate mixing).
    /// Fixed (not randomised per process), so table layouts are reproducible.</summary>
    internal static uint Hash(ReadOnlySpan<char> s)
    {
        const ulong k1 = 0x9E3779B97F4A7C15UL, k2 = 0xC2B2AE3D27D4EB4FUL;
        ulong h = k1 ^ ((ulong)s.Length * k2);
        var words = MemoryMarshal.Cast<char, ulong>(s);
        foreach (ulong w in words) h = BitOperations.RotateLeft((h ^ w) * k1, 29) * k2;
        for (int i = words.Length * 4; i < s.Length; i++) h = BitOperations.RotateLeft((h ^ s[i]) * k1, 29) * k2;
        h ^= h >> 32;
        h *= k1;
        h ^= h >> 29;
        return (uint)h;
    }
}
