using System.Numerics.Tensors;
using SenseSplit.Core.Senses;

namespace SenseSplit.Tests.Senses;

public class SenseTaggerTests
{
    internal static readonly Lazy<SenseModel> Model = new(() =>
    {
        var c = NamedModel.Build();
        return SenseModel.Build(c.Vectors, c.Atoms, c.AtomCount, c.Codes, c.Counts);
    });

    internal const string FinanceText = "The bank loan, credit and low mortgage interest paid into the deposit account.";
    internal const string RiverText = "We walked where the river bank, shore, stream and flood water meet.";

    private static int TopicOfSense(SenseInfo s) => NamedModel.TopicOf(s.Atoms[0], NamedModel.DefaultTopics.Count);
    private static readonly string[] Names = NamedModel.DefaultTopics.Keys.ToArray();

    [Fact]
    public void Assign_ContextOfTopicWords_PicksThatTopicsSense()
    {
        var model = Model.Value;
        var bank = model.Analyze(TermQuery.From("bank"));
        var tagger = new SenseTagger(model);
        var vectors = bank.Senses.Select(s => s.Vector).ToArray();
        foreach (var (text, topic) in new[] { (FinanceText, "finance"), (RiverText, "river") })
        {
            var doc = TokenizedText.From(text, model);
            var m = new TermFinder([bank.Query]).Find(doc.Tokens).Single();
            var ctx = new float[model.Dimensions];
            Assert.True(tagger.Context(doc.Rows, m.Start, m.End, ctx) >= 3);
            var (index, confidence) = tagger.Assign(ctx, vectors);
            Assert.Equal(topic, Names[TopicOfSense(bank.Senses[index])]);
            Assert.InRange(confidence, 0.5, 1.0);
        }
    }

    [Fact]
    public void Context_IsSifWeightedSumOfWindowWords()
    {
        var model = Model.Value;
        var doc = TokenizedText.From("loan credit bank river unknownword shore", model);
        var ctx = new float[model.Dimensions];
        int used = new SenseTagger(model).Context(doc.Rows, 2, 3, ctx);
        Assert.Equal(4, used);
        // Arora, Liang & Ma (2017), ICLR: weight a/(a + p(w)), p(w) = count / total count.
        double total = model.Counts!.Sum();
        var expected = new float[model.Dimensions];
        foreach (var w in new[] { "loan", "credit", "river", "shore" })
        {
            int r = model.IndexOf(w);
            float sif = (float)(1e-3 / (1e-3 + model.Counts![r] / total));
            TensorPrimitives.MultiplyAdd(model.Vectors.Row(r), sif, expected, expected);
        }
        for (int i = 0; i < expected.Length; i++) Assert.Equal(expected[i], ctx[i], 5);
    }

    [Fact]
    public void Assign_Confidence_IsSoftmaxOfCosinesOverTemperature()
    {
        var model = Model.Value;
        var tagger = new SenseTagger(model);
        int d = model.Dimensions;
        var s1 = new float[d]; s1[0] = 1;
        var s2 = new float[d]; s2[1] = 1;
        var ctx = new float[d]; ctx[0] = 0.8f; ctx[1] = 0.6f; // cosines 0.8 and 0.6
        var (index, confidence) = tagger.Assign(ctx, [s1, s2]);
        Assert.Equal(0, index);
        double expected = 1 / (1 + Math.Exp((0.6 - 0.8) / 0.05));
        Assert.Equal(expected, confidence, 6);
        Assert.Equal((0, 0.5), tagger.Assign(new float[d], [s1, s2]));
    }

    [Fact]
    public void Find_LongestMatchFirst_NoOverlap()
    {
        var terms = new[] { TermQuery.From("river"), TermQuery.From("river bank"), TermQuery.From("bank") };
        var tokens = WordTokenizer.Tokenize("River bank, river and bank; river-bank").ToArray();
        var matches = new TermFinder(terms).Find(tokens).ToArray();
        Assert.Equal([new TermMatch(1, 0, 2), new TermMatch(0, 2, 3), new TermMatch(2, 4, 5)], matches.Take(3));
        Assert.Equal(3, matches.Length); // "river-bank" is one token, not a glossary term
    }

    [Fact]
    public void Run_WithCorpus_AssignsExamplesAndNotesAbsentTerms()
    {
        var model = Model.Value;
        var corpus = new[] { FinanceText + "\n" + RiverText + "\n" + FinanceText.Replace("low", "high") };
        var docs = corpus.Select(t => TokenizedText.From(t, model)).ToArray();
        var results = SenseAudit.Run(model, [TermQuery.From("bank"), TermQuery.From("guitar")], docs, examples: 5);
        var bank = results[0];
        Assert.Equal(3, bank.Occurrences);
        var finance = bank.Senses.Single(s => Names[TopicOfSense(s)] == "finance");
        var river = bank.Senses.Single(s => Names[TopicOfSense(s)] == "river");
        Assert.Equal(2, finance.Occurrences);
        Assert.Equal(1, river.Occurrences);
        Assert.All(finance.Examples, e => Assert.Contains("loan", e.Context));
        Assert.Contains("river", river.Examples.Single().Context);
        Assert.Equal(0, results[1].Occurrences);
        Assert.Contains("no occurrence in the corpus", results[1].CorpusNotes);
    }

    [Fact]
    public void Snippet_CutsAndFoldsWhitespace()
    {
        string text = new string('a', 100) + " the\t\t bank  here " + new string('b', 100);
        int at = text.IndexOf("bank", StringComparison.Ordinal);
        var s = SenseTagger.Snippet(text, at, 4, 10);
        Assert.StartsWith("…", s);
        Assert.EndsWith("…", s);
        Assert.Contains("the bank here", s);
        // Stays within the occurrence's line.
        Assert.Equal("the river bank here", SenseTagger.Snippet("loan credit\nthe river bank here\nnext line", 22, 4));
    }
}
