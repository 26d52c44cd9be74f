using System.Buffers.Binary;
using System.Runtime.InteropServices;
using SenseSplit.Core.Text;

namespace SenseSplit.Cli.IO;

/// <summary>
/// The token-id stream of the first pass in a temporary file (int32 little-endian per token, in the
/// <see cref="IdStream"/> encoding: a table id, -2 a line break, -3 a paragraph break), so later passes replay ids
/// instead of decoding and tokenizing the text again.
/// Costs 4 bytes of temporary disk per token.
/// </summary>
public sealed class CorpusIdSpool : IIdSink, IDisposable
{
    private const int LineMark = IdStream.LineMark, ParagraphMark = IdStream.ParagraphMark;
    private readonly string _path;
    private readonly FileStream _out;
    private readonly byte[] _buffer = new byte[1 << 20];
    private int _fill;
    private bool _closed;

    public CorpusIdSpool(string path)
    {
        _path = path;
        Directory.CreateDirectory(Path.GetDirectoryName(path)!);
        _out = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16);
    }

    public long Bytes { get; private set; }

    public void Id(int id) => Put(id);
    public void LineBreak() => Put(LineMark);
    public void ParagraphBreak() => Put(ParagraphMark);

    private void Put(int value)
    {
        BinaryPrimitives.WriteInt32LittleEndian(_buffer.AsSpan(_fill), value);
        _fill += 4;
        if (_fill == _buffer.Length) Flush();
    }

    private void Flush()
    {
        try { _out.Write(_buffer, 0, _fill); }
        catch (IOException ex) { throw new UserFacingException($"temporary id file {_path}: write failed ({ex.Message}); free disk space or use --temp-dir", ExitCodes.WriteFailed); }
        Bytes += _fill;
        _fill = 0;
    }

    /// <summary>Ends writing (call once, after the first pass).</summary>
    public void Close()
    {
        if (_closed) return;
        Flush();
        _out.Dispose();
        _closed = true;
    }

    /// <summary>Replays the stream into <paramref name="target"/>; <paramref name="onBytes"/> gets the bytes read so far.</summary>
    public void Replay(TokenIdMapper target, Action<long>? onBytes = null)
    {
        Close();
        using var f = new FileStream(_path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan);
        var buffer = new byte[1 << 20];
        long read = 0;
        int n;
        while ((n = f.Read(buffer, 0, buffer.Length)) > 0)
        {
            if (n % 4 != 0)
            {
                // A short read inside a value: complete it.
                int missing = 4 - n % 4;
                f.ReadExactly(buffer.AsSpan(n, missing));
                n += missing;
            }
            if (BitConverter.IsLittleEndian) target.TableIds(MemoryMarshal.Cast<byte, int>(buffer.AsSpan(0, n)));
            else
            {
                for (int at = 0; at < n; at += 4)
                {
                    int v = BinaryPrimitives.ReadInt32LittleEndian(buffer.AsSpan(at));
                    if (v >= -1) target.TableId(v);
                    else if (v == LineMark) target.LineBreak();
                    else target.ParagraphBreak();
                }
            }
            read += n;
            onBytes?.Invoke(read);
        }
    }

    public void Dispose()
    {
        if (!_closed) { _out.Dispose(); _closed = true; }
        try { File.Delete(_path); } catch (IOException) { }
    }
}
