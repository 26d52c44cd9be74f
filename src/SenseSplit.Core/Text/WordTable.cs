using System.Numerics;
using System.Runtime.InteropServices;

namespace SenseSplit.Core.Text;

/// <summary>
/// Open-addressing hash table from token text (a char span) to a dense id (0, 1, 2, ... in order of first sight)
/// with an occurrence count per id. Lookups take spans, so counting a corpus allocates nothing per token; the text
/// of all words lives in one growing char arena.
/// </summary>
public sealed class WordTable
{
    private char[] _chars = new char[1 << 16];
    private int _charCount;
    private int[] _offset = new int[1024];
    private int[] _length = new int[1024];
    private uint[] _hash = new uint[1024];
    private long[] _counts = new long[1024];
    private int[] _slots = CreateSlots(2048);
    private int _count;

    /// <summary>Number of distinct words.</summary>
    public int Count => _count;

    /// <summary>Bytes held by the table (for memory reports).</summary>
    public long ApproximateBytes => (long)_chars.Length * 2 + (long)_offset.Length * 24 + (long)_slots.Length * 4;

    public ReadOnlySpan<char> Word(int id) => _chars.AsSpan(_offset[id], _length[id]);
    public string WordString(int id) => new(Word(id));
    public long CountOf(int id) => _counts[id];
    public void Add(int id, long amount) => _counts[id] += amount;

    /// <summary>Id of <paramref name="word"/>, or -1.</summary>
    public int Find(ReadOnlySpan<char> word)
    {
        uint h = Hash(word);
        int mask = _slots.Length - 1;
        int s = (int)(h & (uint)mask);
        while (true)
        {
            int id = _slots[s];
            if (id < 0) return -1;
            if (_hash[id] == h && word.SequenceEqual(_chars.AsSpan(_offset[id], _length[id]))) return id;
            s = (s + 1) & mask;
        }
    }

    /// <summary>Id of <paramref name="word"/>, adding it (count 0) when new.</summary>
    public int GetOrAdd(ReadOnlySpan<char> word)
    {
        uint h = Hash(word);
        int mask = _slots.Length - 1;
        int s = (int)(h & (uint)mask);
        while (true)
        {
            int id = _slots[s];
            if (id < 0) break;
            if (_hash[id] == h && word.SequenceEqual(_chars.AsSpan(_offset[id], _length[id]))) return id;
            s = (s + 1) & mask;
        }
        return Insert(word, h, s);
    }

    /// <summary>Counts one occurrence of <paramref name="word"/> and returns its id.</summary>
    public int Increment(ReadOnlySpan<char> word)
    {
        int id = GetOrAdd(word);
        _counts[id]++;
        return id;
    }

    private int Insert(ReadOnlySpan<char> word, uint h, int slot)
    {
        if (_charCount + word.Length > _chars.Length)
        {
            long size = Math.Max((long)_chars.Length * 2, _charCount + word.Length);
            if (size > Array.MaxLength) throw new InvalidOperationException($"word table: more than {Array.MaxLength} chars of distinct words");
            Array.Resize(ref _chars, (int)size);
        }
        if (_count == _offset.Length)
        {
            int size = _count * 2;
            Array.Resize(ref _offset, size);
            Array.Resize(ref _length, size);
            Array.Resize(ref _hash, size);
            Array.Resize(ref _counts, size);
        }
        int id = _count++;
        word.CopyTo(_chars.AsSpan(_charCount));
        _offset[id] = _charCount;
        _length[id] = word.Length;
        _hash[id] = h;
        _charCount += word.Length;
        _slots[slot] = id;
        if (_count * 2 > _slots.Length) Rehash(_slots.Length * 2);
        return id;
    }

    private void Rehash(int size)
    {
        var slots = CreateSlots(size);
        int mask = size - 1;
        for (int id = 0; id < _count; id++)
        {
            int s = (int)(_hash[id] & (uint)mask);
            while (slots[s] >= 0) s = (s + 1) & mask;
            slots[s] = id;
        }
        _slots = slots;
    }

    private static int[] CreateSlots(int size)
    {
        var slots = new int[size];
        Array.Fill(slots, -1);
        return slots;
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
