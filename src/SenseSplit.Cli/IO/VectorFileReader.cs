using System.Globalization;
using System.IO.Compression;
using System.Text;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.IO;

/// <summary>Problems found while reading that do not stop the read (skipped zero rows, duplicate words).</summary>
public sealed record ReadNotes(int ZeroRowsSkipped, int DuplicatesSkipped, IReadOnlyList<string> Messages);

/// <summary>
/// Reads word vectors: the plain-text word-vector format (UTF-8, one word per line followed by its numbers, an optional
/// first line "count dimension", optionally gzip-compressed), or a NumPy .npy matrix with a words file.
/// Streams the file; memory is about words × dimensions floats.
/// </summary>
public static class VectorFileReader
{
    private const int MaxNotes = 20;

    public static (WordVectors vectors, ReadNotes notes) Read(string path, string? wordsPath = null)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: no such file");
        if (path.EndsWith(".npy", StringComparison.OrdinalIgnoreCase))
        {
            if (wordsPath is null) throw new UserFacingException($"{path}: a .npy matrix needs a words file (--words FILE, one word per line)");
            return ReadNpyWithWords(path, wordsPath);
        }
        using var stream = OpenMaybeGzip(path);
        return ReadText(stream, path);
    }

    /// <summary>Opens a file, transparently decompressing gzip (detected by its magic bytes 1f 8b).</summary>
    public static Stream OpenMaybeGzip(string path)
    {
        var file = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16);
        int b1 = file.ReadByte(), b2 = file.ReadByte();
        file.Position = 0;
        if (b1 == 0x1f && b2 == 0x8b) return new BufferedStream(new GZipStream(file, CompressionMode.Decompress), 1 << 16);
        return file;
    }

    private static readonly UTF8Encoding StrictUtf8 = new(false, throwOnInvalidBytes: true);

    /// <summary>Parses the text format from a stream; <paramref name="name"/> is used in messages.</summary>
    public static (WordVectors vectors, ReadNotes notes) ReadText(Stream stream, string name)
    {
        var reader = new LineReader(stream);
        var words = new List<string>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        float[] values = new float[1 << 16];
        long count = 0;
        int dims = -1;
        long headerCount = -1;
        int zero = 0, dup = 0;
        var messages = new List<string>();
        long lineNo = 0;
        float[] row = [];
        while (reader.TryReadLine(out var line))
        {
            lineNo++;
            if (lineNo == 1 && line.Length >= 3 && line[0] == 0xEF && line[1] == 0xBB && line[2] == 0xBF) line = line[3..];
            line = TrimEnd(line);
            if (line.IsEmpty) continue;
            // Split off the word: everything up to the first space or tab.
            int sep = line.IndexOfAny((byte)' ', (byte)'\t');
            if (lineNo == 1 && TryParseHeader(line, out long hc, out int hd))
            {
                headerCount = hc; dims = hd; row = new float[dims];
                if (hc > 0 && hc * hd < int.MaxValue) values = new float[hc * hd];
                continue;
            }
            if (sep <= 0) throw Error(name, lineNo, 1, "a word with no numbers after it");
            var wordBytes = line[..sep];
            string word;
            try { word = StrictUtf8.GetString(wordBytes); }
            catch (DecoderFallbackException) { throw Error(name, lineNo, 1, "the word is not valid UTF-8"); }
            // Parse the numbers.
            int n = 0;
            int pos = sep;
            if (dims < 0)
            {
                dims = CountTokens(line[sep..]);
                row = new float[dims];
            }
            while (true)
            {
                while (pos < line.Length && (line[pos] == ' ' || line[pos] == '\t')) pos++;
                if (pos >= line.Length) break;
                int start = pos;
                while (pos < line.Length && line[pos] != ' ' && line[pos] != '\t') pos++;
                var token = line[start..pos];
                if (n >= dims) throw Error(name, lineNo, start + 1, $"more than {dims} numbers (the {(headerCount >= 0 ? "header" : "first row")} says {dims})");
                if (!float.TryParse(token, NumberStyles.Float, CultureInfo.InvariantCulture, out float v))
                    throw IsNonFiniteWord(token) ? Error(name, lineNo, start + 1, $"'{Printable(token)}' is not a finite number") : Error(name, lineNo, start + 1, $"'{Printable(token)}' is not a number");
                if (!float.IsFinite(v)) throw Error(name, lineNo, start + 1, $"'{Printable(token)}' is not a finite number");
                row[n++] = v;
            }
            if (n < dims) throw Error(name, lineNo, line.Length + 1, $"{n} numbers where {dims} were expected (the {(headerCount >= 0 ? "header" : "first row")} says {dims})");
            bool allZero = true;
            for (int i = 0; i < dims; i++) if (row[i] != 0) { allZero = false; break; }
            if (allZero)
            {
                zero++;
                if (messages.Count < MaxNotes) messages.Add($"{name}:{lineNo}: '{word}' has a zero vector; skipped");
                continue;
            }
            if (!seen.Add(word))
            {
                dup++;
                if (messages.Count < MaxNotes) messages.Add($"{name}:{lineNo}: '{word}' appears again; the first row is kept");
                continue;
            }
            long need = (count + 1) * dims;
            if (need > values.Length)
            {
                long grown = Math.Max(need, (long)values.Length * 2);
                if (grown > Array.MaxLength) grown = Math.Max(need, Array.MaxLength);
                if (need > Array.MaxLength) throw Error(name, lineNo, 1, "more numbers than one array can hold");
                Array.Resize(ref values, (int)grown);
            }
            row.AsSpan(0, dims).CopyTo(values.AsSpan((int)(count * dims), dims));
            words.Add(word);
            count++;
        }
        if (count == 0 && zero == 0 && dup == 0)
            throw new UserFacingException(headerCount >= 0 ? $"{name}: the header promises {headerCount} words but no vectors follow" : $"{name}: the file holds no vectors (empty file?)");
        if (headerCount >= 0 && headerCount != count + zero + dup)
            throw new UserFacingException($"{name}: the header says {headerCount} words but the file holds {count + zero + dup}");
        if (count == 0) throw new UserFacingException($"{name}: every vector is zero");
        if (values.Length != count * dims) Array.Resize(ref values, (int)(count * dims));
        return (new WordVectors(words.ToArray(), values, dims), new ReadNotes(zero, dup, messages));
    }

    private static bool TryParseHeader(ReadOnlySpan<byte> line, out long count, out int dims)
    {
        count = 0; dims = 0;
        int sep = line.IndexOfAny((byte)' ', (byte)'\t');
        if (sep <= 0) return false;
        var rest = line[(sep + 1)..].Trim((byte)' ');
        if (rest.IndexOfAny((byte)' ', (byte)'\t') >= 0) return false;
        return long.TryParse(line[..sep], NumberStyles.None, CultureInfo.InvariantCulture, out count)
            && int.TryParse(rest, NumberStyles.None, CultureInfo.InvariantCulture, out dims) && dims > 0 && count >= 0;
    }

    private static int CountTokens(ReadOnlySpan<byte> s)
    {
        int n = 0, i = 0;
        while (i < s.Length)
        {
            while (i < s.Length && (s[i] == ' ' || s[i] == '\t')) i++;
            if (i >= s.Length) break;
            n++;
            while (i < s.Length && s[i] != ' ' && s[i] != '\t') i++;
        }
        return n;
    }

    /// <summary>Spellings of infinity and NaN that other tools write (numpy, C printf) but .NET does not parse.</summary>
    private static bool IsNonFiniteWord(ReadOnlySpan<byte> token)
    {
        var t = token.TrimStart("+-"u8);
        return t.Length is 3 or 8 && (Ascii.EqualsIgnoreCase(t, "inf"u8) || Ascii.EqualsIgnoreCase(t, "nan"u8) || Ascii.EqualsIgnoreCase(t, "infinity"u8));
    }

    private static ReadOnlySpan<byte> TrimEnd(ReadOnlySpan<byte> s)
    {
        int end = s.Length;
        while (end > 0 && (s[end - 1] == (byte)'\r' || s[end - 1] == (byte)' ' || s[end - 1] == (byte)'\t')) end--;
        return s[..end];
    }

    private static string Printable(ReadOnlySpan<byte> token)
    {
        var s = Encoding.UTF8.GetString(token.Length > 40 ? token[..40] : token);
        return token.Length > 40 ? s + "…" : s;
    }

    private static UserFacingException Error(string name, long line, int column, string problem) =>
        new($"{name}:{line}:{column}: {problem}");

    private static (WordVectors, ReadNotes) ReadNpyWithWords(string path, string wordsPath)
    {
        var (data, rows, cols) = NpyFile.ReadFloat32Matrix(path);
        if (!File.Exists(wordsPath)) throw new UserFacingException($"{wordsPath}: no such words file");
        var words = new List<string>(rows);
        int lineNo = 0;
        using (var reader = new StreamReader(wordsPath, StrictUtf8))
        {
            string? line;
            try
            {
                while ((line = reader.ReadLine()) is not null)
                {
                    lineNo++;
                    line = line.TrimEnd('\r', ' ', '\t');
                    if (lineNo == 1) line = line.TrimStart('\uFEFF');
                    if (line.Length == 0) throw new UserFacingException($"{wordsPath}:{lineNo}: empty word");
                    words.Add(line);
                }
            }
            catch (DecoderFallbackException) { throw new UserFacingException($"{wordsPath}:{lineNo + 1}: not valid UTF-8"); }
        }
        if (words.Count != rows) throw new UserFacingException($"{wordsPath}: {words.Count} words, but {path} has {rows} rows");
        for (int i = 0; i < data.Length; i++)
            if (!float.IsFinite(data[i])) throw new UserFacingException($"{path}: row {i / cols + 1}, column {i % cols + 1} is not a finite number");
        // Drop zero rows and repeated words, as the text reader does.
        var keep = new List<int>(rows);
        var seen = new HashSet<string>(StringComparer.Ordinal);
        var messages = new List<string>();
        int zero = 0, dup = 0;
        for (int r = 0; r < rows; r++)
        {
            var row = data.AsSpan(r * cols, cols);
            if (!row.ContainsAnyExcept(0f)) { zero++; if (messages.Count < MaxNotes) messages.Add($"{wordsPath}:{r + 1}: '{words[r]}' has a zero vector; skipped"); continue; }
            if (!seen.Add(words[r])) { dup++; if (messages.Count < MaxNotes) messages.Add($"{wordsPath}:{r + 1}: '{words[r]}' appears again; the first row is kept"); continue; }
            keep.Add(r);
        }
        if (keep.Count == 0) throw new UserFacingException($"{path}: every vector is zero");
        if (keep.Count == rows) return (new WordVectors(words.ToArray(), data, cols), new ReadNotes(0, 0, messages));
        var values = new float[keep.Count * cols];
        for (int i = 0; i < keep.Count; i++) data.AsSpan(keep[i] * cols, cols).CopyTo(values.AsSpan(i * cols));
        return (new WordVectors(keep.Select(i => words[i]).ToArray(), values, cols), new ReadNotes(zero, dup, messages));
    }

    /// <summary>Yields lines as byte spans from a stream without allocating per line.</summary>
    private sealed class LineReader(Stream stream)
    {
        private byte[] _buffer = new byte[1 << 20];
        private int _start, _end;
        private bool _eof;

        public bool TryReadLine(out ReadOnlySpan<byte> line)
        {
            while (true)
            {
                int nl = _buffer.AsSpan(_start, _end - _start).IndexOf((byte)'\n');
                if (nl >= 0)
                {
                    line = _buffer.AsSpan(_start, nl);
                    _start += nl + 1;
                    return true;
                }
                if (_eof)
                {
                    if (_start < _end) { line = _buffer.AsSpan(_start, _end - _start); _start = _end; return true; }
                    line = default;
                    return false;
                }
                // Move the partial line to the front, grow when one line fills the buffer, then read more.
                if (_start > 0) { Buffer.BlockCopy(_buffer, _start, _buffer, 0, _end - _start); _end -= _start; _start = 0; }
                if (_end == _buffer.Length) Array.Resize(ref _buffer, _buffer.Length * 2);
                int read = stream.Read(_buffer, _end, _buffer.Length - _end);
                if (read == 0) _eof = true; else _end += read;
            }
        }
    }
}
