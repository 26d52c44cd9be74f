using System.Globalization;
using CsvHelper;
using CsvHelper.Configuration;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.IO;

/// <summary>One glossary term with the line it came from and all of its row's fields (carried through untouched).</summary>
public sealed record GlossaryEntry(TermQuery Query, int Line, string[] Fields);

/// <summary>A glossary: its columns (a plain list has the single column <c>term</c>), the index of the term column,
/// the delimiter detected (null for a plain list) and the distinct terms in file order.</summary>
public sealed record Glossary(string Source, string[] Columns, int TermColumn, char? Delimiter, IReadOnlyList<GlossaryEntry> Entries)
{
    /// <summary>A glossary built from terms given directly (the <c>senses</c> command, tests).</summary>
    public static Glossary FromTerms(IEnumerable<string> terms, Tokenizer? tokenizer = null)
        => new("(terms)", ["term"], 0, null, terms.Select((t, i) => new GlossaryEntry(TermQuery.From(t, tokenizer), i + 1, [t])).ToArray());
}

/// <summary>
/// Reads a glossary: a CSV file with a <c>term</c> column (delimiter <c>,</c> <c>;</c> or tab, detected from the header
/// line: the one of the three that occurs most often outside quotes) or a plain list, one term per line (a first line
/// without any of the three delimiters that is not the header <c>term</c>). A UTF-8 byte-order mark and CRLF line ends
/// are accepted. Blank lines are skipped; a duplicate term (same tokens) is reported and the first kept.
/// </summary>
public static class GlossaryReader
{
    public static Glossary Read(string path, Action<string> warn, Tokenizer? tokenizer = null)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: glossary file not found");
        string text;
        try { text = File.ReadAllText(path); }
        catch (IOException ex) { throw new UserFacingException($"{path}: cannot read the glossary ({ex.Message})"); }
        return Parse(text, path, warn, tokenizer);
    }

    public static Glossary Parse(string text, string source, Action<string> warn, Tokenizer? tokenizer = null)
    {
        ArgumentNullException.ThrowIfNull(text);
        if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
        if (string.IsNullOrWhiteSpace(text)) throw new UserFacingException($"{source}: the glossary is empty (expected a CSV file with a 'term' column, or one term per line)");
        int firstLineNo = 1, pos = 0;
        while (true)
        {
            int end = text.IndexOf('\n', pos);
            string line = (end < 0 ? text[pos..] : text[pos..end]).TrimEnd('\r');
            if (line.Trim().Length > 0 || end < 0) break;
            pos = end + 1;
            firstLineNo++;
        }
        int eol = text.IndexOf('\n', pos);
        string header = (eol < 0 ? text[pos..] : text[pos..eol]).TrimEnd('\r');
        char? delimiter = DetectDelimiter(header);
        if (delimiter is null && !string.Equals(header.Trim(), "term", StringComparison.OrdinalIgnoreCase))
            return PlainList(text, source, warn, tokenizer);
        return Csv(text, source, delimiter ?? ',', warn, tokenizer);
    }

    /// <summary>The delimiter among , ; tab that occurs most often outside double quotes (ties: , then ; then tab), or null.</summary>
    internal static char? DetectDelimiter(string header)
    {
        int comma = 0, semi = 0, tab = 0;
        bool quoted = false;
        foreach (char c in header)
        {
            if (c == '"') quoted = !quoted;
            else if (!quoted) { if (c == ',') comma++; else if (c == ';') semi++; else if (c == '\t') tab++; }
        }
        if (comma == 0 && semi == 0 && tab == 0) return null;
        if (comma >= semi && comma >= tab) return ',';
        return semi >= tab ? ';' : '\t';
    }

    private static Glossary PlainList(string text, string source, Action<string> warn, Tokenizer? tokenizer)
    {
        var entries = new List<GlossaryEntry>();
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        using var reader = new StringReader(text);
        int lineNo = 0;
        for (string? line = reader.ReadLine(); line is not null; line = reader.ReadLine())
        {
            lineNo++;
            var term = line.Trim();
            if (term.Length == 0) continue;
            Add(entries, seen, new GlossaryEntry(TermQuery.From(term, tokenizer), lineNo, [term]), source, warn);
        }
        if (entries.Count == 0) throw new UserFacingException($"{source}: the glossary has no terms");
        return new Glossary(source, ["term"], 0, null, entries);
    }

    private static Glossary Csv(string text, string source, char delimiter, Action<string> warn, Tokenizer? tokenizer)
    {
        var config = new CsvConfiguration(CultureInfo.InvariantCulture)
        {
            Delimiter = delimiter.ToString(),
            HasHeaderRecord = true,
            IgnoreBlankLines = true,
            BadDataFound = args => throw new UserFacingException(
                $"{source}:{args.Context.Parser?.RawRow}: malformed CSV field {Show(args.Field)} (a quote inside an unquoted field, or an unclosed quote)"),
        };
        using var reader = new StringReader(text);
        using var parser = new CsvParser(reader, config);
        if (!parser.Read()) throw new UserFacingException($"{source}: the glossary is empty");
        var columns = parser.Record!.Select(c => c.Trim()).ToArray();
        int headerLine = parser.RawRow;
        int termColumn = Array.FindIndex(columns, c => string.Equals(c, "term", StringComparison.OrdinalIgnoreCase));
        string name = delimiter == '\t' ? "tab" : $"'{delimiter}'";
        if (termColumn < 0)
            throw new UserFacingException($"{source}:{headerLine}: the header has no 'term' column (columns found with delimiter {name}: {string.Join(", ", columns.Select(Show))}); " +
                "name the column of terms 'term', or give a plain list with one term per line");
        var dupColumn = columns.GroupBy(c => c, StringComparer.OrdinalIgnoreCase).FirstOrDefault(g => g.Count() > 1);
        if (dupColumn is not null) warn($"{source}:{headerLine}: column {Show(dupColumn.Key)} appears {dupColumn.Count()} times");
        var entries = new List<GlossaryEntry>();
        var seen = new Dictionary<string, int>(StringComparer.Ordinal);
        while (parser.Read())
        {
            var record = parser.Record!;
            int line = parser.RawRow;
            if (record.Length == 1 && record[0].Trim().Length == 0) continue;
            if (record.Length != columns.Length)
                throw new UserFacingException($"{source}:{line}: {record.Length} field(s) where the header has {columns.Length} (delimiter {name}, detected from the header on line {headerLine}); " +
                    "check the delimiter, or quote fields that contain it");
            var term = record[termColumn].Trim();
            if (term.Length == 0) { warn($"{source}:{line}, column {termColumn + 1}: empty term, row skipped"); continue; }
            Add(entries, seen, new GlossaryEntry(TermQuery.From(term, tokenizer), line, record), source, warn);
        }
        if (entries.Count == 0) throw new UserFacingException($"{source}: the glossary has a header but no terms");
        return new Glossary(source, columns, termColumn, delimiter, entries);
    }

    private static void Add(List<GlossaryEntry> entries, Dictionary<string, int> seen, GlossaryEntry entry, string source, Action<string> warn)
    {
        if (seen.TryGetValue(entry.Query.Key, out int first))
        {
            warn($"{source}:{entry.Line}: duplicate term {Show(entry.Query.Term)} (first on line {first}); keeping the first");
            return;
        }
        seen[entry.Query.Key] = entry.Line;
        entries.Add(entry);
    }

    private static string Show(string s) => "'" + (s.Length > 60 ? s[..60] + "…" : s) + "'";
}
