using SenseSplit.Cli.Demo;
using SenseSplit.Core.Demo;

namespace SenseSplit.Tests.Demo;

public class DiscourseCorpusGeneratorTests
{
    private static (List<string> lines, IReadOnlyList<PlantedCount> counts) Generate(int seed, long tokens)
    {
        var generator = new DiscourseCorpusGenerator(ScenarioLoader.BuiltIn(), new DiscourseSettings { Seed = seed, Tokens = tokens });
        var lines = generator.Lines().ToList();
        return (lines, generator.PlantedCounts());
    }

    [Fact]
    public void Lines_SameSeed_SameText()
    {
        var (a, _) = Generate(3, 20_000);
        var (b, _) = Generate(3, 20_000);
        var (c, _) = Generate(4, 20_000);
        Assert.Equal(a, b);
        Assert.NotEqual(a, c);
    }

    [Fact]
    public void Lines_TokenTarget_ReachedWithinOneSentence()
    {
        var (lines, _) = Generate(1, 50_000);
        long tokens = lines.Sum(l => l.Length == 0 ? 0 : l.Split(' ').Length);
        Assert.InRange(tokens, 50_000, 50_000 + 18);
    }

    [Fact]
    public void PlantedCounts_TenToOneTerm_WrittenAboutTenTimesAsOftenInFirstSense()
    {
        var (_, counts) = Generate(2, 600_000);
        var crane = counts.Where(c => c.Term == "crane").OrderByDescending(c => c.Share).ToArray();
        Assert.Equal(2, crane.Length);
        double ratio = (double)crane[0].Occurrences / crane[1].Occurrences;
        // Topics get equal shares of documents only on average, so the written ratio scatters around 10.
        Assert.InRange(ratio, 5, 20);
        var port = counts.Where(c => c.Term == "port").ToArray();
        double even = (double)port[0].Occurrences / port[1].Occurrences;
        Assert.InRange(even, 0.5, 2.0);
    }

    [Fact]
    public void BuiltInScenario_GlossaryHasPlantedPolysemousAndSingleTerms()
    {
        var scenario = ScenarioLoader.BuiltIn();
        Assert.Contains(scenario.Terms, t => t.IsPolysemous);
        Assert.Contains(scenario.Terms, t => !t.IsPolysemous);
        Assert.All(scenario.Terms, t => Assert.Contains(scenario.Glossary, g => g.Term == t.Term));
    }
}
