namespace SenseSplit.Core.Senses;

/// <summary>Settings of sense splitting and occurrence assignment. Defaults are the CLI defaults; where each comes
/// from is written beside it and in docs/methods-senses.md.</summary>
public sealed record SenseOptions
{
    public AtomNamingOptions Naming { get; init; } = new();
    /// <summary>An atom takes part in a sense only with a positive weight of at least this fraction of the term's
    /// largest positive weight. Arora et al. (2018, TACL 6, §5) find the last one or two of five atoms often noise.</summary>
    public double MinRelativeWeight { get; init; } = 0.3;
    /// <summary>Atoms closer than this cosine read as one discourse to people (Arora et al. 2018, §5): merged outright.</summary>
    public double SameCosine { get; init; } = 0.85;
    /// <summary>Below this cosine, people read two atoms as clearly different (Arora et al. 2018, §5); at or above it the
    /// cosine votes "same".</summary>
    public double DifferentCosine { get; init; } = 0.5;
    /// <summary>NPMI of co-usage by the other words at or above which co-usage votes "same" (our choice: with 2,000 atoms
    /// and 100,000 words, about five other words sharing the pair).</summary>
    public double NpmiVote { get; init; } = 0.2;
    /// <summary>Label-closeness ratio at or above which the label words vote "same" (our choice: the cross-cosine of the
    /// two label sets is at least half their own coherence).</summary>
    public double LabelVote { get; init; } = 0.5;
    /// <summary>Cosine of the centred context means at or above which the corpus votes "same" (our choice).</summary>
    public double CorpusVote { get; init; } = 0.5;
    /// <summary>Occurrences assigned to each of two atoms before the corpus may vote on them.</summary>
    public int MinOccurrencesForVote { get; init; } = 5;
    /// <summary>"Same" votes needed to merge two atoms (below <see cref="SameCosine"/>).</summary>
    public int VotesToMerge { get; init; } = 2;
    /// <summary>A term whose atoms form several groups is called "several" only when its ambiguity exceeds that of at
    /// least this share of its peer words (our choice, calibrated on held-out words against WordNet:
    /// docs/methods-senses.md). 0 turns the gate off.</summary>
    public double SeveralPeerRank { get; init; } = 0.75;
    /// <summary>Vocabulary words (spread evenly over the frequency order) whose ambiguity forms the peer table.</summary>
    public int PeerSample { get; init; } = 4000;
    /// <summary>Peers of a term: this many sampled words nearest to it in corpus count.</summary>
    public int PeerWindow { get; init; } = 200;
    /// <summary>With fewer sampled words than this, there is no peer rank and no gate.</summary>
    public int MinPeers { get; init; } = 50;
    /// <summary>With a corpus: an atom outside the term's kept atoms that is the best atom of the whole dictionary for at
    /// least this share of the term's occurrence contexts becomes a candidate sense (our choice, set on the demo
    /// scenario: a sense with a tenth of the main sense's frequency reaches 5–7% of the contexts, one with a fiftieth
    /// about 2%; at 1.5% related-topic facets began to pass as senses). The peer-lift test and the grouping signals
    /// then decide. 0 turns candidates off.</summary>
    public double MinCorpusShare { get; init; } = 0.03;
    /// <summary>... and for at least this many occurrences.</summary>
    public int MinCorpusOccurrences { get; init; } = 10;
    /// <summary>A candidate must be pointed to by the term's contexts at least this many times as often as by the
    /// contexts of the term's main-sense words (our choice).</summary>
    public double PeerLift { get; init; } = 2.0;
    /// <summary>Contexts read per main-sense word for that comparison (the first ones in the corpus).</summary>
    public int MaxPeerContexts { get; init; } = 2000;
    /// <summary>At most this many corpus candidates per term (the most frequent).</summary>
    public int MaxCorpusAtoms { get; init; } = 3;
    public int Neighbours { get; init; } = 10;
    public int Cues { get; init; } = 8;
    /// <summary>Context words taken on each side of an occurrence (our choice; Arora et al. 2018 use a comparable window).</summary>
    public int Window { get; init; } = 5;
    /// <summary>Smooth inverse frequency a in a/(a + p(w)): Arora, Liang &amp; Ma (2017), ICLR, "A simple but
    /// tough-to-beat baseline for sentence embeddings"; 1e-3 is common practice.</summary>
    public double SifA { get; init; } = 1e-3;
    /// <summary>Temperature of the softmax over sense cosines that gives an occurrence's confidence (our choice:
    /// a cosine lead of 0.1 over one rival gives 0.88).</summary>
    public double Temperature { get; init; } = 0.05;
    /// <summary>Close spellings offered for an unknown term, at most this edit distance away.</summary>
    public int MaxEditDistance { get; init; } = 2;
    public int MaxSpellings { get; init; } = 5;
}
