using System.Globalization;
using System.Text;
using CsvHelper;
using CsvHelper.Configuration;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Cli.IO;

/// <summary>One row of a pairs file: the two words, the counts and pseudo-word if the file gives them, and the line.</summary>
public sealed record MergePairsRow(int Line, string First, string Second, long? FirstCount, long? SecondCount, string? Pseudo);

/// <summary>
/// The pairs file of the merge test (<c>pairs.csv</c>): CSV (CsvHelper, invariant culture) with a header row. Columns
/// <c>w1</c> and <c>w2</c> are required; <c>f1</c>, <c>f2</c> and <c>pseudo</c> are read when present; any other
/// column (<c>r</c>, or the fit columns of a results file) is ignored, so the results <c>pairs.csv</c> of a run can be
/// read back as input. <c>merge-test prepare</c> writes <c>w1, w2, f1, f2, r, pseudo</c>.
/// </summary>
public static class MergePairsFile
{
    public static readonly string[] Columns = ["w1", "w2", "f1", "f2", "r", "pseudo"];

    public static List<MergePairsRow> Read(string path)
    {
        if (Directory.Exists(path)) throw new UserFacingException($"{path}: is a folder, not a pairs file");
        string text;
        try { text = File.ReadAllText(path, new UTF8Encoding(false, true)); }
        catch (FileNotFoundException) { throw new UserFacingException($"{path}: pairs file not found"); }
        catch (DirectoryNotFoundException) { throw new UserFacingException($"{path}: pairs file not found (no such folder)"); }
        catch (DecoderFallbackException) { throw new UserFacingException($"{path}: not valid UTF-8"); }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException) { throw new UserFacingException($"{path}: cannot be read ({e.Message})"); }
        if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
        if (string.IsNullOrWhiteSpace(text)) throw new UserFacingException($"{path}: is empty (expected a CSV header 'w1,w2' and one pair per line)");

        var config = new CsvConfiguration(CultureInfo.InvariantCulture) { TrimOptions = TrimOptions.Trim, BadDataFound = null, IgnoreBlankLines = true };
        using var csv = new CsvReader(new StringReader(text), config);
        var rows = new List<MergePairsRow>();
        try
        {
            csv.Read();
            csv.ReadHeader();
            var header = csv.HeaderRecord ?? [];
            int Col(string name) => Array.FindIndex(header, h => h.Trim().Equals(name, StringComparison.OrdinalIgnoreCase));
            int c1 = Col("w1"), c2 = Col("w2"), cf1 = Col("f1"), cf2 = Col("f2"), cp = Col("pseudo");
            if (c1 < 0 || c2 < 0)
                throw new UserFacingException($"{path}: line 1: the header must name the columns 'w1' and 'w2' (found: {Printable.Word(string.Join(",", header), 80)})");
            int needed = Math.Max(c1, c2);
            while (csv.Read())
            {
                int line = StartLine(csv.Parser.RawRow, csv.Parser.RawRecord);
                if (csv.Parser.Count == 1 && string.IsNullOrWhiteSpace(csv.Parser[0])) continue;
                if (csv.Parser.Count <= needed)
                    throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}: has {csv.Parser.Count.ToString(CultureInfo.InvariantCulture)} fields, expected at least {(needed + 1).ToString(CultureInfo.InvariantCulture)}");
                string w1 = csv.GetField(c1) ?? "", w2 = csv.GetField(c2) ?? "";
                if (w1.Length == 0 || w2.Length == 0)
                    throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}, column {(w1.Length == 0 ? c1 + 1 : c2 + 1).ToString(CultureInfo.InvariantCulture)}: the word is empty");
                // No token of a corpus or a vector file holds white space; a quoted field with a line break in it is
                // most often a quote left open.
                foreach (var (w, col) in new[] { (w1, c1), (w2, c2) })
                    if (w.Any(char.IsWhiteSpace))
                        throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}, column {(col + 1).ToString(CultureInfo.InvariantCulture)}: '{Printable.Word(w)}' contains white space{(w.Contains('\n') ? " or a line break (a quote left open?)" : "")}; a word is a single token");
                long? Count(int col)
                {
                    if (col < 0 || col >= csv.Parser.Count) return null;
                    string f = csv.GetField(col) ?? "";
                    if (f.Length == 0) return null;
                    if (!long.TryParse(f, NumberStyles.None, CultureInfo.InvariantCulture, out long v))
                        throw new UserFacingException($"{path}: line {line.ToString(CultureInfo.InvariantCulture)}, column {(col + 1).ToString(CultureInfo.InvariantCulture)}: '{Printable.Word(f)}' is not a count (a non-negative whole number)");
                    return v;
                }
                string? pseudo = cp >= 0 && cp < csv.Parser.Count ? csv.GetField(cp) : null;
                rows.Add(new MergePairsRow(line, w1, w2, Count(cf1), Count(cf2), string.IsNullOrEmpty(pseudo) ? null : pseudo));
            }
        }
        catch (CsvHelperException e)
        {
            throw new UserFacingException($"{path}: line {(e.Context?.Parser?.RawRow ?? 0).ToString(CultureInfo.InvariantCulture)}: malformed CSV ({e.GetType().Name})");
        }
        if (rows.Count == 0) throw new UserFacingException($"{path}: has a header but no pairs");
        return rows;
    }

    /// <summary>
    /// The line a record starts on. CsvHelper's raw row is the line the record ends on, and a quoted field may hold
    /// line breaks: subtract the breaks inside the record, not counting the one that ends it (present when the quotes
    /// balance; an unclosed quote runs to the end of the file and swallows the last break).
    /// </summary>
    internal static int StartLine(int endLine, string rawRecord)
    {
        int breaks = rawRecord.Count(ch => ch == '\n');
        if (rawRecord.EndsWith('\n') && rawRecord.Count(ch => ch == '"') % 2 == 0) breaks--;
        return endLine - Math.Max(0, breaks);
    }

    /// <summary>Writes <c>w1, w2, f1, f2, r, pseudo</c> (r in round-trip form), atomically.</summary>
    public static void Write(string path, IReadOnlyList<MergePair> pairs, IReadOnlyList<string> pseudoWords)
    {
        ArgumentNullException.ThrowIfNull(pairs);
        ArgumentNullException.ThrowIfNull(pseudoWords);
        if (pairs.Count != pseudoWords.Count) throw new ArgumentException($"{pairs.Count} pairs but {pseudoWords.Count} pseudo-words");
        AtomicFile.Write(path, stream =>
        {
            using var writer = new StreamWriter(stream, new UTF8Encoding(false), 1 << 16, leaveOpen: true) { NewLine = "\n" };
            using var csv = new CsvWriter(writer, new CsvConfiguration(CultureInfo.InvariantCulture) { NewLine = "\n" });
            foreach (var c in Columns) csv.WriteField(c);
            csv.NextRecord();
            for (int i = 0; i < pairs.Count; i++)
            {
                var p = pairs[i];
                csv.WriteField(p.FrequentWord);
                csv.WriteField(p.RareWord);
                csv.WriteField(p.FrequentCount.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(p.RareCount.ToString(CultureInfo.InvariantCulture));
                csv.WriteField(p.Ratio.ToString("R", CultureInfo.InvariantCulture));
                csv.WriteField(pseudoWords[i]);
                csv.NextRecord();
            }
        });
    }
}
