using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.Senses;

/// <summary>Senses found in the corpus contexts when the term's vector does not carry them (SenseAudit with a
/// corpus), on the readable named model: "trout" is a fish word only, by its vector.</summary>
public class SenseAuditCorpusTests
{
    private static readonly string[] Names = NamedModel.DefaultTopics.Keys.ToArray();
    private static int TopicOf(int atom) => NamedModel.TopicOf(atom, Names.Length);

    private const string Fish = "the angler took bait and a pike and carp and salmon on the line with trout";
    private const string Cooking = "the recipe said bake trout in the oven with flour butter and sugar to simmer";

    private static IReadOnlyList<TermSenses> Audit(IEnumerable<string> lines, params string[] terms)
    {
        var model = SenseTaggerTests.Model.Value;
        var corpus = lines.Select(l => TokenizedText.From(l, model)).ToArray();
        return SenseAudit.Run(model, terms.Select(t => TermQuery.From(t)).ToArray(), corpus, examples: 2);
    }

    [Fact]
    public void Run_TermAlsoInAnotherTopicsContexts_AddsThatSenseFromTheCorpus()
    {
        // 100 fish contexts and 15 cooking contexts of "trout"; fish words other than trout are seen in fish contexts only.
        var lines = Enumerable.Repeat(Fish, 100).Concat(Enumerable.Repeat(Cooking, 15));
        var r = Audit(lines, "trout", "salmon")[0];
        var salmon = Audit(lines, "trout", "salmon")[1];

        Assert.True(r.Verdict == Verdict.Several, string.Join(" / ", r.Notes.Concat(r.CorpusNotes)) + " :: " + string.Join(" / ", r.Evidence.Select(p => $"{p.AtomA}-{p.AtomB} cos {p.Cosine:F2} npmi {p.Npmi:F2} lab {p.LabelRatio:F2} corp {p.CorpusCosine:F2} v{p.Votes} {p.Linked}")) + " :: senses " + string.Join(",", r.Senses.Select(s => string.Join("+", s.Atoms))));
        var found = Assert.Single(r.Senses, s => s.FromCorpus);
        Assert.Equal("cooking", Names[TopicOf(found.Atoms[0])]);
        Assert.All(r.Senses.Where(s => !s.FromCorpus), s => Assert.Equal("fish", Names[TopicOf(s.Atoms[0])]));
        // Pass 2 sends the cooking contexts to the corpus sense.
        Assert.InRange(found.Occurrences, 12, 18);
        Assert.All(found.Examples, e => Assert.Contains("recipe", e.Context));
        // The control word, seen in fish contexts only, gets no corpus sense.
        Assert.DoesNotContain(salmon.Senses, s => s.FromCorpus);
    }

    [Fact]
    public void Run_OtherTopicDriftsIntoEveryMainSenseWord_NoCorpusSense()
    {
        // Every fish word is seen in the same share of cooking contexts: the topic drifts through the text and says
        // nothing about trout in particular (the lift over the main-sense words' contexts is about 1).
        var fishWords = NamedModel.DefaultTopics["fish"];
        var lines = Enumerable.Repeat(Fish, 100)
            .Concat(Enumerable.Range(0, 15 * fishWords.Length).Select(i => Cooking.Replace("trout", fishWords[i % fishWords.Length])));
        var r = Audit(lines, "trout")[0];
        Assert.DoesNotContain(r.Senses, s => s.FromCorpus);
        Assert.NotEqual(Verdict.Several, r.Verdict);
    }

    [Fact]
    public void Run_CandidatesOff_NoCorpusSense()
    {
        var model = SenseTaggerTests.Model.Value;
        var off = SenseModel.Build(model.Vectors, model.Atoms, model.AtomCount, model.Codes, model.Counts,
            new SenseOptions { MinCorpusShare = 0 });
        var corpus = Enumerable.Repeat(Fish, 100).Concat(Enumerable.Repeat(Cooking, 15)).Select(l => TokenizedText.From(l, off)).ToArray();
        var r = SenseAudit.Run(off, [TermQuery.From("trout")], corpus)[0];
        Assert.DoesNotContain(r.Senses, s => s.FromCorpus);
    }
}
