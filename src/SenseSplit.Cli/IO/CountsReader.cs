using System.Globalization;
using System.Text;
using CsvHelper;
using CsvHelper.Configuration;

namespace SenseSplit.Cli.IO;

/// <summary>Reads a word-frequency table: "word count" per line (tab or space separated), or CSV with a header word,count.</summary>
public static class CountsReader
{
    public static List<(string word, long count)> Read(string path)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: no such counts file");
        string first = File.ReadLines(path).FirstOrDefault() ?? "";
        first = first.TrimStart('\uFEFF');
        if (first.StartsWith("word,", StringComparison.OrdinalIgnoreCase)) return ReadCsv(path);
        var result = new List<(string, long)>();
        int lineNo = 0;
        foreach (var raw in File.ReadLines(path, Encoding.UTF8))
        {
            lineNo++;
            var line = (lineNo == 1 ? raw.TrimStart('\uFEFF') : raw).TrimEnd('\r');
            if (line.Length == 0) continue;
            int sep = line.LastIndexOfAny(['\t', ' ']);
            if (sep <= 0) throw new UserFacingException($"{path}:{lineNo}: expected 'word count', found '{Trim(line)}'");
            var countText = line[(sep + 1)..];
            if (!long.TryParse(countText, NumberStyles.None, CultureInfo.InvariantCulture, out long count))
            {
                if (lineNo == 1) continue; // a header line such as "word<TAB>count"
                throw new UserFacingException($"{path}:{lineNo}:{sep + 2}: '{Trim(countText)}' is not a whole non-negative count");
            }
            result.Add((line[..sep].TrimEnd('\t', ' '), count));
        }
        return result;
    }

    private static List<(string, long)> ReadCsv(string path)
    {
        var result = new List<(string, long)>();
        using var reader = new StreamReader(path, Encoding.UTF8);
        using var csv = new CsvReader(reader, new CsvConfiguration(CultureInfo.InvariantCulture) { TrimOptions = TrimOptions.Trim });
        csv.Read();
        csv.ReadHeader();
        while (csv.Read())
        {
            string word = csv.GetField("word") ?? "";
            string countText = csv.GetField("count") ?? "";
            if (!long.TryParse(countText, NumberStyles.None, CultureInfo.InvariantCulture, out long count))
                throw new UserFacingException($"{path}:{csv.Parser.RawRow}: '{Trim(countText)}' is not a whole non-negative count");
            result.Add((word, count));
        }
        return result;
    }

    private static string Trim(string s) => s.Length > 40 ? s[..40] + "…" : s;
}
