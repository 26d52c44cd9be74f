using System.Buffers.Binary;
using System.Globalization;
using System.Text;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Minimal writers for the files of an embed output folder (private to embed until the shared writers land):
/// plain-text word vectors, NumPy .npy arrays (format 1.0, little-endian, C order) and the frequency table.
/// </summary>
internal static class EmbedWriters
{
    private static readonly UTF8Encoding Utf8 = new(encoderShouldEmitUTF8Identifier: false);

    /// <summary>Plain-text word vectors: first line "words dimensions", then one line per word: the word and its
    /// numbers, separated by single spaces, shortest round-trip form, invariant culture, LF line ends.</summary>
    public static void WriteVectors(string path, IReadOnlyList<string> words, ReadOnlySpan<float> values, int dimensions)
    {
        using var stream = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 20);
        using var w = new StreamWriter(stream, Utf8, 1 << 16) { NewLine = "\n" };
        w.Write(words.Count.ToString(CultureInfo.InvariantCulture));
        w.Write(' ');
        w.Write(dimensions.ToString(CultureInfo.InvariantCulture));
        w.Write('\n');
        Span<char> number = stackalloc char[32];
        for (int i = 0; i < words.Count; i++)
        {
            w.Write(words[i]);
            var row = values.Slice(i * dimensions, dimensions);
            for (int j = 0; j < dimensions; j++)
            {
                w.Write(' ');
                float v = row[j] == 0 ? 0f : row[j]; // no "-0"
                if (!v.TryFormat(number, out int n, "R", CultureInfo.InvariantCulture)) throw new InvalidOperationException("number formatting failed");
                w.Write(number[..n]);
            }
            w.Write('\n');
        }
    }

    /// <summary>Word frequency table: header "word\tcount", then one line per word in vocabulary order.</summary>
    public static void WriteCounts(string path, IReadOnlyList<string> words, IReadOnlyList<long> counts)
    {
        using var stream = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 16);
        using var w = new StreamWriter(stream, Utf8, 1 << 16) { NewLine = "\n" };
        w.Write("word\tcount\n");
        for (int i = 0; i < words.Count; i++)
        {
            w.Write(words[i]);
            w.Write('\t');
            w.Write(counts[i].ToString(CultureInfo.InvariantCulture));
            w.Write('\n');
        }
    }

    /// <summary>A float32 array of the given shape (row-major) as .npy.</summary>
    public static void WriteNpy(string path, ReadOnlySpan<float> values, params int[] shape)
    {
        using var f = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 20);
        WriteNpyHeader(f, "<f4", shape, values.Length);
        var buffer = new byte[1 << 16];
        for (int at = 0; at < values.Length; at += buffer.Length / 4)
        {
            int n = Math.Min(buffer.Length / 4, values.Length - at);
            for (int i = 0; i < n; i++) BinaryPrimitives.WriteSingleLittleEndian(buffer.AsSpan(i * 4), values[at + i]);
            f.Write(buffer, 0, n * 4);
        }
    }

    /// <summary>A float64 array of the given shape (row-major) as .npy.</summary>
    public static void WriteNpy(string path, ReadOnlySpan<double> values, params int[] shape)
    {
        using var f = new FileStream(path, FileMode.CreateNew, FileAccess.Write, FileShare.None, 1 << 20);
        WriteNpyHeader(f, "<f8", shape, values.Length);
        var buffer = new byte[1 << 16];
        for (int at = 0; at < values.Length; at += buffer.Length / 8)
        {
            int n = Math.Min(buffer.Length / 8, values.Length - at);
            for (int i = 0; i < n; i++) BinaryPrimitives.WriteDoubleLittleEndian(buffer.AsSpan(i * 8), values[at + i]);
            f.Write(buffer, 0, n * 8);
        }
    }

    /// <summary>NPY format 1.0: magic "\x93NUMPY", version 1.0, header length (uint16 LE), an ASCII dict padded with
    /// spaces and ending in '\n' so that the data starts at a multiple of 64 bytes.</summary>
    private static void WriteNpyHeader(Stream f, string descr, int[] shape, int length)
    {
        long expected = 1;
        foreach (int s in shape) expected *= s;
        if (expected != length) throw new ArgumentException($"npy: shape ({string.Join(", ", shape)}) holds {expected} values, got {length}");
        string shapeText = shape.Length == 1 ? $"({shape[0]},)" : "(" + string.Join(", ", shape.Select(s => s.ToString(CultureInfo.InvariantCulture))) + ")";
        string dict = $"{{'descr': '{descr}', 'fortran_order': False, 'shape': {shapeText}, }}";
        int total = 10 + dict.Length + 1;
        int padded = (total + 63) / 64 * 64;
        var header = dict + new string(' ', padded - total) + "\n";
        Span<byte> prefix = [0x93, (byte)'N', (byte)'U', (byte)'M', (byte)'P', (byte)'Y', 1, 0, 0, 0];
        BinaryPrimitives.WriteUInt16LittleEndian(prefix[8..], (ushort)header.Length);
        f.Write(prefix);
        f.Write(Encoding.ASCII.GetBytes(header));
    }
}
