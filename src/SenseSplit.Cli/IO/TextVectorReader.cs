using System.Globalization;
using System.Text;
using System.Text.Unicode;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Streaming parser of the plain-text word-vector format: UTF-8, one word per line followed by its numbers separated
/// by spaces or tabs, an optional first line "count dimension". Lines are cut from a large byte buffer and numbers are
/// parsed from byte spans (<see cref="Utf8Number"/>) straight into the row-major value array: no string per line,
/// no string per number.
/// </summary>
internal sealed class TextVectorReader
{
    private const int InitialBuffer = 1 << 20;
    private const int MaxLineBytes = 64 << 20;

    private readonly string _path;
    private readonly long _sizeHint;
    private readonly long _lineCount;
    private long _line;
    private long _headerCount = -1;
    private int _dimensions = -1;
    private RowCollector? _rows;

    private TextVectorReader(string path, long sizeHint, long lineCount)
    {
        _path = path;
        _sizeHint = sizeHint;
        _lineCount = lineCount;
    }

    /// <summary>Parses a whole text vector stream. Without a header the value array is sized from
    /// <paramref name="lineCount"/> (lines in the text, when a pre-pass counted them: then no growth and, unless rows
    /// are skipped, no final trim) or else from <paramref name="sizeHint"/> (byte length, or a guess of it) and grown
    /// by half when full.</summary>
    public static (RowCollector Rows, bool HadHeader) Read(Stream stream, string path, long sizeHint, long lineCount, CancellationToken cancellation)
    {
        var reader = new TextVectorReader(path, sizeHint, lineCount);
        reader.Run(stream, cancellation);
        return (reader._rows!, reader._headerCount >= 0);
    }

    private void Run(Stream stream, CancellationToken cancellation)
    {
        byte[] buffer = new byte[InitialBuffer];
        int start = 0, end = 0;
        bool eof = false;
        while (true)
        {
            int newline = buffer.AsSpan(start, end - start).IndexOf((byte)'\n');
            if (newline >= 0)
            {
                Line(buffer.AsSpan(start, newline));
                start += newline + 1;
                if ((_line & 4095) == 0) cancellation.ThrowIfCancellationRequested();
                continue;
            }
            if (eof)
            {
                if (start < end) Line(buffer.AsSpan(start, end - start));
                break;
            }
            int remaining = end - start;
            if (start > 0) Buffer.BlockCopy(buffer, start, buffer, 0, remaining);
            start = 0;
            end = remaining;
            if (end == buffer.Length)
            {
                if (buffer.Length >= MaxLineBytes)
                    throw Error(_line + 1, $"line is longer than {MaxLineBytes >> 20} MiB; is this really a text word-vector file?");
                Array.Resize(ref buffer, buffer.Length * 2);
            }
            int read = stream.Read(buffer, end, buffer.Length - end);
            if (read == 0) eof = true;
            else end += read;
        }
        Finish();
    }

    private void Line(ReadOnlySpan<byte> line)
    {
        _line++;
        if (line.Length > 0 && line[^1] == (byte)'\r') line = line[..^1];
        if (_line == 1 && line.StartsWith("\uFEFF"u8)) line = line[3..];
        int pos = SkipBlanks(line, 0);
        if (pos == line.Length) return; // blank line

        if (_dimensions < 0)
        {
            if (TryHeader(line)) return;
            StartBody(line);
        }
        ReadRow(line, pos);
    }

    /// <summary>A first line of exactly two unsigned integers is the "count dimension" header.</summary>
    private bool TryHeader(ReadOnlySpan<byte> line)
    {
        int a = SkipBlanks(line, 0), aEnd = TokenEnd(line, a);
        int b = SkipBlanks(line, aEnd), bEnd = TokenEnd(line, b);
        if (b == line.Length || SkipBlanks(line, bEnd) != line.Length) return false;
        if (!IsUnsigned(line[a..aEnd]) || !IsUnsigned(line[b..bEnd])) return false;
        if (!long.TryParse(line[a..aEnd], NumberStyles.None, CultureInfo.InvariantCulture, out long count)
            || !int.TryParse(line[b..bEnd], NumberStyles.None, CultureInfo.InvariantCulture, out int dims) || dims <= 0)
            throw Error(_line, $"header '{Printable.Token(line)}' must be 'count dimension' with a positive dimension");
        _headerCount = count;
        _dimensions = dims;
        _rows = new RowCollector(_path, "line", dims, count);
        return true;
    }

    /// <summary>Without a header the first row sets the dimension; the line count (or the file size) sizes the array.</summary>
    private void StartBody(ReadOnlySpan<byte> line)
    {
        int tokens = 0;
        for (int p = SkipBlanks(line, 0); p < line.Length; p = SkipBlanks(line, TokenEnd(line, p))) tokens++;
        if (tokens < 2)
            throw Error(_line, $"the word '{Printable.Token(line)}' has no numbers after it");
        _dimensions = tokens - 1;
        long guess = _lineCount > 0 ? Math.Max(1, _lineCount - _line + 1)
            : _sizeHint > 0 ? (long)(_sizeHint / (double)(line.Length + 1) * 1.05) + 16 : 1024;
        _rows = new RowCollector(_path, "line", _dimensions, guess);
    }

    private void ReadRow(ReadOnlySpan<byte> line, int pos)
    {
        var rows = _rows!;
        if (_headerCount >= 0 && rows.RowsSeen >= _headerCount)
            throw Error(_line, $"more rows than the {_headerCount.ToString(CultureInfo.InvariantCulture)} the header on line 1 announces");

        int wordEnd = TokenEnd(line, pos);
        var wordBytes = line[pos..wordEnd];
        if (!Utf8.IsValid(wordBytes))
            throw Error(_line, Column(line, pos), $"the word '{Printable.Token(wordBytes)}' is not valid UTF-8");

        var row = rows.NextRow();
        int dims = _dimensions;
        int p = wordEnd;
        for (int j = 0; j < dims; j++)
        {
            p = SkipBlanks(line, p);
            if (p == line.Length)
                throw Error(_line, $"has {j.ToString(CultureInfo.InvariantCulture)} numbers, expected {dims.ToString(CultureInfo.InvariantCulture)} ({DimensionSource()})");
            // One pass for the common case: parse the number-shaped prefix and accept it if a blank or the end follows.
            var rest = line[p..];
            if (Utf8Number.TryParseFastPrefix(rest, out float v, out int used) && (used == rest.Length || rest[used] == (byte)' ' || rest[used] == (byte)'\t'))
            {
                row[j] = v;
                p += used;
                continue;
            }
            int e = TokenEnd(line, p);
            var token = line[p..e];
            if (!Utf8Number.TryParseFloat(token, out v))
                throw Error(_line, Column(line, p), $"'{Printable.Token(token)}' (number {(j + 1).ToString(CultureInfo.InvariantCulture)}) is not a number");
            if (!float.IsFinite(v))
                throw Error(_line, Column(line, p), $"'{Printable.Token(token)}' (number {(j + 1).ToString(CultureInfo.InvariantCulture)}) is not a finite float");
            row[j] = v;
            p = e;
        }
        p = SkipBlanks(line, p);
        if (p != line.Length)
        {
            int extra = 0;
            for (int q = p; q < line.Length; q = SkipBlanks(line, TokenEnd(line, q))) extra++;
            throw Error(_line, Column(line, p), $"has {(dims + extra).ToString(CultureInfo.InvariantCulture)} numbers, expected {dims.ToString(CultureInfo.InvariantCulture)} ({DimensionSource()}); words must not contain spaces");
        }
        rows.Commit(Encoding.UTF8.GetString(wordBytes), _line);
    }

    private void Finish()
    {
        if (_rows is null || _rows.RowsSeen == 0)
            throw new UserFacingException(_headerCount >= 0
                ? $"{_path}: has a header but no vectors"
                : $"{_path}: contains no vectors (the file is empty or blank)");
        if (_headerCount >= 0 && _rows.RowsSeen != _headerCount)
            throw new UserFacingException($"{_path}: the header on line 1 announces {_headerCount.ToString(CultureInfo.InvariantCulture)} rows but the file has {_rows.RowsSeen.ToString(CultureInfo.InvariantCulture)} (it ends at line {_line.ToString(CultureInfo.InvariantCulture)})");
    }

    private string DimensionSource() => _headerCount >= 0 ? "the dimension in the header on line 1" : "the dimension set by the first vector";

    private static int SkipBlanks(ReadOnlySpan<byte> s, int i)
    {
        while (i < s.Length && (s[i] == (byte)' ' || s[i] == (byte)'\t')) i++;
        return i;
    }

    private static int TokenEnd(ReadOnlySpan<byte> s, int i)
    {
        while (i < s.Length && s[i] != (byte)' ' && s[i] != (byte)'\t') i++;
        return i;
    }

    private static bool IsUnsigned(ReadOnlySpan<byte> s)
    {
        foreach (byte c in s) if ((uint)(c - '0') > 9) return false;
        return s.Length > 0;
    }

    /// <summary>1-based column in characters (UTF-8 lead bytes) of byte offset <paramref name="offset"/>.</summary>
    private static int Column(ReadOnlySpan<byte> line, int offset)
    {
        int col = 1;
        for (int i = 0; i < offset; i++) if ((line[i] & 0xC0) != 0x80) col++;
        return col;
    }

    private UserFacingException Error(long line, string problem)
        => new($"{_path}: line {line.ToString(CultureInfo.InvariantCulture)}: {problem}");

    private UserFacingException Error(long line, int column, string problem)
        => new($"{_path}: line {line.ToString(CultureInfo.InvariantCulture)}, column {column.ToString(CultureInfo.InvariantCulture)}: {problem}");
}
