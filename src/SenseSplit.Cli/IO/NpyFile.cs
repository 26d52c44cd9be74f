using System.Buffers.Binary;
using System.Globalization;
using System.Runtime.InteropServices;
using System.Text;

namespace SenseSplit.Cli.IO;

/// <summary>Element types SenseSplit reads from or writes to .npy files (all little-endian).</summary>
internal enum NpyType { Float32, Float64, Int32, Int64 }

/// <summary>The parsed header of a .npy file: element type, shape, and where the data starts.</summary>
internal sealed record NpyHeader(NpyType Type, bool FortranOrder, long[] Shape, int DataOffset)
{
    public long ElementCount => Shape.Aggregate(1L, (a, b) => a * b);
    public int ElementSize => Type is NpyType.Float64 or NpyType.Int64 ? 8 : 4;
    public string ShapeText => "(" + string.Join(", ", Shape.Select(s => s.ToString(CultureInfo.InvariantCulture))) + ")";
}

/// <summary>
/// NumPy .npy reader and writer, following the format specification of numpy.lib.format (versions 1.0, 2.0 and 3.0):
/// magic "\x93NUMPY", one byte major and one byte minor version, the header length (uint16 little-endian in 1.0,
/// uint32 in 2.0 and 3.0), then an ASCII (3.0: UTF-8) Python dict literal with keys 'descr', 'fortran_order' and
/// 'shape', padded with spaces and a final newline; the raw array data follows.
/// </summary>
internal static class NpyFile
{
    /// <summary>The six bytes every .npy file starts with: 0x93 then "NUMPY".</summary>
    public static ReadOnlySpan<byte> Magic => [0x93, (byte)'N', (byte)'U', (byte)'M', (byte)'P', (byte)'Y'];

    public static bool StartsWithMagic(ReadOnlySpan<byte> prefix) => prefix.Length >= 6 && prefix[..6].SequenceEqual(Magic);

    /// <summary>Reads and parses the header; the stream is left at the first data byte.</summary>
    public static NpyHeader ReadHeader(Stream stream, string path)
    {
        Span<byte> pre = stackalloc byte[12];
        if (ReadFully(stream, pre[..8]) < 8 || !StartsWithMagic(pre))
            throw Bad(path, "is not a NumPy .npy file (the magic string \\x93NUMPY is missing)");
        byte major = pre[6];
        int headerLength, offset;
        switch (major)
        {
            case 1:
                if (ReadFully(stream, pre.Slice(8, 2)) < 2) throw Bad(path, "ends inside the .npy header");
                headerLength = BinaryPrimitives.ReadUInt16LittleEndian(pre.Slice(8, 2));
                offset = 10;
                break;
            case 2 or 3:
                if (ReadFully(stream, pre.Slice(8, 4)) < 4) throw Bad(path, "ends inside the .npy header");
                uint len = BinaryPrimitives.ReadUInt32LittleEndian(pre.Slice(8, 4));
                if (len > 1 << 20) throw Bad(path, $"has an implausible .npy header length ({len.ToString(CultureInfo.InvariantCulture)} bytes)");
                headerLength = (int)len;
                offset = 12;
                break;
            default:
                throw Bad(path, $"uses .npy format version {major.ToString(CultureInfo.InvariantCulture)}.{pre[7].ToString(CultureInfo.InvariantCulture)}, which this tool does not read (it reads 1.x, 2.x, 3.x)");
        }
        var headerBytes = new byte[headerLength];
        if (ReadFully(stream, headerBytes) < headerLength) throw Bad(path, "ends inside the .npy header");
        string header;
        try { header = new UTF8Encoding(false, true).GetString(headerBytes); }
        catch (DecoderFallbackException) { throw Bad(path, "has a .npy header that is not valid text"); }
        return ParseHeader(header, path, offset + headerLength);
    }

    internal static NpyHeader ParseHeader(string header, string path, int dataOffset)
    {
        var dict = new PyLiteralParser(header, path).ParseDict();
        if (!dict.TryGetValue("descr", out var descrObj) || descrObj is not string descr)
            throw Bad(path, "has a .npy header without a 'descr' string");
        if (!dict.TryGetValue("fortran_order", out var fortranObj) || fortranObj is not bool fortran)
            throw Bad(path, "has a .npy header without a 'fortran_order' flag");
        if (!dict.TryGetValue("shape", out var shapeObj) || shapeObj is not long[] shape)
            throw Bad(path, "has a .npy header without a 'shape' tuple");
        NpyType type = descr switch
        {
            "<f4" => NpyType.Float32,
            "<f8" => NpyType.Float64,
            "<i4" => NpyType.Int32,
            "<i8" => NpyType.Int64,
            ">f4" or ">f8" or ">i4" or ">i8" => throw Bad(path, $"holds big-endian data ('{descr}'); save it little-endian (e.g. array.astype('<f4'))"),
            _ => throw Bad(path, $"holds elements of type '{descr}'; expected float32 ('<f4') or float64 ('<f8')"),
        };
        if (shape.Any(s => s < 0)) throw Bad(path, "has a negative size in its .npy shape");
        return new NpyHeader(type, fortran, shape, dataOffset);
    }

    /// <summary>Checks that a header describes a 2-D C-order array and returns (rows, columns).</summary>
    public static (int Rows, int Columns) RequireMatrix(NpyHeader header, string path)
    {
        if (header.FortranOrder)
            throw Bad(path, "is stored in Fortran (column-major) order; save it in C order (numpy.ascontiguousarray)");
        if (header.Shape.Length != 2)
            throw Bad(path, $"has shape {header.ShapeText}; expected a 2-D array (rows, dimensions)");
        if (header.ElementCount > Array.MaxLength || header.Shape[0] > int.MaxValue || header.Shape[1] > int.MaxValue)
            throw Bad(path, $"shape {header.ShapeText} is too large for one array");
        return ((int)header.Shape[0], (int)header.Shape[1]);
    }

    /// <summary>Reads the data of a float32 or float64 matrix row by row into <paramref name="sink"/>,
    /// which receives (row index, row values as float32). float64 values outside the float32 range are rejected.</summary>
    public static void ReadFloatRows(Stream stream, NpyHeader header, string path, int rows, int columns,
        Func<int, Span<float>> rowTarget, Action<int> rowDone, CancellationToken cancellation = default)
    {
        if (header.Type is not (NpyType.Float32 or NpyType.Float64))
            throw Bad(path, "holds integers; expected float32 ('<f4') or float64 ('<f8') vectors");
        byte[] scratch = new byte[Math.Max(1, columns) * header.ElementSize];
        for (int r = 0; r < rows; r++)
        {
            if ((r & 1023) == 0) cancellation.ThrowIfCancellationRequested();
            var target = rowTarget(r);
            if (header.Type == NpyType.Float32)
            {
                var bytes = MemoryMarshal.AsBytes(target);
                if (ReadFully(stream, bytes) < bytes.Length) throw Truncated(path, header, r);
            }
            else
            {
                if (ReadFully(stream, scratch) < scratch.Length) throw Truncated(path, header, r);
                var doubles = MemoryMarshal.Cast<byte, double>(scratch.AsSpan());
                for (int c = 0; c < columns; c++)
                {
                    double d = doubles[c];
                    if (double.IsFinite(d) && (float)d is var f && float.IsFinite(f)) { target[c] = f; continue; }
                    throw Bad(path, $"row {r.ToString(CultureInfo.InvariantCulture)}, column {c.ToString(CultureInfo.InvariantCulture)}: {d.ToString("R", CultureInfo.InvariantCulture)} is not a finite float32 value");
                }
            }
            for (int c = 0; c < columns; c++)
                if (!float.IsFinite(target[c]))
                    throw Bad(path, $"row {r.ToString(CultureInfo.InvariantCulture)}, column {c.ToString(CultureInfo.InvariantCulture)}: {target[c].ToString(CultureInfo.InvariantCulture)} is not a finite float");
            rowDone(r);
        }
    }

    /// <summary>Reads a whole float32 matrix (any float type on disk) into a new array, checking its shape.</summary>
    public static float[] ReadFloat32Matrix(string path, int expectedRows, int expectedColumns, string what)
    {
        using var stream = OpenRead(path);
        var header = ReadHeader(stream, path);
        var (rows, cols) = RequireMatrix(header, path);
        if (rows != expectedRows || cols != expectedColumns)
            throw Bad(path, $"has shape {header.ShapeText} but {what} requires ({expectedRows.ToString(CultureInfo.InvariantCulture)}, {expectedColumns.ToString(CultureInfo.InvariantCulture)})");
        var values = new float[(long)rows * cols];
        ReadFloatRows(stream, header, path, rows, cols, r => values.AsSpan(r * cols, cols), _ => { });
        return values;
    }

    /// <summary>Reads a whole int32 matrix into a new array, checking its shape.</summary>
    public static int[] ReadInt32Matrix(string path, int expectedRows, int expectedColumns, string what)
    {
        using var stream = OpenRead(path);
        var header = ReadHeader(stream, path);
        var (rows, cols) = RequireMatrix(header, path);
        if (header.Type != NpyType.Int32)
            throw Bad(path, $"holds elements of another type; expected int32 ('<i4')");
        if (rows != expectedRows || cols != expectedColumns)
            throw Bad(path, $"has shape {header.ShapeText} but {what} requires ({expectedRows.ToString(CultureInfo.InvariantCulture)}, {expectedColumns.ToString(CultureInfo.InvariantCulture)})");
        var values = new int[(long)rows * cols];
        var bytes = MemoryMarshal.AsBytes(values.AsSpan());
        if (ReadFully(stream, bytes) < bytes.Length) throw Truncated(path, header, -1);
        return values;
    }

    /// <summary>Writes a 2-D C-order little-endian array (see <see cref="Write{T}"/>).</summary>
    public static void WriteMatrix<T>(Stream stream, ReadOnlySpan<T> values, int rows, int columns) where T : unmanaged
    {
        if ((long)rows * columns != values.Length) throw new ArgumentException($"values: length {values.Length} does not match {rows}×{columns}");
        Write(stream, values, rows, columns);
    }

    /// <summary>Writes a 1-D little-endian array of all the values (see <see cref="Write{T}"/>).</summary>
    public static void WriteVector<T>(Stream stream, ReadOnlySpan<T> values) where T : unmanaged => Write(stream, values, values.Length);

    /// <summary>Writes a C-order little-endian array of float32, float64, int32 or int64 with a version 1.0 header laid
    /// out byte for byte as numpy.save (numpy 1.24, numpy/lib/format.py) does: the dict with keys in sorted order, spare
    /// spaces so the first axis can grow in place (21 minus the digits of its length), then space padding and a newline
    /// so that the data starts at a multiple of 64 bytes.</summary>
    private static void Write<T>(Stream stream, ReadOnlySpan<T> values, params long[] shape) where T : unmanaged
    {
        if (!BitConverter.IsLittleEndian) throw new PlatformNotSupportedException(".npy writing assumes a little-endian machine");
        string descr = typeof(T) == typeof(float) ? "<f4" : typeof(T) == typeof(double) ? "<f8"
            : typeof(T) == typeof(int) ? "<i4" : typeof(T) == typeof(long) ? "<i8"
            : throw new ArgumentException($"no .npy type for {typeof(T).Name}");
        stream.Write(HeaderBytes(descr, shape));
        stream.Write(MemoryMarshal.AsBytes(values));
    }

    internal static byte[] HeaderBytes(string descr, params long[] shape)
    {
        const int GrowthDigits = 21, Align = 64, Prefix = 10; // magic (6) + version (2) + uint16 header length (2)
        if (shape.Length == 0) throw new ArgumentException("a .npy array needs at least one axis", nameof(shape));
        string firstAxis = shape[0].ToString(CultureInfo.InvariantCulture);
        // Python's tuple repr: "(3,)" for one axis, "(3, 4)" for two or more.
        string shapeText = shape.Length == 1 ? $"({firstAxis},)"
            : "(" + string.Join(", ", shape.Select(s => s.ToString(CultureInfo.InvariantCulture))) + ")";
        string dict = $"{{'descr': '{descr}', 'fortran_order': False, 'shape': {shapeText}, }}"
            + new string(' ', Math.Max(0, GrowthDigits - firstAxis.Length));
        int withNewline = dict.Length + 1;
        int padding = Align - (Prefix + withNewline) % Align; // 1..64, as numpy computes it
        string header = dict + new string(' ', padding) + "\n";
        var bytes = new byte[Prefix + header.Length];
        Magic.CopyTo(bytes);
        bytes[6] = 1; bytes[7] = 0;
        BinaryPrimitives.WriteUInt16LittleEndian(bytes.AsSpan(8, 2), (ushort)header.Length);
        Encoding.ASCII.GetBytes(header, bytes.AsSpan(Prefix));
        return bytes;
    }

    internal static Stream OpenRead(string path)
    {
        try { return new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16); }
        catch (FileNotFoundException) { throw new UserFacingException($"{path}: file not found"); }
        catch (DirectoryNotFoundException) { throw new UserFacingException($"{path}: file not found (no such folder)"); }
        catch (UnauthorizedAccessException) { throw new UserFacingException($"{path}: permission denied"); }
        catch (IOException e) { throw new UserFacingException($"{path}: cannot be read ({e.Message})"); }
    }

    internal static int ReadFully(Stream stream, Span<byte> buffer)
    {
        int total = 0;
        while (total < buffer.Length)
        {
            int n = stream.Read(buffer[total..]);
            if (n == 0) break;
            total += n;
        }
        return total;
    }

    private static UserFacingException Truncated(string path, NpyHeader header, int row)
        => Bad(path, row >= 0
            ? $"ends at row {row.ToString(CultureInfo.InvariantCulture)} although its header announces shape {header.ShapeText} (the file is truncated)"
            : $"is shorter than its header's shape {header.ShapeText} requires (the file is truncated)");

    private static UserFacingException Bad(string path, string problem) => new($"{path}: {problem}");

    /// <summary>Just enough of a Python literal parser for .npy headers: a dict of string keys whose values are
    /// strings, True/False, or tuples of integers.</summary>
    private ref struct PyLiteralParser(string text, string path)
    {
        private int _i;

        public Dictionary<string, object> ParseDict()
        {
            var result = new Dictionary<string, object>(StringComparer.Ordinal);
            Expect('{');
            while (true)
            {
                Skip();
                if (Peek() == '}') { _i++; break; }
                string key = ParseString();
                Expect(':');
                result[key] = ParseValue();
                Skip();
                if (Peek() == ',') { _i++; continue; }
                Expect('}');
                break;
            }
            return result;
        }

        private object ParseValue()
        {
            Skip();
            char c = Peek();
            if (c is '\'' or '"') return ParseString();
            if (c == '(') return ParseTuple();
            if (Match("True")) return true;
            if (Match("False")) return false;
            throw Fail("unexpected value");
        }

        private long[] ParseTuple()
        {
            Expect('(');
            var items = new List<long>();
            while (true)
            {
                Skip();
                if (Peek() == ')') { _i++; break; }
                int start = _i;
                while (_i < text.Length && char.IsAsciiDigit(text[_i])) _i++;
                if (_i < text.Length && text[_i] == 'L') _i++; // Python 2 long suffix, as old numpy wrote it
                var digits = text.AsSpan(start, _i - start).TrimEnd('L');
                if (digits.Length == 0 || !long.TryParse(digits, NumberStyles.None, CultureInfo.InvariantCulture, out long v))
                    throw Fail("shape entries must be non-negative integers");
                items.Add(v);
                Skip();
                if (Peek() == ',') { _i++; continue; }
                Expect(')');
                break;
            }
            return [.. items];
        }

        private string ParseString()
        {
            Skip();
            char quote = Peek();
            if (quote is not ('\'' or '"')) throw Fail("expected a quoted key or value");
            int end = text.IndexOf(quote, _i + 1);
            if (end < 0) throw Fail("unterminated string");
            string s = text.Substring(_i + 1, end - _i - 1);
            _i = end + 1;
            return s;
        }

        private bool Match(string word)
        {
            if (string.CompareOrdinal(text, _i, word, 0, word.Length) != 0) return false;
            _i += word.Length;
            return true;
        }

        private void Expect(char c)
        {
            Skip();
            if (Peek() != c) throw Fail($"expected '{c}'");
            _i++;
        }

        private void Skip() { while (_i < text.Length && char.IsWhiteSpace(text[_i])) _i++; }
        private readonly char Peek() => _i < text.Length ? text[_i] : '\0';
        private readonly UserFacingException Fail(string what)
            => new($"{path}: the .npy header is malformed at character {(_i + 1).ToString(CultureInfo.InvariantCulture)}: {what}");
    }
}
