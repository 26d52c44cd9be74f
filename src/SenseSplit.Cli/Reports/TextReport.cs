using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary>Human-readable senses of one term (the <c>senses</c> command).</summary>
public static class TextReport
{
    public static void WriteTerm(SenseModel model, TermSenses r, TextWriter w)
    {
        w.WriteLine($"{r.Query.Term}: {VerdictNames.Of(r.Verdict)}" + (r.Senses.Count > 0 ? $", {r.Senses.Count} sense(s), ambiguity {Fmt.N(r.Ambiguity)}" : "")
            + (r.PeerRank is double pr ? $", more mixed than {Fmt.I((long)Math.Round(100 * pr))}% of {(r.Count is null ? "the sampled words" : "words of its frequency")}" : "")
            + (r.Composed ? " (composed from its words)" : "") + (r.Count is long c ? $", count {Fmt.I(c)}" : ""));
        foreach (var n in r.Notes.Concat(r.CorpusNotes)) w.WriteLine($"  note: {n}");
        if (r.Verdict == Verdict.Unknown)
        {
            w.WriteLine(r.CloseSpellings.Count > 0 ? $"  close spellings: {string.Join(", ", r.CloseSpellings)}" : "  no close spellings in the vocabulary");
            return;
        }
        foreach (var s in r.Senses)
        {
            w.WriteLine();
            w.WriteLine($"  sense {s.Id}  weight {Fmt.N(s.Weight)}  share {Fmt.N(s.Share)}{(s.Doubtful ? "  [doubtful: " + s.Reason + "]" : "")}");
            w.WriteLine($"    atoms       {string.Join(", ", s.Atoms.Select((a, i) => $"{a} ({Fmt.N(s.AtomWeights[i])}{Flags(model, a)})"))}");
            w.WriteLine($"    label       {string.Join(' ', s.Label)}");
            w.WriteLine($"    neighbours  {string.Join(' ', s.Neighbours)}");
            w.WriteLine($"    cues        {string.Join(' ', s.Cues)}");
            foreach (var e in s.Examples) w.WriteLine($"    example     {e.Context}  (confidence {Fmt.N(e.Confidence)})");
        }
        if (r.Dropped.Count > 0)
        {
            w.WriteLine();
            w.WriteLine("  left out: " + string.Join(", ", r.Dropped.Select(d => $"atom {d.Atom} ({Fmt.N(d.Weight)}, {d.Reason})")));
        }
    }

    private static string Flags(SenseModel model, int atom)
    {
        var f = AuditReport.AtomFlagNames(model.Catalog.Flags[atom]);
        return f.Length > 0 ? ", " + f : "";
    }
}
