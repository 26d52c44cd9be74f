using System.Globalization;
using System.Runtime.InteropServices;
using System.Text;
using System.Text.RegularExpressions;

namespace SenseSplit.Cli.IO;

/// <summary>
/// NumPy .npy files (format versions 1.0 to 3.0, as specified in NumPy's "format" module documentation): a magic string,
/// a header dictionary with 'descr', 'fortran_order' and 'shape', then the raw little-endian array in C order.
/// Reads float32, float64 (converted) and int32 2-D arrays (1-D as one column); writes float32 and int32.
/// </summary>
public static partial class NpyFile
{
    private static readonly byte[] Magic = [0x93, (byte)'N', (byte)'U', (byte)'M', (byte)'P', (byte)'Y'];

    public static (float[] data, int rows, int cols) ReadFloat32Matrix(string path)
    {
        var (descr, rows, cols, stream) = OpenArray(path);
        using (stream)
        {
            var data = new float[checked(rows * cols)];
            switch (descr)
            {
                case "<f4":
                    ReadExactly(stream, MemoryMarshal.AsBytes(data.AsSpan()), path);
                    break;
                case "<f8":
                    var wide = new double[data.Length];
                    ReadExactly(stream, MemoryMarshal.AsBytes(wide.AsSpan()), path);
                    for (int i = 0; i < data.Length; i++) data[i] = (float)wide[i];
                    break;
                default:
                    throw new UserFacingException($"{path}: element type '{descr}' is not supported (use little-endian float32 '<f4' or float64 '<f8')");
            }
            return (data, rows, cols);
        }
    }

    public static (int[] data, int rows, int cols) ReadInt32Matrix(string path)
    {
        var (descr, rows, cols, stream) = OpenArray(path);
        using (stream)
        {
            if (descr != "<i4") throw new UserFacingException($"{path}: element type '{descr}' where int32 '<i4' was expected");
            var data = new int[checked(rows * cols)];
            ReadExactly(stream, MemoryMarshal.AsBytes(data.AsSpan()), path);
            return (data, rows, cols);
        }
    }

    public static void Write(string path, ReadOnlySpan<float> data, int rows, int cols) =>
        WriteRaw(path, "<f4", MemoryMarshal.AsBytes(data), rows, cols, data.Length);

    public static void Write(string path, ReadOnlySpan<int> data, int rows, int cols) =>
        WriteRaw(path, "<i4", MemoryMarshal.AsBytes(data), rows, cols, data.Length);

    private static void WriteRaw(string path, string descr, ReadOnlySpan<byte> bytes, int rows, int cols, int length)
    {
        if ((long)rows * cols != length) throw new ArgumentException($"{path}: {length} values do not fill {rows}×{cols}");
        string dict = $"{{'descr': '{descr}', 'fortran_order': False, 'shape': ({rows.ToString(CultureInfo.InvariantCulture)}, {cols.ToString(CultureInfo.InvariantCulture)}), }}";
        // Header padded with spaces and ended by a newline so that the data starts on a 64-byte boundary (format spec).
        int total = Magic.Length + 2 + 2 + dict.Length + 1;
        int pad = (64 - total % 64) % 64;
        var header = Encoding.ASCII.GetBytes(dict + new string(' ', pad) + "\n");
        var tmp = path + ".tmp";
        using (var fs = new FileStream(tmp, FileMode.Create, FileAccess.Write, FileShare.None, 1 << 16))
        {
            fs.Write(Magic);
            fs.WriteByte(1); fs.WriteByte(0);
            fs.WriteByte((byte)(header.Length & 0xff)); fs.WriteByte((byte)(header.Length >> 8));
            fs.Write(header);
            fs.Write(bytes);
        }
        File.Move(tmp, path, overwrite: true);
    }

    private static (string descr, int rows, int cols, Stream stream) OpenArray(string path)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: no such file");
        var fs = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16);
        try
        {
            Span<byte> pre = stackalloc byte[10];
            if (fs.Read(pre) < 10 || !pre[..6].SequenceEqual(Magic)) throw new UserFacingException($"{path}: not a NumPy .npy file (bad magic bytes)");
            int major = pre[6];
            int headerLength;
            if (major == 1) headerLength = pre[8] | pre[9] << 8;
            else if (major is 2 or 3)
            {
                Span<byte> more = stackalloc byte[2];
                if (fs.Read(more) < 2) throw new UserFacingException($"{path}: truncated header");
                headerLength = pre[8] | pre[9] << 8 | more[0] << 16 | more[1] << 24;
            }
            else throw new UserFacingException($"{path}: .npy format version {major} is not supported");
            var header = new byte[headerLength];
            ReadExactly(fs, header, path);
            string text = Encoding.UTF8.GetString(header);
            var descr = DescrPattern().Match(text);
            var fortran = FortranPattern().Match(text);
            var shape = ShapePattern().Match(text);
            if (!descr.Success || !fortran.Success || !shape.Success) throw new UserFacingException($"{path}: unreadable .npy header: {text.Trim()}");
            if (fortran.Groups[1].Value == "True") throw new UserFacingException($"{path}: Fortran-ordered arrays are not supported; save it in C order");
            var dimsText = shape.Groups[1].Value.Split(',', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
            var dims = dimsText.Select(d => long.Parse(d, CultureInfo.InvariantCulture)).ToArray();
            if (dims.Length is 0 or > 2) throw new UserFacingException($"{path}: a {dims.Length}-dimensional array where a matrix was expected");
            long rows = dims[0], cols = dims.Length == 2 ? dims[1] : 1;
            if (rows * cols > Array.MaxLength) throw new UserFacingException($"{path}: {rows}×{cols} is too large");
            string d = descr.Groups[1].Value.Replace("|", "<");
            return (d, (int)rows, (int)cols, fs);
        }
        catch
        {
            fs.Dispose();
            throw;
        }
    }

    private static void ReadExactly(Stream s, Span<byte> buffer, string path)
    {
        try { s.ReadExactly(buffer); }
        catch (EndOfStreamException) { throw new UserFacingException($"{path}: the file ends before the array does (truncated?)"); }
    }

    [GeneratedRegex(@"'descr'\s*:\s*'([^']+)'")]
    private static partial Regex DescrPattern();
    [GeneratedRegex(@"'fortran_order'\s*:\s*(True|False)")]
    private static partial Regex FortranPattern();
    [GeneratedRegex(@"'shape'\s*:\s*\(([^)]*)\)")]
    private static partial Regex ShapePattern();
}
