using System.Buffers;
using System.Globalization;
using System.IO.Compression;
using System.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.IO;

/// <summary>What reading a vectors file produced, with the facts a model manifest records about it.</summary>
/// <param name="Format">"text", "text+gzip", "npy" or "npy+gzip".</param>
/// <param name="Sha256">Lower-case hex SHA-256 of the file as stored (compressed bytes for a .gz file).</param>
/// <param name="RowsInFile">Rows in the file, before zero vectors and repeated words were skipped.</param>
public sealed record VectorLoad(WordVectors Vectors, string Format, string Sha256, long RowsInFile, int ZeroRowsSkipped, int DuplicateRowsSkipped);

/// <summary>
/// Reads word vectors from the plain-text format (optionally gzip-compressed) or from a NumPy .npy matrix plus a
/// words file. The format is recognised by the file's first bytes, not its name. Zero vectors are skipped and a
/// repeated word keeps its first vector; both produce one warning each. Every other problem is a
/// <see cref="UserFacingException"/> naming the file, line (or row) and column.
/// </summary>
public static class VectorFile
{
    private static ReadOnlySpan<byte> GzipMagic => [0x1F, 0x8B];

    /// <param name="path">The vectors file.</param>
    /// <param name="wordsPath">The words file; required for .npy input, rejected for text input.</param>
    /// <param name="warn">Receives warnings (skipped rows); processing continues.</param>
    public static VectorLoad Read(string path, string? wordsPath = null, Action<string>? warn = null, CancellationToken cancellation = default)
    {
        cancellation.ThrowIfCancellationRequested();
        if (Directory.Exists(path)) throw new UserFacingException($"{path}: is a folder, not a vectors file");
        bool gzip, npy;
        long length;
        using (var probe = NpyFile.OpenRead(path))
        {
            length = probe.Length;
            Span<byte> head = stackalloc byte[6];
            int n = NpyFile.ReadFully(probe, head);
            gzip = n >= 2 && head[..2].SequenceEqual(GzipMagic);
            if (gzip)
            {
                probe.Position = 0;
                using var unzip = new GZipStream(probe, CompressionMode.Decompress, leaveOpen: true);
                n = ReadOrFail(unzip, head, path);
            }
            npy = NpyFile.StartsWithMagic(head[..n]);
        }

        using var hashing = new HashingReadStream(NpyFile.OpenRead(path));
        Stream source = gzip ? new GZipStream(hashing, CompressionMode.Decompress, leaveOpen: true) : hashing;
        try
        {
            RowCollector rows;
            if (npy)
            {
                if (wordsPath is null)
                    throw new UserFacingException($"{path}: is a NumPy array, which holds no words; name its words file with --words FILE", ExitCodes.Usage);
                rows = ReadNpy(source, path, wordsPath, cancellation);
            }
            else
            {
                if (wordsPath is not null)
                    throw new UserFacingException($"{path}: is a text vectors file, which names its words itself; --words applies only to .npy input", ExitCodes.Usage);
                // Uncompressed: a quick pre-pass counts the lines so the array is allocated once at its final size.
                // Compressed: the size is a guess (text word vectors compress about 3:1) and the array grows if needed.
                long lines = gzip ? -1 : CountLines(path, cancellation);
                rows = TextVectorReader.Read(source, path, gzip ? length * 3 : length, lines, cancellation).Rows;
            }
            var values = rows.Finish(warn);
            if (rows.Count == 0)
                throw new UserFacingException($"{path}: all {rows.RowsSeen.ToString(CultureInfo.InvariantCulture)} vectors are zero or repeated; nothing is left to use");
            string sha = hashing.FinishHex();
            return new VectorLoad(new WordVectors([.. rows.Words], values, rows.Dimensions),
                (npy ? "npy" : "text") + (gzip ? "+gzip" : ""), sha, rows.RowsSeen, rows.ZeroRows, rows.Duplicates);
        }
        catch (InvalidDataException e)
        {
            throw new UserFacingException($"{path}: the gzip data is damaged ({e.Message})");
        }
        catch (IOException e) when (e is not FileNotFoundException)
        {
            throw new UserFacingException($"{path}: cannot be read ({e.Message})");
        }
        finally
        {
            if (gzip) source.Dispose();
        }
    }

    /// <summary>Lines in a file ("\n" count, plus one for an unterminated last line); vectorised, about a second per
    /// few GB from the page cache.</summary>
    internal static long CountLines(string path, CancellationToken cancellation)
    {
        using var stream = NpyFile.OpenRead(path);
        var buffer = ArrayPool<byte>.Shared.Rent(1 << 20);
        try
        {
            long lines = 0;
            byte last = (byte)'\n';
            int n;
            while ((n = stream.Read(buffer, 0, 1 << 20)) > 0)
            {
                lines += buffer.AsSpan(0, n).Count((byte)'\n');
                last = buffer[n - 1];
                cancellation.ThrowIfCancellationRequested();
            }
            return last == (byte)'\n' ? lines : lines + 1;
        }
        finally
        {
            ArrayPool<byte>.Shared.Return(buffer);
        }
    }

    private static int ReadOrFail(Stream stream, Span<byte> head, string path)
    {
        try { return NpyFile.ReadFully(stream, head); }
        catch (InvalidDataException e) { throw new UserFacingException($"{path}: starts like gzip but the data is damaged ({e.Message})"); }
    }

    private static RowCollector ReadNpy(Stream stream, string path, string wordsPath, CancellationToken cancellation)
    {
        var header = NpyFile.ReadHeader(stream, path);
        var (rowCount, dims) = NpyFile.RequireMatrix(header, path);
        if (header.Type is not (NpyType.Float32 or NpyType.Float64))
            throw new UserFacingException($"{path}: holds integers; expected float32 ('<f4') or float64 ('<f8') vectors");
        if (rowCount == 0 || dims == 0)
            throw new UserFacingException($"{path}: has shape {header.ShapeText}; it contains no vectors");
        var words = WordListFile.Read(wordsPath, cancellation);
        if (words.Length != rowCount)
            throw new UserFacingException($"{wordsPath}: has {words.Length.ToString(CultureInfo.InvariantCulture)} words but {path} has {rowCount.ToString(CultureInfo.InvariantCulture)} rows (shape {header.ShapeText})");
        var rows = new RowCollector(path, "row", dims, rowCount);
        // Row numbers in messages are 0-based, as NumPy indexes them; the words file's line is row + 1.
        NpyFile.ReadFloatRows(stream, header, path, rowCount, dims, _ => rows.NextRow(), r => rows.Commit(words[r], r), cancellation);
        return rows;
    }

    /// <summary>Writes vectors in the plain-text format (UTF-8, "\n", shortest round-trip numbers, negative zero as 0),
    /// atomically.</summary>
    /// <param name="header">Write the "count dimension" first line.</param>
    public static void WriteText(string path, WordVectors vectors, bool header = true)
    {
        foreach (var w in vectors.Words)
            if (w.Length == 0 || w.AsSpan().IndexOfAny(" \t\r\n") >= 0)
                throw new ArgumentException($"word '{Printable.Word(w)}' cannot be written to a text vectors file (empty or contains white space)");
        AtomicFile.Write(path, stream => WriteText(stream, vectors, header));
    }

    internal static void WriteText(Stream stream, WordVectors vectors, bool header)
    {
        var buffer = new ArrayBufferWriter<byte>(1 << 16);
        if (header) Append(buffer, $"{vectors.Count.ToString(CultureInfo.InvariantCulture)} {vectors.Dimensions.ToString(CultureInfo.InvariantCulture)}\n");
        for (int i = 0; i < vectors.Count; i++)
        {
            Append(buffer, vectors.Words[i]);
            foreach (float x in vectors.Row(i))
            {
                float v = x == 0 ? 0f : x; // no "-0"
                var span = buffer.GetSpan(32);
                span[0] = (byte)' ';
                if (!v.TryFormat(span[1..], out int written, "R", CultureInfo.InvariantCulture))
                    throw new InvalidOperationException("a float did not fit in 31 bytes");
                buffer.Advance(written + 1);
            }
            buffer.GetSpan(1)[0] = (byte)'\n';
            buffer.Advance(1);
            if (buffer.WrittenCount > 1 << 20) { stream.Write(buffer.WrittenSpan); buffer.ResetWrittenCount(); }
        }
        stream.Write(buffer.WrittenSpan);
    }

    /// <summary>Writes a row-major float32 matrix as a .npy file (version 1.0 header, C order), atomically.</summary>
    public static void WriteNpy(string path, ReadOnlyMemory<float> values, int rows, int columns)
        => AtomicFile.Write(path, stream => NpyFile.WriteMatrix(stream, values.Span, rows, columns));

    private static void Append(ArrayBufferWriter<byte> buffer, string s)
    {
        int n = Encoding.UTF8.GetByteCount(s);
        Encoding.UTF8.GetBytes(s, buffer.GetSpan(n));
        buffer.Advance(n);
    }
}
