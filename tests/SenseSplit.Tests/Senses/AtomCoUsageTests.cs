using SenseSplit.Core.Senses;
using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Tests.Senses;

public class AtomCoUsageTests
{
    [Fact]
    public void Npmi_BoundaryCases_MatchBouma2009()
    {
        // Bouma (2009), "Normalized (Pointwise) Mutual Information in Collocation Extraction": NPMI = −1 for pairs that
        // never co-occur, 0 for independence, 1 for complete co-occurrence.
        Assert.Equal(-1, AtomCoUsage.Npmi(0, 10, 10, 100));
        Assert.Equal(0, AtomCoUsage.Npmi(25, 50, 50, 100), 12); // p_ab = 0.25 = 0.5·0.5
        Assert.Equal(1, AtomCoUsage.Npmi(10, 10, 10, 100), 12);
        // A worked value: p_a = p_b = 0.1, p_ab = 0.05 → ln(0.05/0.01)/−ln(0.05) = ln 5 / ln 20.
        Assert.Equal(Math.Log(5) / Math.Log(20), AtomCoUsage.Npmi(5, 10, 10, 100), 12);
    }

    [Fact]
    public void Build_CountsPositiveUsesOnly_AndExcludesOwnRow()
    {
        // Rows: {0,1}, {0,1}, {0,2 (negative)}, {1}
        var codes = new SparseCodes(4, 2, [0, 1, 0, 1, 0, 2, 1, -1], [0.5f, 0.4f, 0.3f, 0.2f, 0.6f, -0.3f, 0.9f, 0f]);
        var cu = AtomCoUsage.Build(codes, 3);
        Assert.Equal(3, cu.Uses(0));
        Assert.Equal(3, cu.Uses(1));
        Assert.Equal(0, cu.Uses(2));
        Assert.Equal(2, cu.Together(0, 1));
        Assert.Equal(AtomCoUsage.Npmi(2, 3, 3, 4), cu.Npmi(0, 1), 12);
        // Without row 0, the pair is used once among 3 rows, each atom twice.
        Assert.Equal(AtomCoUsage.Npmi(1, 2, 2, 3), cu.Npmi(0, 1, codes, 0), 12);
        Assert.Equal(-1, cu.Npmi(0, 2));
    }
}
