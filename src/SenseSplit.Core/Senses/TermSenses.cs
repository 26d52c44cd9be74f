namespace SenseSplit.Core.Senses;

/// <summary>What the audit concludes about a term. The JSON/CSV spelling of each value is in
/// <see cref="VerdictNames"/> and is stable.</summary>
public enum Verdict
{
    /// <summary>One sense (its atoms, if several, read as one discourse).</summary>
    Single,
    /// <summary>Two or more senses with clear evidence that their discourses differ.</summary>
    Several,
    /// <summary>Two or more candidate senses, but the evidence is weak (a sense rests on a diffuse atom, or the
    /// signals disagree), or the term uses only generic atoms.</summary>
    Doubtful,
    /// <summary>Not in the vocabulary and not composable from known words.</summary>
    Unknown,
}

public static class VerdictNames
{
    public const string Single = "single", Several = "several", Doubtful = "doubtful", Unknown = "unknown";

    public static string Of(Verdict v) => v switch
    {
        Verdict.Single => Single,
        Verdict.Several => Several,
        Verdict.Doubtful => Doubtful,
        _ => Unknown,
    };

    /// <summary>Sort key for reports: the verdicts that need a person's look first.</summary>
    public static int Rank(Verdict v) => v switch { Verdict.Several => 0, Verdict.Doubtful => 1, Verdict.Single => 2, _ => 3 };
}

/// <summary>A term to look up: the glossary text, its tokens (lower-cased) and the key used for duplicates.</summary>
public sealed record TermQuery(string Term, string Key, string[] Tokens)
{
    public static TermQuery From(string term, Tokenizer? tokenizer = null)
    {
        tokenizer ??= WordTokenizer.Default;
        var tokens = tokenizer(term).Select(t => t.Text).ToArray();
        return new TermQuery(term, tokens.Length > 0 ? string.Join(' ', tokens) : term.Trim().ToLowerInvariant(), tokens);
    }
}

/// <summary>The evidence that joined two atoms of a term into one sense (or kept them apart).</summary>
/// <param name="Cosine">cos(d_a, d_b).</param>
/// <param name="Npmi">Co-usage of the two atoms by the other words (see <see cref="AtomCoUsage"/>).</param>
/// <param name="LabelRatio">Mean cosine between the two atoms' label words over the geometric mean of their coherences.</param>
/// <param name="CorpusCosine">Cosine of the centred mean contexts of the term's occurrences assigned to each atom, or NaN without enough occurrences.</param>
/// <param name="Votes">How many signals said "same discourse".</param>
/// <param name="Linked">Whether the pair was merged.</param>
public sealed record AtomPairEvidence(int AtomA, int AtomB, double Cosine, double Npmi, double LabelRatio, double CorpusCosine, int Votes, bool Linked);

/// <summary>An atom of the term's code that no sense uses, and why.</summary>
public sealed record DroppedAtom(int Atom, float Weight, string Reason);

/// <summary>An occurrence of a term in a corpus, assigned to a sense.</summary>
/// <param name="Document">Index of the corpus document.</param>
/// <param name="CharIndex">UTF-16 index of the occurrence in the document.</param>
/// <param name="Offset">Code-point offset of the occurrence in the document.</param>
public sealed record SenseExample(int Document, int CharIndex, int CharLength, int Offset, double Confidence, string Context);

/// <summary>One sense of a term.</summary>
/// <param name="Id">1-based, heaviest first.</param>
/// <param name="Atoms">The merged atoms, heaviest first.</param>
/// <param name="Weight">Sum of the merged atoms' code weights.</param>
/// <param name="Share">Weight over the summed weight of all senses.</param>
/// <param name="Vector">Unit vector of the sense: normalise(Σ weight·atom).</param>
/// <param name="Label">Words naming the sense.</param>
/// <param name="Neighbours">The term's neighbours within the sense.</param>
/// <param name="Cues">Context words that point to this sense rather than the others.</param>
public sealed record SenseInfo(
    int Id, int[] Atoms, float[] AtomWeights, double Weight, double Share, float[] Vector, string[] Label, string[] Neighbours,
    string[] Cues, bool Doubtful, string Reason)
{
    public List<SenseExample> Examples { get; } = [];
    public int Occurrences { get; set; }
    /// <summary>The sense's atoms are not in the term's code: its occurrence contexts in the corpus point to them.</summary>
    public bool FromCorpus { get; init; }
}

/// <summary>The audit of one term.</summary>
/// <param name="Row">Row of the term in the vectors, or −1 (composed or unknown).</param>
/// <param name="Composed">The vector is the normalised mean of the unit vectors of the term's words, coded by OMP.</param>
/// <param name="Ambiguity">Gini–Simpson index of the sense shares times the separation of the senses (0 for one sense).</param>
public sealed record TermSenses(
    TermQuery Query, Verdict Verdict, double Ambiguity, int Row, bool Composed, long? Count,
    IReadOnlyList<SenseInfo> Senses, IReadOnlyList<AtomPairEvidence> Evidence, IReadOnlyList<DroppedAtom> Dropped,
    IReadOnlyList<string> Notes, IReadOnlyList<string> CloseSpellings)
{
    public List<string> CorpusNotes { get; } = [];
    public int Occurrences { get; set; }
    /// <summary>Share of peer words (vocabulary words of about the term's frequency) whose ambiguity is below the
    /// term's, ties counted half; null when the model has too few words to compare with.</summary>
    public double? PeerRank { get; init; }
    /// <summary>The atoms formed several groups, but the peer rank was below the split threshold, so they are
    /// reported as one sense.</summary>
    public bool Demoted { get; init; }
}
