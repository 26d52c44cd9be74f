using System.IO.Compression;
using System.Text;
using System.Text.RegularExpressions;

namespace SenseSplit.Tests.RealText;

/// <summary>
/// Open English text and lexical data from Debian packages, installed by scripts/install-test-deps.sh:
/// GCIDE 0.48 (GNU Collaborative International Dictionary of English, from Webster's Revised Unabridged Dictionary
/// 1913; dict-gcide), FOLDOC (Free On-line Dictionary of Computing; dict-foldoc) and Princeton WordNet 3.0
/// (wordnet-base). Tests fail loudly (not skip) when they are missing.
/// </summary>
public static partial class OpenCorpora
{
    public const string Gcide = "/usr/share/dictd/gcide.dict.dz";
    public const string Foldoc = "/usr/share/dictd/foldoc.dict.dz";
    public const string WordNet = "/usr/share/wordnet";
    public const string Install = "sudo apt-get install dict-gcide dict-foldoc wordnet-base (or: bash scripts/install-test-deps.sh)";

    public static void RequireGcide() => Assert.True(File.Exists(Gcide), $"{Gcide} is missing: {Install}");
    public static void RequireFoldoc() => Assert.True(File.Exists(Foldoc), $"{Foldoc} is missing: {Install}");
    public static void RequireWordNet() => Assert.True(File.Exists(Path.Combine(WordNet, "index.noun")), $"{WordNet}/index.noun is missing: {Install}");

    /// <summary>GCIDE text: pronunciations (\...\), bracketed notes ([...]) and braces removed; "Syn:" blocks dropped
    /// unless <paramref name="keepSynonymBlocks"/> (they list synonyms, partly from WordNet, and would make WordNet
    /// checks circular).</summary>
    public static IEnumerable<string> GcideLines(bool keepSynonymBlocks = false) => DictLines(Gcide, gcide: true, keepSynonymBlocks);

    /// <summary>FOLDOC text as served by dictd: one line per line, headwords and cross-references as plain words.</summary>
    public static IEnumerable<string> FoldocLines() => DictLines(Foldoc, gcide: false, keepSynonymBlocks: true);

    private static IEnumerable<string> DictLines(string path, bool gcide, bool keepSynonymBlocks)
    {
        using var f = File.OpenRead(path);
        using var gz = new GZipStream(f, CompressionMode.Decompress);
        using var r = new StreamReader(gz, Encoding.UTF8);
        string? line;
        bool inSyn = false;
        while ((line = r.ReadLine()) is not null)
        {
            var t = line.Trim();
            if (gcide)
            {
                if (!keepSynonymBlocks)
                {
                    if (t.StartsWith("Syn:", StringComparison.Ordinal)) { inSyn = true; continue; }
                    if (inSyn && line.StartsWith("     ", StringComparison.Ordinal) && t.Length > 0) continue;
                    inSyn = false;
                }
                t = Note().Replace(Pronunciation().Replace(t, ""), "");
            }
            yield return t.Replace("{", "").Replace("}", "");
        }
    }

    /// <summary>WordNet 3.0 sense counts per one-word lemma (sum of synset_cnt over the four index files).</summary>
    public static Dictionary<string, int> WordNetSenseCounts()
        => Core.Senses.WordNetComparison.ParseIndexLines(
            new[] { "noun", "verb", "adj", "adv" }.SelectMany(pos => File.ReadLines(Path.Combine(WordNet, "index." + pos))));

    [GeneratedRegex(@"\\[^\\]*\\")]
    private static partial Regex Pronunciation();

    [GeneratedRegex(@"\[[^\]]*\]")]
    private static partial Regex Note();
}
