using SenseSplit.Core.Senses;
using Xunit.Abstractions;

namespace SenseSplit.Tests.Senses;

public class SenseModelTests(ITestOutputHelper output)
{
    internal static readonly Lazy<(PlantedSenseModel planted, SenseModel model)> Shared = new(() =>
    {
        var p = PlantedSenseModel.Generate(words: 4000, dims: 48, atomCount: 204, seed: 7);
        return (p, SenseModel.Build(p.Vectors, p.Atoms, p.AtomCount, p.Codes, p.Counts));
    });

    [Fact]
    public void Analyze_PlantedModel_FindsTwoSenseWordsWithFewFalseAlarms()
    {
        var (p, model) = Shared.Value;
        var terms = p.Vectors.Words.Select(w => TermQuery.From(w)).ToArray();
        var results = model.Analyze(terms);
        int mono = 0, monoSeveral = 0, monoDoubtful = 0, poly = 0, polySeveral = 0, polyRight = 0;
        for (int w = 0; w < results.Count; w++)
        {
            var r = results[w];
            if (p.IsPolysemous(w))
            {
                poly++;
                if (r.Verdict == Verdict.Several) polySeveral++;
                // Right split: exactly two senses, each made of atoms of one planted topic, the two topics the planted ones.
                var topics = r.Senses.Select(s => s.Atoms.Select(a => p.AtomTopic[a]).Distinct().ToArray()).ToArray();
                if (topics.Length == 2 && topics.All(t => t.Length == 1) && topics.Select(t => t[0]).Order().SequenceEqual(p.WordTopics[w].Order()))
                    polyRight++;
            }
            else
            {
                mono++;
                if (r.Verdict == Verdict.Several) monoSeveral++;
                if (r.Verdict == Verdict.Doubtful) monoDoubtful++;
            }
        }
        output.WriteLine($"mono {mono}: several {monoSeveral}, doubtful {monoDoubtful}; poly {poly}: several {polySeveral}, right split {polyRight}");
        // Planted truth (constructed, not published): few false alarms and most two-topic words split along their topics.
        Assert.True(monoSeveral <= 0.02 * mono, $"false alarms {monoSeveral}/{mono}");
        Assert.True(polySeveral >= 0.85 * poly, $"found {polySeveral}/{poly}");
        Assert.True(polyRight >= 0.85 * poly, $"right splits {polyRight}/{poly}");
    }
}
