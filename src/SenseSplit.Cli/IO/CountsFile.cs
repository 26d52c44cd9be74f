using System.Globalization;
using System.Text;
using System.Text.Unicode;
using CsvHelper;
using CsvHelper.Configuration;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Word counts: either lines of "word&lt;TAB or spaces&gt;count" (the count is the last field, so a word may contain
/// spaces), or CSV with a header row naming the columns <c>word</c> and <c>count</c> (read with CsvHelper; chosen when
/// the name ends in .csv or the first line is such a header). Counts are non-negative integers.
/// </summary>
public static class CountsFile
{
    public static Dictionary<string, long> Read(string path, Action<string>? warn = null)
    {
        byte[] bytes;
        try { bytes = File.ReadAllBytes(path); }
        catch (FileNotFoundException) { throw new UserFacingException($"{path}: file not found"); }
        catch (DirectoryNotFoundException) { throw new UserFacingException($"{path}: file not found (no such folder)"); }
        catch (UnauthorizedAccessException) { throw new UserFacingException($"{path}: permission denied"); }
        catch (IOException e) { throw new UserFacingException($"{path}: cannot be read ({e.Message})"); }
        ReadOnlySpan<byte> text = bytes;
        if (text.StartsWith("\uFEFF"u8)) text = text[3..];
        if (!Utf8.IsValid(text))
        {
            int bad = FirstInvalidLine(text);
            throw new UserFacingException($"{path}: line {bad.ToString(CultureInfo.InvariantCulture)}: not valid UTF-8");
        }
        string content = Encoding.UTF8.GetString(text);
        var counts = LooksLikeCsv(path, content) ? ReadCsv(content, path, warn) : ReadPlain(content, path, warn);
        if (counts.Count == 0) throw new UserFacingException($"{path}: contains no counts");
        return counts;
    }

    /// <summary>Counts in the order of <paramref name="words"/>; a word missing from the counts gets 0 (one warning says how many).</summary>
    public static long[] Align(IReadOnlyList<string> words, IReadOnlyDictionary<string, long> counts, string path, Action<string>? warn)
    {
        var result = new long[words.Count];
        int missing = 0;
        string? first = null;
        for (int i = 0; i < words.Count; i++)
        {
            if (counts.TryGetValue(words[i], out long c)) result[i] = c;
            else if (missing++ == 0) first = words[i];
        }
        if (missing > 0)
            warn?.Invoke($"{path}: {missing.ToString(CultureInfo.InvariantCulture)} of {words.Count.ToString(CultureInfo.InvariantCulture)} words have no count and get 0 (first: '{Printable.Word(first!)}')");
        return result;
    }

    /// <summary>Writes "word TAB count" lines in the given order (UTF-8, "\n"), after a "word TAB count" header line when
    /// <paramref name="header"/> is set (<see cref="Read"/> skips it).</summary>
    public static void Write(Stream stream, IReadOnlyList<string> words, IReadOnlyList<long> counts, bool header = false)
    {
        if (words.Count != counts.Count) throw new ArgumentException($"words ({words.Count}) and counts ({counts.Count}) differ in length");
        using var writer = new StreamWriter(stream, new UTF8Encoding(false), 1 << 16, leaveOpen: true) { NewLine = "\n" };
        if (header) writer.Write("word\tcount\n");
        for (int i = 0; i < words.Count; i++)
        {
            writer.Write(words[i]);
            writer.Write('\t');
            writer.Write(counts[i].ToString(CultureInfo.InvariantCulture));
            writer.Write('\n');
        }
    }

    private static bool LooksLikeCsv(string path, string content)
    {
        if (path.EndsWith(".csv", StringComparison.OrdinalIgnoreCase)) return true;
        int nl = content.IndexOf('\n');
        var first = (nl >= 0 ? content.AsSpan(0, nl) : content.AsSpan()).Trim();
        return first.Equals("word,count", StringComparison.OrdinalIgnoreCase);
    }

    private static Dictionary<string, long> ReadPlain(string content, string path, Action<string>? warn)
    {
        var counts = new Dictionary<string, long>(StringComparer.Ordinal);
        var dup = new DuplicateNote(path);
        int line = 0;
        foreach (var raw in content.AsSpan().EnumerateLines())
        {
            line++;
            var row = raw.TrimEnd();
            if (row.IsWhiteSpace()) continue;
            int split = row.LastIndexOfAny(' ', '\t');
            if (split < 0)
                throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}: expected 'word<TAB>count', found '{Printable.Word(row.ToString())}'");
            var word = row[..split].TrimEnd(" \t");
            var count = row[(split + 1)..];
            // A header line "word<TAB>count" (as 'sensesplit embed' writes) is skipped.
            if (line == 1 && word.Equals("word", StringComparison.OrdinalIgnoreCase) && count.Equals("count", StringComparison.OrdinalIgnoreCase))
                continue;
            if (word.Length == 0)
                throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}: the word is missing before the count");
            long value = ParseCount(count, path, $"line {line.ToString(CultureInfo.InvariantCulture)}, column {(split + 2).ToString(CultureInfo.InvariantCulture)}");
            if (!counts.TryAdd(word.ToString(), value)) dup.Add(word.ToString(), line);
        }
        dup.Report(warn);
        return counts;
    }

    private static Dictionary<string, long> ReadCsv(string content, string path, Action<string>? warn)
    {
        var counts = new Dictionary<string, long>(StringComparer.Ordinal);
        var dup = new DuplicateNote(path);
        var config = new CsvConfiguration(CultureInfo.InvariantCulture)
        {
            PrepareHeaderForMatch = a => a.Header.Trim().ToLowerInvariant(),
            TrimOptions = TrimOptions.Trim,
            BadDataFound = null,
        };
        using var csv = new CsvReader(new StringReader(content), config);
        try
        {
            if (!csv.Read() || !csv.ReadHeader())
                throw new UserFacingException($"{path}: line 1: expected a CSV header 'word,count'");
            var header = csv.HeaderRecord ?? [];
            int wordCol = Array.FindIndex(header, h => h.Trim().Equals("word", StringComparison.OrdinalIgnoreCase));
            int countCol = Array.FindIndex(header, h => h.Trim().Equals("count", StringComparison.OrdinalIgnoreCase));
            if (wordCol < 0 || countCol < 0)
                throw new UserFacingException($"{path}: line 1: the CSV header must name the columns 'word' and 'count' (found: {string.Join(",", header)})");
            while (csv.Read())
            {
                int line = csv.Parser.RawRow;
                string where = $"line {line.ToString(CultureInfo.InvariantCulture)}";
                if (csv.Parser.Count == 1 && string.IsNullOrWhiteSpace(csv.Parser[0])) continue;
                if (csv.Parser.Count <= Math.Max(wordCol, countCol))
                    throw new UserFacingException($"{path}: {where}: has {csv.Parser.Count.ToString(CultureInfo.InvariantCulture)} fields, expected at least {(Math.Max(wordCol, countCol) + 1).ToString(CultureInfo.InvariantCulture)}");
                string word = csv.GetField(wordCol) ?? "";
                if (word.Length == 0) throw new UserFacingException($"{path}: {where}: the word is empty");
                long value = ParseCount(csv.GetField(countCol) ?? "", path, $"{where}, field {(countCol + 1).ToString(CultureInfo.InvariantCulture)}");
                if (!counts.TryAdd(word, value)) dup.Add(word, line);
            }
        }
        catch (CsvHelperException e) when (e is not null)
        {
            throw new UserFacingException($"{path}: line {(e.Context?.Parser?.RawRow ?? 0).ToString(CultureInfo.InvariantCulture)}: malformed CSV ({e.GetType().Name})");
        }
        dup.Report(warn);
        return counts;
    }

    private static long ParseCount(ReadOnlySpan<char> text, string path, string where)
    {
        if (!long.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out long value))
            throw new UserFacingException($"{path}: {where}: '{Printable.Word(text.ToString())}' is not a count (a non-negative whole number)");
        return value;
    }

    private static int FirstInvalidLine(ReadOnlySpan<byte> text)
    {
        int line = 1;
        while (true)
        {
            int nl = text.IndexOf((byte)'\n');
            var row = nl >= 0 ? text[..nl] : text;
            if (!Utf8.IsValid(row) || nl < 0) return line;
            text = text[(nl + 1)..];
            line++;
        }
    }

    private sealed class DuplicateNote(string path)
    {
        private int _count;
        private string? _first;

        public void Add(string word, int line)
        {
            if (_count++ == 0) _first = $"'{Printable.Word(word)}' on line {line.ToString(CultureInfo.InvariantCulture)}";
        }

        public void Report(Action<string>? warn)
        {
            if (_count > 0) warn?.Invoke($"{path}: {_count.ToString(CultureInfo.InvariantCulture)} repeated word{(_count == 1 ? "" : "s")}; keeping each word's first count (first: {_first})");
        }
    }
}
