using RateDeck.Sweeps;
using Xunit;

namespace RateDeck.Tests.Sweeps;

/// <summary>The values of a <c>--vary</c> axis: evenly spaced or geometric, ends exact, and recorded as a user would type them.</summary>
public sealed class SweepAxisTests
{
    [Fact]
    public void LogAxis_GivesTheDecadeFractions()
    {
        var values = SweepAxis.Parse("temperature.kT=0.01:0.1:5:log").Values();

        // Closed form: 10^(-2 + k/4), k = 0..4, here to the 12 significant digits the axis keeps.
        for (var k = 0; k < 5; k++)
        {
            Assert.Equal(Math.Pow(10, -2 + (k / 4.0)), values[k], Math.Pow(10, -2 + (k / 4.0)) * 1e-11);
        }

        Assert.Equal(0.01, values[0]);
        Assert.Equal(0.1, values[4]);
    }

    [Fact]
    public void EvenAxis_RecordsTheDecimalValuesAShellLoopWouldType()
    {
        var axis = SweepAxis.Parse("temperature.kT=0.1:0.5:5");

        // 0.1 + 2 * 0.1 is 0.30000000000000004 in binary floating point; the axis records 0.3.
        Assert.Equal(["temperature.kT=0.1", "temperature.kT=0.2", "temperature.kT=0.3", "temperature.kT=0.4", "temperature.kT=0.5"],
            axis.Values().Select(v => axis.Override(v).ToString()));
    }

    [Fact]
    public void Product_RunsTheLastAxisFastest_AndNamesSortInPointOrder()
    {
        var plan = SweepPlan.Create([SweepAxis.Parse("a=1:2:2"), SweepAxis.Parse("b=1:3:3")], zip: false);

        var points = plan.Points();

        Assert.Equal(["1 1", "1 2", "1 3", "2 1", "2 2", "2 3"], points.Select(p => string.Join(' ', p.ValueTexts)));
        Assert.Equal(points.Select(p => p.Name).Order(StringComparer.Ordinal), points.Select(p => p.Name));
        Assert.Equal("point-0005", points[^1].Name);
    }
}
