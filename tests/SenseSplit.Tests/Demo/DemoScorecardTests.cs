using SenseSplit.Core.Demo;

namespace SenseSplit.Tests.Demo;

public class DemoScorecardTests
{
    private static readonly DemoScenario Scenario = new("t", "", ["the"],
        [new DemoTopic("sea", "x", ["tide", "hull", "keel", "mast"]), new DemoTopic("net", "y", ["server", "packet", "cable", "switch"])],
        [new DemoTerm("port", [new DemoSense("sea", 1), new DemoSense("net", 1)]), new DemoTerm("keel", [new DemoSense("sea", 1)])],
        []);

    private static readonly Dictionary<string, IReadOnlyCollection<string>> Words = new()
    {
        ["sea"] = new HashSet<string> { "tide", "hull", "keel", "mast" },
        ["net"] = new HashSet<string> { "server", "packet", "cable", "switch" },
    };

    [Fact]
    public void Score_PerfectAudit_FullPrecisionRecallAndAllSensesFound()
    {
        var audited = new List<AuditedTerm>
        {
            new("port", true, [["tide", "hull", "mast"], ["server", "packet", "cable"]]),
            new("keel", false, [["tide", "hull", "mast", "x"]]),
        };
        var score = DemoScorecard.Score(Scenario, Words, audited);
        Assert.Equal(1.0, score.Precision);
        Assert.Equal(1.0, score.Recall);
        Assert.Equal(3, score.PlantedSenses);
        Assert.Equal(3, score.SensesFound);
    }

    [Fact]
    public void Score_FalseAlarmAndMissedSense_CountedAsSuch()
    {
        var audited = new List<AuditedTerm>
        {
            new("port", true, [["tide", "hull", "mast"], ["tide", "server", "x"]]),
            new("keel", true, [["tide", "hull", "mast"], ["server", "a", "b"]]),
        };
        var score = DemoScorecard.Score(Scenario, Words, audited);
        Assert.Equal(0.5, score.Precision);
        Assert.Equal(1.0, score.Recall);
        Assert.Equal(2, score.SensesFound);
        Assert.Contains(score.Matches, m => m.Term == "port" && m.Topic == "net" && m.AuditSense == -1);
    }

    [Fact]
    public void Score_TermMissingFromAudit_CountsAsNotFlagged()
    {
        var score = DemoScorecard.Score(Scenario, Words, []);
        Assert.Equal(0, score.FlaggedSeveral);
        Assert.Equal(0.0, score.Recall);
        Assert.Equal(0, score.SensesFound);
    }
}
