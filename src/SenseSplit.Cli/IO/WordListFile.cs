using System.Globalization;
using System.Text;
using System.Text.Unicode;

namespace SenseSplit.Cli.IO;

/// <summary>A words file: UTF-8, one word per line, in the order of the rows it names. A final newline is optional;
/// an empty line is an error (it would silently shift every later word by one row).</summary>
public static class WordListFile
{
    public static string[] Read(string path, CancellationToken cancellation = default)
    {
        byte[] bytes;
        try { bytes = File.ReadAllBytes(path); }
        catch (FileNotFoundException) { throw new UserFacingException($"{path}: file not found"); }
        catch (DirectoryNotFoundException) { throw new UserFacingException($"{path}: file not found (no such folder)"); }
        catch (UnauthorizedAccessException) { throw new UserFacingException($"{path}: permission denied"); }
        catch (IOException e) { throw new UserFacingException($"{path}: cannot be read ({e.Message})"); }
        return Parse(bytes, path, cancellation);
    }

    internal static string[] Parse(ReadOnlySpan<byte> text, string path, CancellationToken cancellation = default)
    {
        if (text.StartsWith("\uFEFF"u8)) text = text[3..];
        var words = new List<string>();
        long line = 0;
        while (text.Length > 0)
        {
            line++;
            if ((line & 8191) == 0) cancellation.ThrowIfCancellationRequested();
            int nl = text.IndexOf((byte)'\n');
            var row = nl >= 0 ? text[..nl] : text;
            text = nl >= 0 ? text[(nl + 1)..] : [];
            if (row.Length > 0 && row[^1] == (byte)'\r') row = row[..^1];
            if (row.Length == 0)
                throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}: empty line (one word per line, no blank lines)");
            if (!Utf8.IsValid(row))
                throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}: the word '{Printable.Token(row)}' is not valid UTF-8");
            words.Add(Encoding.UTF8.GetString(row));
        }
        if (words.Count == 0) throw new UserFacingException($"{path}: contains no words (the file is empty)");
        return [.. words];
    }

    /// <summary>Writes one word per line (UTF-8, "\n", no byte-order mark) to an open stream.</summary>
    public static void Write(Stream stream, IReadOnlyList<string> words)
    {
        using var writer = new StreamWriter(stream, new UTF8Encoding(false), 1 << 16, leaveOpen: true) { NewLine = "\n" };
        foreach (var w in words)
        {
            if (w.Length == 0 || w.Contains('\n') || w.Contains('\r'))
                throw new ArgumentException($"word '{Printable.Word(w)}' cannot be written one per line (empty or contains a line break)");
            writer.Write(w);
            writer.Write('\n');
        }
    }
}
