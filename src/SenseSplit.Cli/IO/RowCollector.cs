using System.Globalization;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Shared row policy of every vector reader: rows are appended in place into one growing row-major array;
/// an all-zero row is skipped (it has no direction to code), a repeated word keeps its first row.
/// Both are reported once, as warnings, with a count and the first example.
/// </summary>
internal sealed class RowCollector
{
    private readonly string _path;
    private readonly string _unit; // "line" (text files) or "row" (arrays)
    private readonly Dictionary<string, long> _seen = new(StringComparer.Ordinal);
    private float[] _values;
    private long _rowsSeen;
    private int _zeroRows;
    private string? _firstZero;
    private int _duplicates;
    private string? _firstDuplicate;

    public RowCollector(string path, string unit, int dimensions, long expectedRows)
    {
        _path = path;
        _unit = unit;
        Dimensions = dimensions;
        _values = new float[CapacityFor(Math.Max(1, expectedRows))];
    }

    public int Dimensions { get; }
    public List<string> Words { get; } = [];
    public int Count => Words.Count;
    public long RowsSeen => _rowsSeen;
    public int ZeroRows => _zeroRows;
    public int Duplicates => _duplicates;

    /// <summary>The slot the next row is parsed into; grows the array geometrically (×1.5) when full.</summary>
    public Span<float> NextRow()
    {
        long needed = (long)(Words.Count + 1) * Dimensions;
        if (needed > _values.Length)
        {
            long grown = Math.Max(needed, (long)_values.Length + _values.Length / 2);
            var bigger = new float[CapacityFor(grown / Dimensions + 1)];
            Array.Copy(_values, bigger, (long)Words.Count * Dimensions);
            _values = bigger;
        }
        return _values.AsSpan(Words.Count * Dimensions, Dimensions);
    }

    /// <summary>Keeps the row just written into <see cref="NextRow"/> unless it is all zero or its word was seen.</summary>
    public bool Commit(string word, long location)
    {
        _rowsSeen++;
        var row = _values.AsSpan(Words.Count * Dimensions, Dimensions);
        bool zero = true;
        foreach (float v in row) if (v != 0) { zero = false; break; }
        if (zero)
        {
            if (_zeroRows++ == 0) _firstZero = Describe(word, location);
            return false;
        }
        if (!_seen.TryAdd(word, location))
        {
            if (_duplicates++ == 0) _firstDuplicate = $"{Describe(word, location)}, first seen on {_unit} {_seen[word].ToString(CultureInfo.InvariantCulture)}";
            return false;
        }
        Words.Add(word);
        return true;
    }

    /// <summary>Emits the skip warnings (if any) and returns the values trimmed to exactly Count×Dimensions.</summary>
    public float[] Finish(Action<string>? warn)
    {
        if (_zeroRows > 0)
            warn?.Invoke($"{_path}: skipped {Plural(_zeroRows, "zero vector")} (first: {_firstZero})");
        if (_duplicates > 0)
            warn?.Invoke($"{_path}: skipped {Plural(_duplicates, "repeated word")}, keeping each word's first vector (first: {_firstDuplicate})");
        long used = (long)Words.Count * Dimensions;
        if (used != _values.Length) Array.Resize(ref _values, (int)used);
        return _values;
    }

    private string Describe(string word, long location)
        => $"'{Printable.Word(word)}' on {_unit} {location.ToString(CultureInfo.InvariantCulture)}";

    private static string Plural(int n, string noun) => $"{n.ToString(CultureInfo.InvariantCulture)} {noun}{(n == 1 ? "" : "s")}";

    private int CapacityFor(long rows)
    {
        long floats = rows * Dimensions;
        if (floats > Array.MaxLength)
        {
            long fitting = Array.MaxLength / Dimensions;
            if ((long)(Words.Count + 1) * Dimensions > Array.MaxLength)
                throw new UserFacingException($"{_path}: more than {fitting.ToString(CultureInfo.InvariantCulture)} rows of {Dimensions.ToString(CultureInfo.InvariantCulture)} dimensions do not fit in one array");
            floats = fitting * Dimensions;
        }
        return (int)floats;
    }
}

/// <summary>Makes user-supplied text safe to quote in one line of a message.</summary>
internal static class Printable
{
    public static string Word(string word, int max = 40)
    {
        var s = word.Length > max ? word[..max] + "..." : word;
        return s.Replace("\t", "\\t").Replace("\r", "\\r").Replace("\n", "\\n");
    }

    /// <summary>A token from a byte buffer: decoded leniently (invalid bytes become U+FFFD), shortened.</summary>
    public static string Token(ReadOnlySpan<byte> utf8, int max = 40)
        => Word(System.Text.Encoding.UTF8.GetString(utf8.Length > 4 * max ? utf8[..(4 * max)] : utf8), max);
}
