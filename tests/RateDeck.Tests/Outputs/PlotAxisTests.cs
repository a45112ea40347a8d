using RateDeck.Outputs;
using ScottPlot;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class PlotAxisTests
{
    [Fact]
    public void GeometricTimeGrid_GetsALogAxis_LinearGridFromZeroDoesNot()
    {
        double[] geometric = [0.0, .. Enumerable.Range(0, 50).Select(k => Math.Pow(10, -4 + k / 10.0))];
        var linear = Enumerable.Range(0, 1001).Select(k => k * 0.01).ToArray();

        Assert.True(PlotAxis.ForGrid(AxisScale.Auto, geometric).IsLog);
        Assert.False(PlotAxis.ForGrid(AxisScale.Auto, linear).IsLog);
        Assert.True(PlotAxis.ForGrid(AxisScale.Log, linear).IsLog);
    }

    [Fact]
    public void MagnitudesSpanningDecades_GetALogAxis_UnlessClearlyNegative()
    {
        Assert.True(PlotAxis.ForMagnitudes(AxisScale.Auto, [1.0, 1e-5, 0.0, -1e-18]).IsLog);
        Assert.False(PlotAxis.ForMagnitudes(AxisScale.Auto, [1.0, 0.5, 0.2]).IsLog);
        Assert.False(PlotAxis.ForMagnitudes(AxisScale.Auto, [1.0, 1e-5, -0.3]).IsLog);
    }

    [Fact]
    public void LogAxis_DropsWhatItCannotShow()
    {
        var axis = PlotAxis.ForMagnitudes(AxisScale.Log, [1.0]);

        Assert.Equal(-3.0, axis.Map(1e-3)!.Value, 15);
        Assert.Null(axis.Map(0.0));
        Assert.Null(axis.Map(-1.0));
        Assert.Null(axis.Map(double.NaN));
    }

    [Fact]
    public void DecadeTicks_LabelWholeDecadesWithSuperscripts_AndMarkDigitsBetween()
    {
        var ticks = new DecadeTickGenerator();
        using var paint = Paint.NewDisposablePaint();

        ticks.Regenerate(new CoordinateRange(-3.2, 1.4), Edge.Left, new PixelLength(800), paint, new LabelStyle { FontSize = 14 });

        var majors = ticks.Ticks.Where(t => t.IsMajor).ToArray();
        Assert.Equal([-3.0, -2.0, -1.0, 0.0, 1.0], majors.Select(t => t.Position));
        Assert.Equal(["10⁻³", "10⁻²", "10⁻¹", "10⁰", "10¹"], majors.Select(t => t.Label));
        Assert.Contains(ticks.Ticks, t => !t.IsMajor && Math.Abs(t.Position - (-2 + Math.Log10(5))) < 1e-12);
    }

    [Fact]
    public void LessThanTwoDecades_GetLabelledTicksBetweenTheDecades()
    {
        // A colour bar from 0.03 to 1 holds two whole decades but too little room for decade ticks alone.
        var ticks = new DecadeTickGenerator();
        using var paint = Paint.NewDisposablePaint();

        ticks.Regenerate(new CoordinateRange(Math.Log10(0.03), 0), Edge.Right, new PixelLength(600), paint, new LabelStyle { FontSize = 14 });

        var labels = ticks.Ticks.Where(t => t.IsMajor).Select(t => t.Label).ToArray();
        Assert.Contains("0.05", labels);
        Assert.Contains("0.2", labels);
        Assert.Contains("0.5", labels);
        Assert.Contains("1", labels);
    }

    [Fact]
    public void DecadeTicks_ThinLabelsOverManyDecades()
    {
        var ticks = new DecadeTickGenerator();
        using var paint = Paint.NewDisposablePaint();

        ticks.Regenerate(new CoordinateRange(-200, 0), Edge.Left, new PixelLength(400), paint, new LabelStyle { FontSize = 14 });

        var majors = ticks.Ticks.Where(t => t.IsMajor).Select(t => t.Position).ToArray();
        Assert.InRange(majors.Length, 2, 12);
        var step = majors[1] - majors[0];
        Assert.All(majors, m => Assert.Equal(0, Math.IEEERemainder(m, step), 12));
    }

    [Fact]
    public void MapCells_OnAUniformGrid_AreOnePerSample()
    {
        var cells = MapCells.For([0.0, 1.0, 2.0, 3.0], "times");

        Assert.Equal([0, 1, 2, 3], cells.Owners);
        Assert.Equal(-0.5, cells.Low);
        Assert.Equal(3.5, cells.High);
    }

    [Fact]
    public void MapCells_OnAnUnevenGrid_ShowEverySampleInOrder()
    {
        double[] positions = [0.0, 0.1, 0.2, 5.0, 10.0];

        var cells = MapCells.For(positions, "times");

        Assert.Equal(Enumerable.Range(0, positions.Length), cells.Owners.Distinct());
        Assert.True(cells.Owners.Zip(cells.Owners.Skip(1)).All(pair => pair.First <= pair.Second));
    }
}
