using System.Security.Cryptography;

namespace SenseSplit.Cli.IO;

/// <summary>Read-only pass-through stream that feeds every byte read into a SHA-256, so a file is hashed in the same
/// pass that parses it (no second read of a gigabyte file).</summary>
internal sealed class HashingReadStream(Stream inner) : Stream
{
    private readonly IncrementalHash _hash = IncrementalHash.CreateHash(HashAlgorithmName.SHA256);

    public override bool CanRead => true;
    public override bool CanSeek => false;
    public override bool CanWrite => false;
    public override long Length => inner.Length;
    public override long Position { get => inner.Position; set => throw new NotSupportedException(); }

    public override int Read(byte[] buffer, int offset, int count) => Read(buffer.AsSpan(offset, count));

    public override int Read(Span<byte> buffer)
    {
        int n = inner.Read(buffer);
        _hash.AppendData(buffer[..n]);
        return n;
    }

    /// <summary>Reads what is left of the underlying stream (into the hash) and returns the lower-case hex digest.</summary>
    public string FinishHex()
    {
        var scratch = new byte[1 << 16];
        while (Read(scratch) > 0) { }
        return Convert.ToHexStringLower(_hash.GetHashAndReset());
    }

    public override void Flush() { }
    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();
    public override void SetLength(long value) => throw new NotSupportedException();
    public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    protected override void Dispose(bool disposing)
    {
        if (disposing) { _hash.Dispose(); inner.Dispose(); }
        base.Dispose(disposing);
    }
}
