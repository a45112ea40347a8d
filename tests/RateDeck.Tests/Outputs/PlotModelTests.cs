using System.Numerics;
using RateDeck.Outputs;
using Xunit;

namespace RateDeck.Tests.Outputs;

/// <summary>Issue 8 section 4: what each plot shows, read from its model rather than its pixels.</summary>
public sealed class PlotModelTests
{
    private static readonly double[] _logTimes = [0.0, .. Enumerable.Range(0, 31).Select(k => Math.Pow(10, -3 + k / 5.0))];

    [Fact]
    public void ValuesBelowTheFloor_AreNotDrawn_TheCurveHasAGap_AndTheLegendSaysWhy()
    {
        // A rising population that reads rounding noise (1e-20) before it is resolved.
        var rising = _logTimes.Select(t => t < 0.01 ? 1e-20 : 1 - Math.Exp(-t)).ToArray();
        var falling = _logTimes.Select(t => Math.Exp(-t)).ToArray();
        var options = new PlotOptions { XScale = AxisScale.Log, Floor = new PlotFloor(1e-15) };

        var model = Plots.PopulationsModel(new PlotText("p", "time (s)", "population"), _logTimes,
            [new StateSeries("up", rising), new StateSeries("down", falling)], options);

        Assert.True(model.Y.IsLog);
        Assert.All(model.Layer("up")!.Ys, y => Assert.True(y >= 1e-15, $"{y} drawn below the floor"));
        Assert.Equal(_logTimes.Count(t => t >= 0.01), model.Layer("up")!.Segments.Sum(s => s.X.Length));
        Assert.Equal(1e-15, model.Floor);
        Assert.Equal([1e-15, 1e-15], model.Layer("floor")!.Ys);
        Assert.Contains(model.Legend, e => e.Label == "not resolved below 1e-15");
    }

    [Fact]
    public void CurveThatIsZeroEverywhere_IsLeftOutOfTheLegend_AndNamedInANote()
    {
        double[] coordinates = [1, 2, 3, 4];
        double[] noise = [0, -1e-32, 2e-33, 0];

        var model = Plots.DistributionsModel(new PlotText("d", "x (nm)", "population"), coordinates,
            [new Curve("initial", noise), new Curve("final", [0.4, 0.3, 0.2, 0.1])], new PlotOptions { Floor = new PlotFloor(1e-15) });

        Assert.DoesNotContain(model.Legend, e => e.Label == "initial");
        Assert.Null(model.Layer("initial"));
        Assert.Contains(model.Legend, e => e.Label == "final");
        Assert.Contains(model.Legend, e => e.Label.EndsWith("not drawn: initial", StringComparison.Ordinal));
    }

    [Fact]
    public void FloorLine_IsOnlyDrawnWhereACurveWasCut()
    {
        // Every value far above the floor: a floor line would only stretch the axis down to it.
        var model = Plots.DistributionsModel(new PlotText("d", "x", "population"), [1, 10, 100, 1000],
            [new Curve("final", [1, 1e-2, 1e-4, 1e-6])], new PlotOptions { Floor = new PlotFloor(1e-15) });

        Assert.True(model.Y.IsLog);
        Assert.Null(model.Layer("floor"));
        Assert.Null(model.Floor);
    }

    [Fact]
    public void Spectrum_PlotsEachModesLambdaDtAgainstTheEulerAndRk4Intervals()
    {
        // dt = 0.01: lambda dt = 0, -0.001, -1.5 (inside both), -2.5 (inside RK4's [-2.785, 0] only), -4 (outside both).
        Complex[] eigenvalues = [-400.0, 0.0, -0.1, -150.0, -250.0];

        var model = Plots.SpectrumModel(new PlotText("s", "mode", "|λ·dt|"), eigenvalues, dt: 0.01, zeroTolerance: 1e-9, PlotOptions.Default);

        Assert.Equal(new[] { 0.001, 1.5 }, model.Layer("stable for Euler and RK4")!.Ys, new Tolerance(1e-12));
        Assert.Equal(new[] { 2.5 }, model.Layer("stable for RK4 only")!.Ys, new Tolerance(1e-12));
        Assert.Equal(new[] { 4.0 }, model.Layer("unstable for both")!.Ys, new Tolerance(1e-12));
        // Mode numbers follow |lambda|: the zero mode is mode 1, lambda = -400 the last.
        Assert.Equal([5.0], model.Layer("unstable for both")!.Segments[0].X);
        Assert.True(model.IntegerX);
        Assert.True(model.Y.IsLog);
        Assert.Contains(model.Legend, e => e.Label.StartsWith("1 zero mode", StringComparison.Ordinal));

        // Forward Euler is stable for lambda dt in [-2, 0] on the real axis (common practice, textbook);
        // classical RK4 for lambda dt in [-2.7853, 0] (Hairer and Wanner, Solving ODEs I, sec. IV.2 stability domains).
        Assert.Equal([2.0, 2.0], model.Layer("Euler: λ·dt in [-2, 0]")!.Ys);
        var rk4 = Assert.Single(model.Layers, l => l.Name.StartsWith("RK4: λ·dt in [-2.79", StringComparison.Ordinal));
        Assert.All(rk4.Ys, y => Assert.Equal(2.7853, y, 1e-4));
    }

    [Fact]
    public void Spectrum_JudgesComplexModesByTheAmplificationFactor()
    {
        // On the imaginary axis forward Euler is never stable (|1 + i y| > 1) and classical RK4 is
        // stable up to |y| = 2 sqrt 2 (Hairer and Wanner, Solving ODEs II, sec. IV.2, from memory).
        Complex[] eigenvalues = [new(0, 250), new(0, -250), new(0, 300)];

        var model = Plots.SpectrumModel(new PlotText("s", "mode", "|λ·dt|"), eigenvalues, dt: 0.01, zeroTolerance: 1e-9, PlotOptions.Default);

        Assert.Equal(new[] { 2.5, 2.5 }, model.Layer("stable for RK4 only")!.Ys, new Tolerance(1e-12));
        Assert.Equal(new[] { 3.0 }, model.Layer("unstable for both")!.Ys, new Tolerance(1e-12));
        Assert.Contains(model.Legend, e => e.Label.StartsWith("complex λ", StringComparison.Ordinal));
    }

    [Fact]
    public void Boltzmann_EquilibriumPopulationsLieOnTheReferenceLineOfSlopeMinusOneOverKT()
    {
        // Boltzmann distribution n_i = N g_i exp(-E_i / kT) / Z, so ln(n_i / g_i) = ln(N / Z) - E_i / kT
        // (any statistical-mechanics textbook, common practice). pi is computed here independently in log space.
        double[] energies = [0.0, 0.3, 0.7, 1.6];
        double[] logWeights = [0.0, Math.Log(3), Math.Log(5), Math.Log(2)];
        const double kT = 0.4;
        const double total = 2.5;
        var logTerms = energies.Select((e, i) => logWeights[i] - e / kT).ToArray();
        var logZ = Math.Log(logTerms.Sum(Math.Exp));
        var logPi = logTerms.Select(v => v - logZ).ToArray();
        var populations = logPi.Select(v => total * Math.Exp(v)).ToArray();

        var model = Plots.BoltzmannModel(new PlotText("b", "E (eV)", "ln(n_i / g_i)"),
            new BoltzmannPoints("final", energies, logWeights, populations, logPi, kT, "eV"), new PlotOptions { Floor = new PlotFloor(1e-15) });

        var points = model.Layer("final")!.Segments.Single();
        var line = model.Layer("equilibrium")!.Segments.Single();
        var slope = (line.Y[1] - line.Y[0]) / (line.X[1] - line.X[0]);
        Assert.Equal(-1 / kT, slope, 1e-12);
        for (var i = 0; i < energies.Length; i++)
        {
            Assert.Equal(Math.Log(total) - logZ - energies[i] / kT, points.Y[i], 1e-12);
            Assert.Equal(line.Y[0] + slope * (points.X[i] - line.X[0]), points.Y[i], 1e-12);
        }

        Assert.False(model.X.IsLog);
        Assert.Contains(model.Legend, e => e.Label.StartsWith("equilibrium at kT = 0.4 eV: slope -1/kT = -2.5 per eV", StringComparison.Ordinal));
    }

    [Fact]
    public void PopulationMap_ColourBarNamesThePopulation_AndGreysWhatTheFloorHides()
    {
        double[] states = [1, 2, 3];
        double[][] populations = [[1, 0, 1e-20], [0.5, 0.3, 0.2], [0.4, 0.35, 0.25]];

        var map = PopulationMapModel.Build(new PlotText("m", "time (s)", "x (nm)", "population"), [0.0, 1.0, 2.0], states, populations,
            new PlotOptions { Floor = new PlotFloor(1e-15) });

        // The colour bar's ticks are populations (10^n), so its label is the population, not log10 of it.
        Assert.StartsWith("population (grey: ≤ 1e-15", map.ColourLabel, StringComparison.Ordinal);
        Assert.Equal(0.0, map.ColourHigh, 12);
        Assert.Equal(Math.Log10(0.2), map.ColourLow, 12);
        // Rows run from the top (largest coordinate): state 3 at t = 0 is 1e-20, below the floor.
        Assert.True(double.IsNaN(map.Intensities[0, 0]));
        Assert.Equal(0.0, map.Intensities[2, 0], 12);
        // The cells span the data: each sample's cell reaches halfway to its neighbours.
        Assert.Equal((-0.5, 2.5), (map.Columns.Low, map.Columns.High));
        Assert.Equal((0.5, 3.5), (map.Rows.Low, map.Rows.High));
    }

    [Fact]
    public void LongTitle_IsBrokenAfterTheDeckTitle()
    {
        var wrapped = PlotCanvas.WrapTitle("Relaxation of a six-level ladder at two temperatures (demo): populations", 62);

        Assert.Equal("Relaxation of a six-level ladder at two temperatures (demo):\npopulations", wrapped);
    }

    [Fact]
    public void TitleWhoseDeckPartIsTooLong_FillsTwoLinesInsteadOfThree()
    {
        var wrapped = PlotCanvas.WrapTitle("Collisional relaxation of a six-level ladder at two temperatures (fit demo): population map", 62);

        Assert.Equal(2, wrapped.Split('\n').Length);
        Assert.All(wrapped.Split('\n'), line => Assert.True(line.Length <= 62, line));
    }

    private sealed class Tolerance(double absolute) : IEqualityComparer<double>
    {
        public bool Equals(double x, double y) => Math.Abs(x - y) <= absolute;

        public int GetHashCode(double obj) => 0;
    }
}
