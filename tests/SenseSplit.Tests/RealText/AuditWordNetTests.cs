using SenseSplit.Core.Senses;
using Xunit.Abstractions;

namespace SenseSplit.Tests.RealText;

/// <summary>
/// The audit's sense counts on real English against an open sense inventory: Princeton WordNet 3.0 (G. A. Miller 1995,
/// "WordNet: a lexical database for English", CACM 38(11); Debian wordnet-base), on a model of GCIDE (see
/// <see cref="GcideModelFixture"/>). WordNet's sense counts rise steeply with frequency, so the main comparison pairs
/// each polysemous word (≥ 5 WordNet senses) with a monosemous word of about the same corpus count (±10%).
/// The baseline to beat is the naive rule "senses = atoms of the code with weight above 0.2", which Arora et al. (2018,
/// TACL 6, §5) note is no sense count: most of a word's atoms are facets of one discourse.
/// </summary>
[Trait("Category", "RealText")]
[Collection(GcideModelCollection.Name)]
public sealed class AuditWordNetTests(GcideModelFixture fixture, ITestOutputHelper output)
{
    [Fact]
    public void Audit_GcideModel_PolysemousWordsGetMoreSensesThanMonosemousOnes()
    {
        OpenCorpora.RequireWordNet();
        var model = fixture.Model;
        var wordnet = OpenCorpora.WordNetSenseCounts();
        // Content words only: the 100 most frequent words (function words) and tokens with non-letters are left out.
        var rank = Enumerable.Range(0, model.Vectors.Count).OrderByDescending(w => model.Counts![w]).Select((w, i) => (w, i)).ToDictionary(x => x.w, x => x.i);
        var table = wordnet.Where(kv => kv.Key.All(char.IsLetter) && model.IndexOf(kv.Key) is int r && r >= 0 && rank[r] >= 100)
            .ToDictionary(kv => kv.Key, kv => kv.Value);
        var (all, audited) = WordNetComparison.FromModel(model, table);
        var naive = WordNetComparison.NaiveCounts(model, audited);
        var ours = WordNetComparison.CompareMatched(audited);
        var base_ = WordNetComparison.CompareMatched(naive);
        double rhoOurs = all.Spearman;
        double rhoNaive = WordNetComparison.Compare(naive).Spearman;
        int mono = audited.Count(p => p.Dictionary == 1);
        double monoSingle = audited.Where(p => p.Dictionary == 1).Average(p => p.Found <= 1 ? 1.0 : 0.0);
        double naiveMonoSingle = naive.Where(p => p.Dictionary == 1).Average(p => p.Found <= 1 ? 1.0 : 0.0);

        output.WriteLine($"words in the model and in WordNet: {audited.Count} ({mono} monosemous, {audited.Count(p => p.Dictionary >= 5)} with >= 5 senses)");
        output.WriteLine($"frequency-matched pairs: {ours.Pairs}");
        output.WriteLine($"  audit: polysemous more senses {ours.PolysemousMore:P1}, fewer {ours.PolysemousFewer:P1}, sign-test z {ours.SignZ:F1}; mean senses mono {ours.MonosemousMean:F2} vs poly {ours.PolysemousMean:F2}; 'several' mono {ours.MonosemousSeveral:P1} vs poly {ours.PolysemousSeveral:P1}");
        output.WriteLine($"  naive: polysemous more senses {base_.PolysemousMore:P1}, fewer {base_.PolysemousFewer:P1}, sign-test z {base_.SignZ:F1}; mean senses mono {base_.MonosemousMean:F2} vs poly {base_.PolysemousMean:F2}; 'several' mono {base_.MonosemousSeveral:P1} vs poly {base_.PolysemousSeveral:P1}");
        output.WriteLine($"all words: monosemous called single: audit {monoSingle:P1}, naive {naiveMonoSingle:P1}; Spearman rho with WordNet counts: audit {rhoOurs:F3}, naive {rhoNaive:F3}");

        Assert.True(ours.Pairs >= 500, $"only {ours.Pairs} matched pairs");
        // At matched frequency the polysemous word gets more senses clearly more often than fewer (sign test,
        // z >= 4: far beyond chance for about 2,000 pairs; the measured z is about 7).
        Assert.True(ours.SignZ >= 4, $"sign-test z {ours.SignZ:F2}");
        Assert.True(ours.PolysemousMean > ours.MonosemousMean + 0.2, $"mean senses poly {ours.PolysemousMean:F2} vs mono {ours.MonosemousMean:F2}");
        // Most WordNet-monosemous words get a single-sense verdict (measured about 78%); the naive rule calls
        // almost none of them single (about 5%).
        Assert.True(monoSingle >= 0.6, $"monosemous words called single: {monoSingle:P1}");
        Assert.True(monoSingle > naiveMonoSingle + 0.3, $"audit {monoSingle:P1} vs naive {naiveMonoSingle:P1}");
        // Over all words, the audit's counts rank like WordNet's better than the naive rule's do.
        Assert.True(rhoOurs > rhoNaive + 0.1, $"Spearman audit {rhoOurs:F3} vs naive {rhoNaive:F3}");
    }
}
