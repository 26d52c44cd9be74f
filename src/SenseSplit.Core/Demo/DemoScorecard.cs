namespace SenseSplit.Core.Demo;

/// <summary>What the audit said of one term, reduced to what the scorecard compares.</summary>
public sealed record AuditedTerm(string Term, bool SeveralSenses, IReadOnlyList<IReadOnlyList<string>> SenseWords);

/// <summary>One planted sense and the audit sense (index) that matched its topic, or -1.</summary>
public sealed record SenseMatch(string Term, string Topic, double Share, int AuditSense, int Overlap);

public sealed record DemoScore(
    int Terms, int PlantedSeveral, int FlaggedSeveral, int TruePositives,
    double Precision, double Recall, int PlantedSenses, int SensesFound, IReadOnlyList<SenseMatch> Matches);

/// <summary>
/// Compares audit verdicts with the planted truth of the demo scenario: precision and recall of "several senses"
/// verdicts over the planted terms, and how many planted senses were recovered with the right topic words.
/// </summary>
public static class DemoScorecard
{
    /// <summary>An audit sense is taken to stand for a topic when at least this many of its words belong to the topic.</summary>
    public const int MinOverlap = 3;

    /// <param name="topicWords">For each topic id, every word the generator draws for it.</param>
    public static DemoScore Score(DemoScenario scenario, IReadOnlyDictionary<string, IReadOnlyCollection<string>> topicWords, IReadOnlyList<AuditedTerm> audited)
    {
        ArgumentNullException.ThrowIfNull(scenario);
        var byTerm = audited.ToDictionary(a => a.Term, StringComparer.Ordinal);
        int planted = 0, flagged = 0, tp = 0, plantedSenses = 0, found = 0;
        var matches = new List<SenseMatch>();
        foreach (var term in scenario.Terms)
        {
            byTerm.TryGetValue(term.Term, out var audit);
            bool several = audit?.SeveralSenses ?? false;
            if (term.IsPolysemous) planted++;
            if (several) flagged++;
            if (several && term.IsPolysemous) tp++;
            foreach (var sense in term.Senses)
            {
                plantedSenses++;
                int best = -1, bestOverlap = 0;
                if (audit is not null && topicWords.TryGetValue(sense.Topic, out var words))
                {
                    for (int s = 0; s < audit.SenseWords.Count; s++)
                    {
                        int overlap = audit.SenseWords[s].Count(words.Contains);
                        if (overlap > bestOverlap) { bestOverlap = overlap; best = s; }
                    }
                }
                if (bestOverlap < MinOverlap) best = -1;
                if (best >= 0) found++;
                matches.Add(new SenseMatch(term.Term, sense.Topic, sense.Share, best, bestOverlap));
            }
        }
        // Precision of an audit that flags nothing is undefined; report 1 (no false alarm) as is common practice.
        double precision = flagged == 0 ? 1.0 : (double)tp / flagged;
        double recall = planted == 0 ? 1.0 : (double)tp / planted;
        return new DemoScore(scenario.Terms.Length, planted, flagged, tp, precision, recall, plantedSenses, found, matches);
    }
}
