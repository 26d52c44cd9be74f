using System.Text.Encodings.Web;
using System.Text.Json;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary><c>senses.jsonl</c>: one JSON object per line per term (fields in docs/file-formats.md; names stable).</summary>
public static class JsonReports
{
    private static readonly JsonWriterOptions Options = new() { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping, Indented = false };

    public static void WriteSenses(AuditReport report, Stream stream)
    {
        var newline = "\n"u8.ToArray();
        for (int t = 0; t < report.Results.Count; t++)
        {
            using (var w = new Utf8JsonWriter(stream, Options))
            {
                WriteTerm(w, report.Model, report.Results[t], report.Corpus, report.Glossary.Columns, report.Glossary.Entries[t].Fields);
            }
            stream.Write(newline);
        }
    }

    /// <summary>Writes one term object. <paramref name="columns"/>/<paramref name="fields"/> are the glossary row (may be null).</summary>
    public static void WriteTerm(Utf8JsonWriter w, SenseModel model, TermSenses r, IReadOnlyList<CorpusDocument>? corpus,
        IReadOnlyList<string>? columns = null, IReadOnlyList<string>? fields = null)
    {
        w.WriteStartObject();
        w.WriteString("term", r.Query.Term);
        w.WriteString("key", r.Query.Key);
        w.WriteString("verdict", VerdictNames.Of(r.Verdict));
        w.WriteNumber("ambiguity", Math.Round(r.Ambiguity, 4));
        if (r.PeerRank is double pr) w.WriteNumber("peer_rank", Math.Round(pr, 4)); else w.WriteNull("peer_rank");
        w.WriteBoolean("in_vocabulary", r.Row >= 0);
        w.WriteBoolean("composed", r.Composed);
        if (r.Count is long c) w.WriteNumber("count", c); else w.WriteNull("count");
        if (corpus is not null) w.WriteNumber("occurrences", r.Occurrences); else w.WriteNull("occurrences");
        w.WriteStartArray("senses");
        foreach (var s in r.Senses)
        {
            w.WriteStartObject();
            w.WriteNumber("id", s.Id);
            w.WriteStartArray("atom");
            foreach (int a in s.Atoms) w.WriteNumberValue(a);
            w.WriteEndArray();
            w.WriteStartArray("atom_weights");
            foreach (float a in s.AtomWeights) w.WriteNumberValue(Math.Round(a, 4));
            w.WriteEndArray();
            w.WriteNumber("weight", Math.Round(s.Weight, 4));
            w.WriteNumber("share", Math.Round(s.Share, 4));
            Strings(w, "label", s.Label);
            Strings(w, "neighbours", s.Neighbours);
            Strings(w, "cues", s.Cues);
            w.WriteBoolean("doubtful", s.Doubtful);
            w.WriteBoolean("from_corpus", s.FromCorpus);
            w.WriteString("reason", s.Reason);
            if (corpus is not null) w.WriteNumber("occurrences", s.Occurrences); else w.WriteNull("occurrences");
            w.WriteStartArray("examples");
            foreach (var e in s.Examples)
            {
                w.WriteStartObject();
                w.WriteString("text", e.Context);
                if (corpus is not null)
                {
                    w.WriteString("source", corpus[e.Document].Source);
                    w.WriteNumber("line", corpus[e.Document].LineOf(e.CharIndex));
                }
                w.WriteNumber("offset", e.Offset);
                w.WriteNumber("confidence", Math.Round(e.Confidence, 4));
                w.WriteEndObject();
            }
            w.WriteEndArray();
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteStartArray("merges");
        foreach (var e in r.Evidence)
        {
            w.WriteStartObject();
            w.WriteStartArray("atoms"); w.WriteNumberValue(e.AtomA); w.WriteNumberValue(e.AtomB); w.WriteEndArray();
            Number(w, "cosine", e.Cosine);
            Number(w, "npmi", e.Npmi);
            Number(w, "label_closeness", e.LabelRatio);
            Number(w, "corpus_cosine", e.CorpusCosine);
            w.WriteNumber("votes", e.Votes);
            w.WriteBoolean("merged", e.Linked);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        w.WriteStartArray("dropped");
        foreach (var d in r.Dropped)
        {
            w.WriteStartObject();
            w.WriteNumber("atom", d.Atom);
            w.WriteNumber("weight", Math.Round(d.Weight, 4));
            w.WriteString("reason", d.Reason);
            w.WriteEndObject();
        }
        w.WriteEndArray();
        Strings(w, "notes", r.Notes.Concat(r.CorpusNotes));
        Strings(w, "close_spellings", r.CloseSpellings);
        if (columns is not null && fields is not null)
        {
            w.WriteStartObject("glossary");
            for (int i = 0; i < columns.Count && i < fields.Count; i++) w.WriteString(columns[i], fields[i]);
            w.WriteEndObject();
        }
        w.WriteEndObject();
    }

    private static void Strings(Utf8JsonWriter w, string name, IEnumerable<string> values)
    {
        w.WriteStartArray(name);
        foreach (var v in values) w.WriteStringValue(v);
        w.WriteEndArray();
    }

    private static void Number(Utf8JsonWriter w, string name, double v)
    {
        if (double.IsFinite(v)) w.WriteNumber(name, Math.Round(v, 4)); else w.WriteNull(name);
    }
}
