using System.Collections.Concurrent;
using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using SenseSplit.Core.Text;

namespace SenseSplit.Core.Cooccurrence;

/// <summary>How co-occurrences are counted.</summary>
public sealed record CooccurrenceOptions
{
    /// <summary>Context words on each side (1-20). Default 5 (common practice).</summary>
    public int Window { get; init; } = 5;
    /// <summary>Let a window run across line ends (a paragraph break always ends it).</summary>
    public bool WindowAcrossLines { get; init; }
    /// <summary>Counting threads; 0 = processor count. Counts do not depend on it.</summary>
    public int Threads { get; init; }
    /// <summary>Memory budget for the pair tables, in bytes; past it sorted runs go to the run store.</summary>
    public long MemoryBytes { get; init; } = 4L << 30;

    /// <summary>Largest window: weights are kept as exact integers scaled by lcm(1..window), which must stay small.</summary>
    public const int MaxWindow = 20;
}

/// <summary>
/// Counts the symmetric co-occurrence matrix X of a stream of word ids (see <see cref="CooccurrenceCounts"/>):
/// every pair of kept words at distance d ≤ window inside one segment adds 1/d to X_ij and X_ji.
/// </summary>
/// <remarks>
/// The 1/d weighting of a symmetric window is common practice in count-based embeddings (e.g. Pennington, Socher &amp;
/// Manning 2014, "GloVe", §4.2). Words not kept (id -1) keep their position, so distances are distances in the text.
/// Weights are accumulated as exact integers w·L/d with L = lcm(1..window), so sums are exact and the result is the
/// same for any thread count and any order of accumulation; they are divided by L once, at the end.
/// <para>
/// The producer (the caller) fills blocks of ids; each block is handed to every worker, and worker t enumerates the
/// pairs (j, i), j &lt; i, whose right position i lies in the t-th of T equal slices of the block (fixed slices: each
/// pair is enumerated by exactly one worker, whatever the scheduling, and no worker walks pairs it then drops).
/// Pairs of two ids below a cutoff K go to the worker's own dense triangular table (the tables are added at the end).
/// The other pairs belong to the worker that owns their row r = min(i, j), r mod T: a worker keeps its own and hands
/// the others over in chunks, so every pair key lives in one worker's open-addressing maps. Those maps are sorted and
/// handed to an <see cref="IRunStore"/> when they reach their share of the memory budget; at the end each worker
/// merges its maps, runs and dense rows into its rows of the result, in parallel.
/// </para>
/// </remarks>
public sealed class CooccurrenceCounter : IIdSpanSink, IDisposable
{
    /// <summary>Segment end inside a block (a line end unless windows run across lines, or a paragraph end).</summary>
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
    private readonly Worker[] _workers;
    private readonly int _idBits;
    private readonly ConcurrentBag<Block> _free = new();
    private readonly ConcurrentBag<PairChunk> _chunks = new();
    /// <summary>Low 59 bits of a packed pair: the key (row &lt;&lt; bits) | column; the top 5 hold the distance.</summary>
    private const ulong KeyMask = (1UL << 59) - 1;
    private Block _current;
    private bool _completed;
    private long _tokens;

    public CooccurrenceCounter(int words, CooccurrenceOptions options, IRunStore? store = null)
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
        _idBits = IdBits(words);
        long l = 1;
        for (int d = 2; d <= _window; d++) l = l / Gcd(l, d) * d;
        _scale = l;
        _weights = new long[_window + 1];
        for (int d = 1; d <= _window; d++) _weights[d] = l / d;
        int cutoff = Math.Min(words, DenseCutoff);
        long denseBytes = DenseBytes(words);
        // Half of the budget (at least a quarter) goes to the pair maps; the rest is left for the dense tables, the
        // merged counts and the caller.
        _mapBytes = Math.Max(options.MemoryBytes / 4, options.MemoryBytes / 2 - denseBytes * _threads) / _threads;
        _workers = new Worker[_threads];
        for (int t = 0; t < _threads; t++) _workers[t] = new Worker(this, t, cutoff);
        foreach (var w in _workers) w.Start();
        _current = RentBlock();
    }

    /// <summary>Bytes of one worker's dense table and word counts for a vocabulary of <paramref name="words"/> words
    /// (every worker has one; for budgeting by the caller).</summary>
    public static long DenseBytes(int words)
    {
        long cutoff = Math.Min(words, DenseCutoff);
        return cutoff * (cutoff + 1) / 2 * 8 + (long)words * 8;
    }

    /// <summary>The integer scale L = lcm(1..window) of the internal weights.</summary>
    public long Scale => _scale;
    public long Tokens => _tokens;
    /// <summary>Runs handed to the run store so far.</summary>
    public int SpilledRuns => _store.RunCount;
    /// <summary>Bytes currently held by the workers' pair maps and dense tables.</summary>
    public long PairTableBytes => _workers.Sum(w => w.Bytes);

    /// <summary>Bits needed for ids below <paramref name="words"/>.</summary>
    private static int IdBits(int words) => Math.Max(1, 32 - System.Numerics.BitOperations.LeadingZeroCount((uint)(words - 1)));

    private static long Gcd(long a, long b) { while (b != 0) (a, b) = (b, a % b); return a; }

    /// <summary>Next token: a word id in [0, words) or -1 for a word that is not kept.</summary>
    public void Id(int id)
    {
        if (id < -1 || id >= _words) throw new ArgumentOutOfRangeException(nameof(id), id, $"word id ({id}) must be -1 or below the vocabulary size ({_words})");
        _tokens++;
        var b = _current;
        b.Data[b.Length++] = id;
        if (b.Length == BlockSize) Dispatch();
    }

    public void LineBreak()
    {
        if (!_acrossLines) Break();
    }

    public void ParagraphBreak() => Break();

    /// <summary>Many stream values at once, in the <see cref="IdStream"/> encoding: word ids in [0, words),
    /// <see cref="IdStream.NotKept"/>, <see cref="IdStream.LineMark"/>, <see cref="IdStream.ParagraphMark"/>.
    /// Same result as the value-by-value calls, with less work per token.</summary>
    public void Append(ReadOnlySpan<int> values)
    {
        int words = _words;
        int i = 0;
        while (i < values.Length)
        {
            var b = _current;
            var data = b.Data;
            int length = b.Length;
            // Copy ids up to the next mark or the end of the block; marks go through Break().
            int room = Math.Min(values.Length - i, BlockSize - length);
            int n = 0;
            for (; n < room; n++)
            {
                int v = values[i + n];
                if ((uint)(v + 1) > (uint)words) break; // a mark (v < -1) or an id out of range
                data[length + n] = v;
            }
            b.Length = length + n;
            _tokens += n;
            i += n;
            if (b.Length == BlockSize) Dispatch();
            if (n < room)
            {
                int v = values[i++];
                if (v == IdStream.LineMark) LineBreak();
                else if (v == IdStream.ParagraphMark) ParagraphBreak();
                else throw new ArgumentOutOfRangeException(nameof(values), v, $"stream value ({v}) must be a word id below the vocabulary size ({_words}), -1 or a mark (-2, -3)");
            }
        }
    }

    private void Break()
    {
        var b = _current;
        // A break right after the carried ids makes them useless; two breaks in a row are one.
        if (b.Length == b.Prefix) { b.Length = 0; b.Prefix = 0; return; }
        if (b.Data[b.Length - 1] == BreakMark) return;
        b.Data[b.Length++] = BreakMark;
        if (b.Length == BlockSize) Dispatch();
    }

    private Block RentBlock() => _free.TryTake(out var b) ? b : new Block();
    private PairChunk RentChunk() => _chunks.TryTake(out var c) ? c : new PairChunk();
    private void ReturnChunk(PairChunk c) { c.Count = 0; _chunks.Add(c); }

    private void Dispatch()
    {
        var full = _current;
        var next = RentBlock();
        // Carry the ids since the last break (at most window of them) so pairs across the block edge are counted once.
        int from = full.Length;
        while (from > 0 && full.Length - from < _window && full.Data[from - 1] != BreakMark) from--;
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
        ThrowIfFailed();
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
        ThrowIfFailed();
        // The dense tables and word counts are added into worker 0's (integers: exact), then each worker applies the
        // pairs handed to it and merges its rows, in parallel.
        var first = _workers[0];
        for (int t = 1; t < _threads; t++) first.AddDense(_workers[t]);
        var rowStart = new int[_threads][];
        var columns = new int[_threads][];
        var values = new float[_threads][];
        Parallel.For(0, _threads, new ParallelOptions { MaxDegreeOfParallelism = _threads }, t =>
        {
            (rowStart[t], columns[t], values[t]) = _workers[t].Merge(first.Dense, first.TriangleBase);
        });
        first.ReleaseDense();
        return new CooccurrenceCounts(_words, rowStart, columns, values, first.WordCounts, _tokens);
    }

    private void ThrowIfFailed()
    {
        foreach (var w in _workers) if (w.Failure is not null) throw new InvalidOperationException("co-occurrence counting failed", w.Failure);
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

    /// <summary>One full staging bucket of packed pairs (distance in the top 5 bits), handed from the worker that found
    /// them to their row's owner, which applies it to its map of that bucket.</summary>
    private sealed class PairChunk
    {
        public const int Capacity = 1024;
        public readonly ulong[] Pairs = new ulong[Capacity];
        public int Count;
        public int Bucket;
    }

    private sealed class Worker
    {
        private readonly CooccurrenceCounter _owner;
        private readonly int _index;
        private readonly BlockingCollection<Block> _queue = new(boundedCapacity: 3);
        private readonly Thread _thread;
        private long[] _dense;
        private readonly long[] _triangleBase;
        private readonly long[] _wordCounts;
        // Pairs for the hash maps are first appended to one of 64 buckets (by hash) of their row's owner, then applied
        // to that bucket's own small map in a burst: the random accesses stay inside a map of ~1/64 of the size, mostly
        // in cache. A full bucket of another owner is copied into a chunk and handed to that owner's inbox; chunks come
        // back through the shared pool once applied.
        private const int Buckets = 64;
        private const int BucketCapacity = PairChunk.Capacity;
        private readonly PairHashMap[] _maps;
        private readonly ulong[] _bucketKeys;
        private readonly int[] _bucketFill;
        private readonly ConcurrentQueue<PairChunk> _inbox = new();
        private PairEntry[] _sortScratch = [];

        public Worker(CooccurrenceCounter owner, int index, int cutoff)
        {
            _owner = owner;
            _index = index;
            Cutoff = cutoff;
            _dense = new long[(long)cutoff * (cutoff + 1) / 2];
            _triangleBase = new long[cutoff];
            for (int c = 0; c < cutoff; c++) _triangleBase[c] = (long)c * (c + 1) / 2;
            _wordCounts = new long[owner._words];
            _maps = new PairHashMap[Buckets];
            for (int b = 0; b < Buckets; b++) _maps[b] = new PairHashMap(1024, owner._mapBytes / Buckets);
            _bucketKeys = new ulong[owner._threads * Buckets * BucketCapacity];
            _bucketFill = new int[owner._threads * Buckets];
            _thread = new Thread(Loop) { IsBackground = true, Name = $"cooccurrence-{index}" };
        }

        public int Cutoff { get; }
        public long[] Dense => _dense;
        public long[] TriangleBase => _triangleBase;
        public long[] WordCounts => _wordCounts;
        public Exception? Failure { get; private set; }
        public long Bytes => _dense.LongLength * 8 + _maps.Sum(m => m?.Bytes ?? 0) + _sortScratch.LongLength * 16
            + (long)(_bucketKeys.Length + _inbox.Count * PairChunk.Capacity) * 8;

        public void Start() => _thread.Start();
        public void Enqueue(Block b) => _queue.Add(b);
        public void FinishInput() => _queue.CompleteAdding();
        public void Join() => _thread.Join();

        private void Loop()
        {
            foreach (var block in _queue.GetConsumingEnumerable())
            {
                try
                {
                    if (Failure is null)
                    {
                        ApplyInbox();
                        Count(block);
                    }
                }
                catch (Exception ex) { Failure = ex; }
                finally { _owner.Release(block); }
            }
            // Hand over what is staged for the other owners (they apply it in Merge, after every worker has stopped).
            try
            {
                for (int o = 0; o < _owner._threads; o++)
                {
                    if (o == _index) continue;
                    for (int b = 0; b < Buckets; b++)
                    {
                        int fill = _bucketFill[o * Buckets + b];
                        if (fill > 0) HandOver(o, b, fill);
                        _bucketFill[o * Buckets + b] = 0;
                    }
                }
            }
            catch (Exception ex) { Failure ??= ex; }
        }

        private void Count(Block block)
        {
            // This worker's slice of the new positions [Prefix, Length): fixed by the block alone.
            int threads = _owner._threads;
            int fresh = block.Length - block.Prefix;
            int start = block.Prefix + (int)((long)fresh * _index / threads);
            int end = block.Prefix + (int)((long)fresh * (_index + 1) / threads);
            int window = _owner._window;
            int cutoff = Cutoff;
            int bits = _owner._idBits;
            // Row owner r mod T; a mask when T is a power of two (the usual case), a division otherwise (map pairs only).
            int ownerMask = (threads & (threads - 1)) == 0 ? threads - 1 : -1;
            // The hot loop indexes without bounds checks: positions stay in [0, Length) (the look-back stops at 0),
            // ids are below the vocabulary size (checked when appended), dense indices below cutoff(cutoff+1)/2.
            ref int data = ref MemoryMarshal.GetArrayDataReference(block.Data);
            ref long weights = ref MemoryMarshal.GetArrayDataReference(_owner._weights);
            ref long dense = ref MemoryMarshal.GetArrayDataReference(_dense);
            ref long triangleBase = ref MemoryMarshal.GetArrayDataReference(_triangleBase);
            ref long wordCounts = ref MemoryMarshal.GetArrayDataReference(_wordCounts);
            for (int i = start; i < end; i++)
            {
                int y = Unsafe.Add(ref data, i);
                if (y < 0) continue;
                Unsafe.Add(ref wordCounts, y)++;
                int lowest = Math.Max(0, i - window);
                for (int j = i - 1; j >= lowest; j--)
                {
                    int x = Unsafe.Add(ref data, j);
                    if (x < 0) { if (x == BreakMark) break; continue; }
                    int r = Math.Min(x, y);
                    int c = Math.Max(x, y);
                    if (c < cutoff)
                    {
                        Unsafe.Add(ref dense, (nint)(Unsafe.Add(ref triangleBase, c) + r)) += Unsafe.Add(ref weights, i - j);
                        continue;
                    }
                    // Distance in the top 5 bits, then (row << bits) | column (2·bits ≤ 48).
                    ulong packed = ((ulong)(i - j) << 59) | ((ulong)(uint)r << bits) | (uint)c;
                    Stage(packed, ownerMask >= 0 ? r & ownerMask : r % threads);
                }
            }
        }

        // Not inlined: the dense path of Count keeps its references in registers when this larger path is a call.
        [MethodImpl(MethodImplOptions.NoInlining)]
        private void Stage(ulong packed, int owner)
        {
            ulong key = packed & KeyMask;
            int slot = owner * Buckets + (int)((key * 0x9E3779B97F4A7C15UL) >> 58);
            int fill = _bucketFill[slot];
            _bucketKeys[slot * BucketCapacity + fill] = packed;
            if (++fill == BucketCapacity)
            {
                if (owner == _index) ApplyBucket(slot - owner * Buckets, _bucketKeys.AsSpan(slot * BucketCapacity, fill));
                else HandOver(owner, slot - owner * Buckets, fill);
                fill = 0;
            }
            _bucketFill[slot] = fill;
        }

        private void HandOver(int owner, int bucket, int fill)
        {
            var chunk = _owner.RentChunk();
            _bucketKeys.AsSpan((owner * Buckets + bucket) * BucketCapacity, fill).CopyTo(chunk.Pairs);
            chunk.Count = fill;
            chunk.Bucket = bucket;
            _owner._workers[owner]._inbox.Enqueue(chunk);
        }

        private void ApplyInbox()
        {
            while (_inbox.TryDequeue(out var chunk))
            {
                ApplyBucket(chunk.Bucket, chunk.Pairs.AsSpan(0, chunk.Count));
                _owner.ReturnChunk(chunk);
            }
        }

        private void ApplyBucket(int bucket, ReadOnlySpan<ulong> keys)
        {
            var map = _maps[bucket];
            var weights = _owner._weights;
            foreach (ulong packed in keys)
            {
                ulong key = packed & KeyMask;
                long w = weights[(int)(packed >> 59)];
                if (!map.TryAdd(key, w))
                {
                    SpillAll();
                    map.TryAdd(key, w);
                }
            }
        }

        /// <summary>Sorts every bucket map in place (radix sort with a scratch of the largest map's size).</summary>
        private List<IPairReader> SortMaps()
        {
            int largest = 0;
            foreach (var m in _maps) largest = Math.Max(largest, m.Count);
            if (_sortScratch.Length < largest) _sortScratch = new PairEntry[largest];
            var readers = new List<IPairReader>(Buckets);
            foreach (var m in _maps)
            {
                var (entries, n) = m.SortedView(_sortScratch, 2 * _owner._idBits);
                readers.Add(new EntryPairReader(entries, n));
            }
            return readers;
        }

        /// <summary>One bucket map is at its share of the budget: all maps go to the run store as one sorted run
        /// (64-way merge of the individually sorted maps) and are emptied.</summary>
        private void SpillAll()
        {
            using (var merged = new PairMerger(SortMaps())) _owner._store.Write(_index, merged);
            foreach (var m in _maps) m.Clear();
        }

        /// <summary>Adds another worker's dense table and word counts into this one's, and frees them there.</summary>
        public void AddDense(Worker other)
        {
            var a = _dense;
            var b = other._dense;
            for (int i = 0; i < a.Length; i++) a[i] += b[i];
            for (int i = 0; i < _wordCounts.Length; i++) _wordCounts[i] += other._wordCounts[i];
            other._dense = [];
        }

        public void ReleaseDense() => _dense = [];

        /// <summary>Applies the pairs handed over and still staged, then merges the summed dense table (the owned rows),
        /// the sorted maps and this worker's spilled runs into compact rows.</summary>
        public (int[] RowStart, int[] Columns, float[] Values) Merge(long[] dense, long[] triangleBase)
        {
            ApplyInbox();
            int own = _index * Buckets;
            for (int b = 0; b < Buckets; b++)
            {
                int fill = _bucketFill[own + b];
                if (fill > 0) ApplyBucket(b, _bucketKeys.AsSpan((own + b) * BucketCapacity, fill));
                _bucketFill[own + b] = 0;
            }
            int threads = _owner._threads;
            int words = _owner._words;
            int bits = _owner._idBits;
            ulong columnMask = (1UL << bits) - 1;
            int cutoff = Cutoff;
            int localRows = (words - _index + threads - 1) / threads;
            var rowStart = new int[localRows + 1];
            long mapEntries = 0;
            foreach (var m in _maps) mapEntries += m.Count;
            int denseNonZeros = 0;
            for (int r = _index; r < cutoff; r += threads)
                for (int c = r; c < cutoff; c++)
                    if (dense[triangleBase[c] + r] != 0) denseNonZeros++;
            var readers = new List<IPairReader>(_owner._store.Open(_index));
            readers.AddRange(SortMaps());
            var cols = new int[(int)Math.Min(Array.MaxLength, Math.Max(16, mapEntries + denseNonZeros))];
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
                    if (nextDenseRow < cutoff)
                    {
                        for (int c = nextDenseRow; c < cutoff; c++)
                        {
                            long v = dense[triangleBase[c] + nextDenseRow];
                            if (v != 0) Append(ref cols, ref values, ref nn, c, (float)(v * inverseScale));
                        }
                    }
                    nextDenseRow += threads;
                }
            }
            using (var merged = new PairMerger(readers))
            {
                while (merged.Next(out ulong key, out long value))
                {
                    int r = (int)(key >> bits), c = (int)(key & columnMask);
                    StartRowsUpTo(r, ref n);
                    Append(ref cols, ref values, ref n, c, (float)(value * inverseScale));
                }
            }
            StartRowsUpTo(words - 1, ref n);
            while (currentLocal <= localRows) rowStart[currentLocal++] = n;
            for (int b = 0; b < Buckets; b++) _maps[b] = null!;
            _sortScratch = [];
            if (n < cols.Length) { Array.Resize(ref cols, n); Array.Resize(ref values, n); }
            return (rowStart, cols, values);
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
