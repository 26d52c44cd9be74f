namespace SenseSplit.Core.Cooccurrence;

/// <summary>Reads a run of (key, sum) pairs in increasing key order.</summary>
public interface IPairReader : IDisposable
{
    bool Next(out ulong key, out long value);
}

/// <summary>
/// Where the co-occurrence counter puts sorted runs of pair sums when its memory budget is spent. The CLI stores them
/// in files of a temporary folder; <see cref="MemoryRunStore"/> keeps them in memory (tests).
/// </summary>
public interface IRunStore
{
    /// <summary>Stores one run of partition <paramref name="partition"/>, read to its end from <paramref name="run"/>
    /// (keys strictly increasing). May be called from several threads at once, for different partitions.</summary>
    void Write(int partition, IPairReader run);

    /// <summary>Readers over every run written for <paramref name="partition"/>.</summary>
    IReadOnlyList<IPairReader> Open(int partition);

    /// <summary>Runs written so far (all partitions).</summary>
    int RunCount { get; }
}

/// <summary>Keeps runs in memory (for tests and small inputs).</summary>
public sealed class MemoryRunStore : IRunStore
{
    private readonly List<(int Partition, ulong[] Keys, long[] Values)> _runs = new();
    private readonly Lock _lock = new();

    public int RunCount { get { lock (_lock) return _runs.Count; } }

    public void Write(int partition, IPairReader run)
    {
        var keys = new List<ulong>();
        var values = new List<long>();
        while (run.Next(out ulong k, out long v)) { keys.Add(k); values.Add(v); }
        lock (_lock) _runs.Add((partition, keys.ToArray(), values.ToArray()));
    }

    public IReadOnlyList<IPairReader> Open(int partition)
    {
        lock (_lock)
            return _runs.Where(r => r.Partition == partition).Select(r => (IPairReader)new ArrayPairReader(r.Keys, r.Values, r.Keys.Length)).ToList();
    }
}

/// <summary>Reads the first <c>count</c> entries of sorted key/value arrays.</summary>
public sealed class ArrayPairReader(ulong[] keys, long[] values, int count) : IPairReader
{
    private int _next;

    public bool Next(out ulong key, out long value)
    {
        if (_next < count) { key = keys[_next]; value = values[_next]; _next++; return true; }
        key = 0; value = 0;
        return false;
    }

    public void Dispose() { }
}

/// <summary>Reads the first <c>count</c> entries of an array of entries sorted by key.</summary>
public sealed class EntryPairReader(PairEntry[] entries, int count) : IPairReader
{
    private int _next;

    public bool Next(out ulong key, out long value)
    {
        if (_next < count) { key = entries[_next].Key; value = entries[_next].Value; _next++; return true; }
        key = 0; value = 0;
        return false;
    }

    public void Dispose() { }
}

/// <summary>k-way merge of sorted pair readers, summing equal keys (binary heap on the current key of each reader).</summary>
public sealed class PairMerger : IPairReader
{
    private readonly IPairReader[] _readers;
    private readonly ulong[] _heapKeys;
    private readonly long[] _heapValues;
    private readonly int[] _heapReader;
    private int _size;

    public PairMerger(IReadOnlyList<IPairReader> readers)
    {
        ArgumentNullException.ThrowIfNull(readers);
        _readers = readers.ToArray();
        _heapKeys = new ulong[_readers.Length];
        _heapValues = new long[_readers.Length];
        _heapReader = new int[_readers.Length];
        for (int r = 0; r < _readers.Length; r++)
            if (_readers[r].Next(out ulong k, out long v)) Push(k, v, r);
    }

    public bool Next(out ulong key, out long value)
    {
        if (_size == 0) { key = 0; value = 0; return false; }
        key = _heapKeys[0];
        value = 0;
        while (_size > 0 && _heapKeys[0] == key)
        {
            value += _heapValues[0];
            int r = _heapReader[0];
            if (_readers[r].Next(out ulong k, out long v))
            {
                if (k <= key) throw new InvalidOperationException($"pair run {r} is not sorted (key {k} after {key})");
                _heapKeys[0] = k; _heapValues[0] = v;
            }
            else
            {
                _size--;
                _heapKeys[0] = _heapKeys[_size]; _heapValues[0] = _heapValues[_size]; _heapReader[0] = _heapReader[_size];
            }
            SiftDown(0);
        }
        return true;
    }

    private void Push(ulong k, long v, int r)
    {
        int i = _size++;
        _heapKeys[i] = k; _heapValues[i] = v; _heapReader[i] = r;
        while (i > 0)
        {
            int parent = (i - 1) / 2;
            if (_heapKeys[parent] <= _heapKeys[i]) break;
            Swap(i, parent);
            i = parent;
        }
    }

    private void SiftDown(int i)
    {
        while (true)
        {
            int l = 2 * i + 1, smallest = i;
            if (l < _size && _heapKeys[l] < _heapKeys[smallest]) smallest = l;
            if (l + 1 < _size && _heapKeys[l + 1] < _heapKeys[smallest]) smallest = l + 1;
            if (smallest == i) return;
            Swap(i, smallest);
            i = smallest;
        }
    }

    private void Swap(int a, int b)
    {
        (_heapKeys[a], _heapKeys[b]) = (_heapKeys[b], _heapKeys[a]);
        (_heapValues[a], _heapValues[b]) = (_heapValues[b], _heapValues[a]);
        (_heapReader[a], _heapReader[b]) = (_heapReader[b], _heapReader[a]);
    }

    public void Dispose()
    {
        foreach (var r in _readers) r.Dispose();
    }
}
