using System.Collections.Concurrent;
using SenseSplit.Core;
using SenseSplit.Core.Cooccurrence;
using SenseSplit.Core.Text;

namespace SenseSplit.Bench.Baselines;

// The co-occurrence counter as it was before the position-partitioned rewrite (commit 909f2ad), kept as the "before"
// reference of `bench embed`: every worker walks every pair of a block and keeps those whose smaller id r has
// r mod T = t.
/// <summary>
/// Counts the symmetric co-occurrence matrix X of a stream of word ids (see <see cref="CooccurrenceCounts"/>):
/// every pair of kept words at distance d ≤ window inside one segment adds 1/d to X_ij and X_ji.
/// </summary>
/// <remarks>
/// The 1/d weighting of a symmetric window is common practice in count-based embeddings (e.g. Pennington, Socher &amp;
/// Manning 2014, "GloVe", §4.2). Words not kept (id -1) keep their position, so distances are distances in the text.
/// Weights are accumulated as exact integers w·L/d with L = lcm(1..window), so sums are exact and the result is the
/// same for any thread count and any order of accumulation; they are divided by L once, at the end.
/// The producer (the caller) fills blocks of ids; each block is handed to every worker, and worker t accumulates the
/// pairs whose smaller id r has r mod T = t (disjoint rows, no shared writes): pairs of two ids below a cutoff K go to
/// a dense triangular table, others to an open-addressing map, which is sorted and handed to an
/// <see cref="IRunStore"/> when it reaches its share of the memory budget; runs are k-way merged at the end.
/// </remarks>
internal sealed class RowPartitionedCounter : IIdSink, IDisposable
{
    private const int BreakMark = -2;
    private const int BlockSize = 1 << 18;
    private const int DenseCutoff = 2048;
    /// <summary>Most words: ids are packed in 24 bits beside the distance.</summary>
    public const int MaxWords = 1 << 24;

    private readonly int _words;
    private readonly int _window;
    private readonly bool _acrossLines;
    private readonly int _threads;
    private readonly IRunStore _store;
    private readonly long[] _weights;
    private readonly long _scale;
    private readonly long _mapBytes;
    private readonly long[] _wordCounts;
    private readonly Worker[] _workers;
    private readonly ConcurrentBag<Block> _free = new();
    private Block _current;
    private bool _completed;
    private long _tokens;

    public RowPartitionedCounter(int words, CooccurrenceOptions options, IRunStore? store = null)
    {
        ArgumentNullException.ThrowIfNull(options);
        Guard.Positive(words);
        Guard.AtMost(words, MaxWords, "MaxWords");
        if (options.Window < 1 || options.Window > CooccurrenceOptions.MaxWindow)
            throw new ArgumentOutOfRangeException(nameof(options), options.Window, $"window ({options.Window}) must be between 1 and {CooccurrenceOptions.MaxWindow}");
        if (options.MemoryBytes < 1 << 20) throw new ArgumentOutOfRangeException(nameof(options), options.MemoryBytes, $"memory budget ({options.MemoryBytes} bytes) must be at least 1 MB");
        _words = words;
        _window = options.Window;
        _acrossLines = options.WindowAcrossLines;
        _threads = options.Threads > 0 ? options.Threads : Environment.ProcessorCount;
        _store = store ?? new MemoryRunStore();
        long l = 1;
        for (int d = 2; d <= _window; d++) l = l / Gcd(l, d) * d;
        _scale = l;
        _weights = new long[_window + 1];
        for (int d = 1; d <= _window; d++) _weights[d] = l / d;
        _wordCounts = new long[words];
        int cutoff = Math.Min(words, DenseCutoff);
        long denseBytes = (long)cutoff * (cutoff + 1) / 2 * 8;
        // Half of the budget (at least a quarter) goes to the pair maps; the rest is left for the dense tables, the
        // merged counts and the caller.
        _mapBytes = Math.Max(options.MemoryBytes / 4, options.MemoryBytes / 2 - denseBytes * _threads) / _threads;
        _workers = new Worker[_threads];
        for (int t = 0; t < _threads; t++) _workers[t] = new Worker(this, t, cutoff);
        foreach (var w in _workers) w.Start();
        _current = RentBlock();
    }

    /// <summary>The integer scale L = lcm(1..window) of the internal weights.</summary>
    public long Scale => _scale;
    public long Tokens => _tokens;
    /// <summary>Runs handed to the run store so far.</summary>
    public int SpilledRuns => _store.RunCount;
    /// <summary>Bytes currently held by the workers' pair maps and dense tables.</summary>
    public long PairTableBytes => _workers.Sum(w => w.Bytes);

    private static long Gcd(long a, long b) { while (b != 0) (a, b) = (b, a % b); return a; }

    /// <summary>Next token: a word id in [0, words) or -1 for a word that is not kept.</summary>
    public void Id(int id)
    {
        if (id < -1 || id >= _words) throw new ArgumentOutOfRangeException(nameof(id), id, $"word id ({id}) must be -1 or below the vocabulary size ({_words})");
        _tokens++;
        if (id >= 0) _wordCounts[id]++;
        Append(id);
    }

    public void LineBreak()
    {
        if (!_acrossLines) Append(BreakMark);
    }

    public void ParagraphBreak() => Append(BreakMark);

    private void Append(int value)
    {
        var b = _current;
        if (value == BreakMark)
        {
            // A break right after the carried ids makes them useless; two breaks in a row are one.
            if (b.Length == b.Prefix) { b.Length = 0; b.Prefix = 0; return; }
            if (b.Data[b.Length - 1] == BreakMark) return;
        }
        b.Data[b.Length++] = value;
        if (b.Length == BlockSize) Dispatch();
    }

    private Block RentBlock() => _free.TryTake(out var b) ? b : new Block();

    private void Dispatch()
    {
        var full = _current;
        var next = RentBlock();
        // Carry the ids since the last break (at most window of them) so pairs across the block edge are counted once.
        int from = full.Length;
        while (from > 0 && full.Length - from < _window && full.Data[from - 1] != BreakMark) from--;
        if (full.Length - from > _window) from = full.Length - _window;
        int carry = full.Length - from;
        Array.Copy(full.Data, from, next.Data, 0, carry);
        next.Length = carry;
        next.Prefix = carry;
        if (full.Length > full.Prefix)
        {
            full.Pending = _workers.Length;
            foreach (var w in _workers) w.Enqueue(full);
        }
        else _free.Add(full);
        _current = next;
        foreach (var w in _workers) if (w.Failure is not null) throw new InvalidOperationException("co-occurrence counting failed", w.Failure);
    }

    private void Release(Block b)
    {
        if (Interlocked.Decrement(ref b.Pending) == 0) { b.Length = 0; b.Prefix = 0; _free.Add(b); }
    }

    /// <summary>Finishes counting and merges everything into a <see cref="CooccurrenceCounts"/>.</summary>
    public CooccurrenceCounts Complete()
    {
        if (_completed) throw new InvalidOperationException("Complete was already called");
        _completed = true;
        Dispatch();
        foreach (var w in _workers) w.FinishInput();
        foreach (var w in _workers) w.Join();
        foreach (var w in _workers) if (w.Failure is not null) throw new InvalidOperationException("co-occurrence counting failed", w.Failure);
        var rowStart = new int[_threads][];
        var columns = new int[_threads][];
        var values = new float[_threads][];
        Parallel.For(0, _threads, new ParallelOptions { MaxDegreeOfParallelism = _threads }, t =>
        {
            (rowStart[t], columns[t], values[t]) = _workers[t].Merge();
        });
        return new CooccurrenceCounts(_words, rowStart, columns, values, (long[])_wordCounts.Clone(), _tokens);
    }

    public void Dispose()
    {
        if (_completed) return;
        _completed = true;
        foreach (var w in _workers) w.FinishInput();
        foreach (var w in _workers) w.Join();
    }

    private sealed class Block
    {
        public readonly int[] Data = new int[BlockSize];
        public int Length;
        public int Prefix;
        public int Pending;
    }

    private sealed class Worker
    {
        private readonly RowPartitionedCounter _owner;
        private readonly int _index;
        private readonly int _cutoff;
        private readonly BlockingCollection<Block> _queue = new(boundedCapacity: 3);
        private readonly Thread _thread;
        private long[] _dense;
        private readonly long[] _triangleBase;
        // Pairs for the hash maps are first appended to one of 64 buckets (by hash), then applied to that bucket's
        // own small map in a burst: the random accesses stay inside a map of ~1/64 of the size, mostly in cache.
        private const int Buckets = 64;
        private const int BucketCapacity = 1024;
        private readonly OldPairHashMap[] _maps;
        private readonly ulong[] _bucketKeys = new ulong[Buckets * BucketCapacity];
        private readonly int[] _bucketFill = new int[Buckets];

        public Worker(RowPartitionedCounter owner, int index, int cutoff)
        {
            _owner = owner;
            _index = index;
            _cutoff = cutoff;
            _dense = new long[(long)cutoff * (cutoff + 1) / 2];
            _triangleBase = new long[cutoff];
            for (int c = 0; c < cutoff; c++) _triangleBase[c] = (long)c * (c + 1) / 2;
            _maps = new OldPairHashMap[Buckets];
            for (int b = 0; b < Buckets; b++) _maps[b] = new OldPairHashMap(1024, owner._mapBytes / Buckets);
            _thread = new Thread(Loop) { IsBackground = true, Name = $"cooccurrence-{index}" };
        }

        public Exception? Failure { get; private set; }
        public long Bytes => _dense.LongLength * 8 + _maps.Sum(m => m?.Bytes ?? 0);

        public void Start() => _thread.Start();
        public void Enqueue(Block b) => _queue.Add(b);
        public void FinishInput() => _queue.CompleteAdding();
        public void Join() => _thread.Join();

        private void Loop()
        {
            foreach (var block in _queue.GetConsumingEnumerable())
            {
                try { if (Failure is null) Count(block); }
                catch (Exception ex) { Failure = ex; }
                finally { _owner.Release(block); }
            }
        }

        private void Count(Block block)
        {
            var data = block.Data;
            int length = block.Length;
            int window = _owner._window;
            int threads = _owner._threads;
            int me = _index;
            int cutoff = _cutoff;
            var weights = _owner._weights;
            var dense = _dense;
            var triangleBase = _triangleBase;
            for (int i = block.Prefix; i < length; i++)
            {
                int y = data[i];
                if (y < 0) continue;
                int lowest = Math.Max(0, i - window);
                for (int j = i - 1; j >= lowest; j--)
                {
                    int x = data[j];
                    if (x < 0) { if (x == BreakMark) break; continue; }
                    int r = x < y ? x : y;
                    int c = x < y ? y : x;
                    if (threads > 1 && r % threads != me) continue;
                    long w = weights[i - j];
                    if (c < cutoff) dense[triangleBase[c] + r] += w;
                    else
                    {
                        // Distance in the top 5 bits (ids are below 2^24), row and column below.
                        ulong key = ((ulong)(i - j) << 59) | ((ulong)(uint)r << 32) | (uint)c;
                        int bucket = (int)(((((ulong)(uint)r << 32) | (uint)c) * 0x9E3779B97F4A7C15UL) >> 58);
                        int fill = _bucketFill[bucket];
                        _bucketKeys[bucket * BucketCapacity + fill] = key;
                        if (++fill == BucketCapacity) { ApplyBucket(bucket, fill); fill = 0; }
                        _bucketFill[bucket] = fill;
                    }
                }
            }
        }

        private void ApplyBucket(int bucket, int fill)
        {
            var map = _maps[bucket];
            var weights = _owner._weights;
            var keys = _bucketKeys.AsSpan(bucket * BucketCapacity, fill);
            foreach (ulong packed in keys)
            {
                ulong key = packed & ((1UL << 59) - 1);
                long w = weights[(int)(packed >> 59)];
                if (!map.TryAdd(key, w))
                {
                    SpillAll();
                    map.TryAdd(key, w);
                }
            }
        }

        /// <summary>One bucket map is at its share of the budget: all maps go to the run store as one sorted run
        /// (64-way merge of the individually sorted maps) and are emptied.</summary>
        private void SpillAll()
        {
            var readers = new List<IPairReader>(Buckets);
            foreach (var m in _maps)
            {
                var (k, v, n) = m.SortedView();
                readers.Add(new ArrayPairReader(k, v, n));
            }
            using (var merged = new PairMerger(readers)) _owner._store.Write(_index, merged);
            foreach (var m in _maps) m.Clear();
        }

        /// <summary>Merges the dense table, the map and this worker's spilled runs into compact rows.</summary>
        public (int[] RowStart, int[] Columns, float[] Values) Merge()
        {
            int threads = _owner._threads;
            int words = _owner._words;
            int localRows = (words - _index + threads - 1) / threads;
            var rowStart = new int[localRows + 1];
            for (int b = 0; b < Buckets; b++)
            {
                if (_bucketFill[b] > 0) ApplyBucket(b, _bucketFill[b]);
                _bucketFill[b] = 0;
            }
            // The bucket maps hold disjoint keys: concatenate them and sort once.
            int count = 0;
            foreach (var map in _maps) count += map.Count;
            var allKeys = new ulong[count];
            var allValues = new long[count];
            int filled = 0;
            for (int b = 0; b < Buckets; b++)
            {
                var (keys, vals, entries) = _maps[b].TakeSorted();
                _maps[b] = null!;
                Array.Copy(keys, 0, allKeys, filled, entries);
                Array.Copy(vals, 0, allValues, filled, entries);
                filled += entries;
            }
            Array.Sort(allKeys, allValues);
            var readers = new List<IPairReader>(_owner._store.Open(_index)) { new ArrayPairReader(allKeys, allValues, count) };
            using var merged = readers.Count == 1 ? readers[0] : new PairMerger(readers);
            var cols = new int[Math.Max(16, count + DenseNonZeros())];
            var values = new float[cols.Length];
            int n = 0;
            double inverseScale = 1.0 / _owner._scale;
            int nextDenseRow = _index; // next owned row whose dense part is still to be written
            int currentLocal = 0;      // rows [0, currentLocal) have their start recorded
            void StartRowsUpTo(int row, ref int nn)
            {
                // Records the start of every owned row up to and including 'row', writing dense parts in order.
                while (nextDenseRow <= row)
                {
                    int local = nextDenseRow / threads;
                    while (currentLocal <= local) rowStart[currentLocal++] = nn;
                    if (nextDenseRow < _cutoff)
                    {
                        for (int c = nextDenseRow; c < _cutoff; c++)
                        {
                            long v = _dense[_triangleBase[c] + nextDenseRow];
                            if (v == 0) continue;
                            Append(ref cols, ref values, ref nn, c, (float)(v * inverseScale));
                        }
                    }
                    nextDenseRow += threads;
                }
            }
            while (merged.Next(out ulong key, out long value))
            {
                int r = (int)(key >> 32), c = (int)(uint)key;
                StartRowsUpTo(r, ref n);
                Append(ref cols, ref values, ref n, c, (float)(value * inverseScale));
            }
            StartRowsUpTo(words - 1, ref n);
            while (currentLocal <= localRows) rowStart[currentLocal++] = n;
            _dense = [];
            if (n < cols.Length) { Array.Resize(ref cols, n); Array.Resize(ref values, n); }
            return (rowStart, cols, values);
        }

        private int DenseNonZeros()
        {
            int n = 0;
            foreach (long v in _dense) if (v != 0) n++;
            return n;
        }

        private static void Append(ref int[] cols, ref float[] values, ref int n, int c, float v)
        {
            if (n == cols.Length)
            {
                int size = (int)Math.Min(Array.MaxLength, (long)cols.Length * 2);
                if (size == n) throw new InvalidOperationException("co-occurrence matrix has more entries than an array can hold");
                Array.Resize(ref cols, size);
                Array.Resize(ref values, size);
            }
            cols[n] = c;
            values[n] = v;
            n++;
        }
    }
}
