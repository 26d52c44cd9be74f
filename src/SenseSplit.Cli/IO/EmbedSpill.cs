using SenseSplit.Core.Cooccurrence;

namespace SenseSplit.Cli.IO;

/// <summary>Sorted runs of co-occurrence sums in files of a temporary folder: 16 bytes per pair (key, sum; little-endian).</summary>
public sealed class DiskRunStore(string folder) : IRunStore, IDisposable
{
    private readonly List<(int Partition, string Path)> _runs = new();
    private readonly Lock _lock = new();
    private int _next;

    public int RunCount { get { lock (_lock) return _runs.Count; } }
    public long BytesWritten { get; private set; }

    public void Write(int partition, ReadOnlySpan<ulong> keys, ReadOnlySpan<long> values)
    {
        Directory.CreateDirectory(folder);
        int n = Interlocked.Increment(ref _next);
        string path = Path.Combine(folder, $"run-{partition}-{n:D5}.bin");
        try
        {
            using var f = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 20);
            using var w = new BinaryWriter(f);
            for (int i = 0; i < keys.Length; i++) { w.Write(keys[i]); w.Write(values[i]); }
        }
        catch (IOException ex)
        {
            throw new UserFacingException($"temporary run file {path}: write failed ({ex.Message}); free disk space or point --temp-dir elsewhere", ExitCodes.WriteFailed);
        }
        lock (_lock) { _runs.Add((partition, path)); BytesWritten += (long)keys.Length * 16; }
    }

    public IReadOnlyList<IPairReader> Open(int partition)
    {
        lock (_lock)
            return _runs.Where(r => r.Partition == partition).OrderBy(r => r.Path, StringComparer.Ordinal)
                .Select(r => (IPairReader)new FileReader(r.Path)).ToList();
    }

    public void Dispose()
    {
        try { if (Directory.Exists(folder)) Directory.Delete(folder, recursive: true); }
        catch (IOException) { }
    }

    private sealed class FileReader(string path) : IPairReader
    {
        private readonly BinaryReader _reader = new(new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 18, FileOptions.SequentialScan));
        private long _left = new FileInfo(path).Length / 16;

        public bool Next(out ulong key, out long value)
        {
            if (_left-- <= 0) { key = 0; value = 0; return false; }
            key = _reader.ReadUInt64();
            value = _reader.ReadInt64();
            return true;
        }

        public void Dispose() => _reader.Dispose();
    }
}
