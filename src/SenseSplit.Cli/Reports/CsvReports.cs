using System.Globalization;
using System.Text;
using CsvHelper;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary>The CSV outputs of the audit: <c>atoms.csv</c> and <c>senses.csv</c> (layouts in docs/file-formats.md).</summary>
public static class CsvReports
{
    public static readonly string[] AtomColumns = ["atom", "label", "coherence", "usage", "usage_share", "flags", "terms"];

    /// <summary>One row per atom: id, label words (space-separated), coherence, usage, usage share, flags, glossary terms using it.</summary>
    public static void WriteAtoms(AuditReport report, TextWriter writer)
    {
        var model = report.Model;
        using var csv = new CsvWriter(writer, CultureInfo.InvariantCulture, leaveOpen: true);
        foreach (var c in AtomColumns) csv.WriteField(c);
        csv.NextRecord();
        for (int a = 0; a < model.AtomCount; a++)
        {
            csv.WriteField(Fmt.I(a));
            csv.WriteField(report.AtomLabel(a));
            csv.WriteField(Fmt.N(model.Catalog.Coherence[a]));
            csv.WriteField(Fmt.I(model.Catalog.Usage[a]));
            csv.WriteField(Fmt.N((double)model.Catalog.Usage[a] / Math.Max(1, model.Vectors.Count)));
            csv.WriteField(AuditReport.AtomFlagNames(model.Catalog.Flags[a]));
            csv.WriteField(Fmt.I(report.TermsUsing(a).Count));
            csv.NextRecord();
        }
    }

    public static readonly string[] SenseColumns =
        ["key", "verdict", "ambiguity", "peer_rank", "senses", "sense", "atoms", "weight", "share", "label", "neighbours", "cues", "doubtful", "from_corpus", "composed", "occurrences", "examples", "notes"];

    /// <summary>Our column names after the glossary's: a name the glossary already uses gets the prefix <c>audit_</c>.</summary>
    public static string[] OwnColumns(IReadOnlyList<string> glossaryColumns)
    {
        var taken = new HashSet<string>(glossaryColumns, StringComparer.OrdinalIgnoreCase);
        return SenseColumns.Select(c => taken.Contains(c) ? "audit_" + c : c).ToArray();
    }

    /// <summary>One row per term and sense (one row with an empty sense for a term without senses); all glossary
    /// columns first, unchanged.</summary>
    public static void WriteSenses(AuditReport report, TextWriter writer)
    {
        var g = report.Glossary;
        using var csv = new CsvWriter(writer, CultureInfo.InvariantCulture, leaveOpen: true);
        foreach (var c in g.Columns) csv.WriteField(c);
        foreach (var c in OwnColumns(g.Columns)) csv.WriteField(c);
        csv.NextRecord();
        bool hasCorpus = report.Corpus is not null;
        for (int t = 0; t < report.Results.Count; t++)
        {
            var r = report.Results[t];
            var entry = g.Entries[t];
            string notes = string.Join("; ", r.Notes.Concat(r.CorpusNotes)
                .Concat(r.CloseSpellings.Count > 0 && r.Verdict == Verdict.Unknown ? [$"close spellings: {string.Join(", ", r.CloseSpellings)}"] : []));
            void Common()
            {
                foreach (var f in entry.Fields) csv.WriteField(f);
                csv.WriteField(r.Query.Key);
                csv.WriteField(VerdictNames.Of(r.Verdict));
                csv.WriteField(Fmt.N(r.Ambiguity));
                csv.WriteField(r.PeerRank is double pr ? Fmt.N(pr) : "");
                csv.WriteField(Fmt.I(r.Senses.Count));
            }
            if (r.Senses.Count == 0)
            {
                Common();
                for (int i = 0; i < 7; i++) csv.WriteField(""); // sense, atoms, weight, share, label, neighbours, cues
                csv.WriteField(r.Verdict == Verdict.Unknown ? "" : "true"); // doubtful: no usable atom
                csv.WriteField(""); // from_corpus
                csv.WriteField(r.Composed ? "true" : "false");
                csv.WriteField(hasCorpus && r.Verdict != Verdict.Unknown ? Fmt.I(r.Occurrences) : "");
                csv.WriteField("");
                csv.WriteField(notes);
                csv.NextRecord();
                continue;
            }
            foreach (var s in r.Senses)
            {
                Common();
                csv.WriteField(Fmt.I(s.Id));
                csv.WriteField(string.Join(' ', s.Atoms.Select(a => Fmt.I(a))));
                csv.WriteField(Fmt.N(s.Weight));
                csv.WriteField(Fmt.N(s.Share));
                csv.WriteField(string.Join(' ', s.Label));
                csv.WriteField(string.Join(' ', s.Neighbours));
                csv.WriteField(string.Join(' ', s.Cues));
                csv.WriteField(s.Doubtful ? "true" : "false");
                csv.WriteField(s.FromCorpus ? "true" : "false");
                csv.WriteField(r.Composed ? "true" : "false");
                csv.WriteField(hasCorpus ? Fmt.I(s.Occurrences) : "");
                csv.WriteField(string.Join(" | ", s.Examples.Select(e => e.Context)));
                csv.WriteField(s.Reason.Length > 0 ? (notes.Length > 0 ? s.Reason + "; " + notes : s.Reason) : notes);
                csv.NextRecord();
            }
        }
    }

    public static UTF8Encoding Utf8NoBom { get; } = new(false);
}
