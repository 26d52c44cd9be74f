using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Tests.Senses.MergeTest;

public class RatioBinsTests
{
    [Fact]
    public void Edges_LogSpacedOverRange()
    {
        var bins = new RatioBins(3, 1000);
        Assert.Equal(1, bins.Lower(0), 12);
        Assert.Equal(10, bins.Lower(1), 9);
        Assert.Equal(100, bins.Lower(2), 9);
        Assert.Equal(1000, bins.Upper(2), 9);
        Assert.Equal(bins.Lower(1), bins.Upper(0));
    }

    [Theory]
    [InlineData(1, 0)]
    [InlineData(9.999, 0)]
    [InlineData(10, 1)]
    [InlineData(99.9, 1)]
    [InlineData(100, 2)]
    [InlineData(1000, 2)]
    [InlineData(50000, 2)]
    public void Of_AssignsEdgesToUpperBinAndClampsTop(double ratio, int expected)
    {
        Assert.Equal(expected, new RatioBins(3, 1000).Of(ratio));
    }

    [Fact]
    public void Of_EveryLowerEdgeOfEightBins_FallsInItsOwnBin()
    {
        var bins = new RatioBins(8, 1000);
        for (int b = 0; b < 8; b++) Assert.Equal(b, bins.Of(bins.Lower(b)));
    }

    [Fact]
    public void Of_RatioBelowOne_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new RatioBins(8, 1000).Of(0.5));
        Assert.Throws<ArgumentOutOfRangeException>(() => new RatioBins(8, 1));
    }

    [Fact]
    public void Label_ShowsEdges()
    {
        var bins = new RatioBins(3, 1000);
        Assert.Equal("[1, 10)", bins.Label(0));
        Assert.Equal("[100, 1000+]", bins.Label(2));
    }
}
