using System.Text.Json;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Propagation;

/// <summary>
/// Against scipy.linalg.expm (SciPy 1.10.1, NumPy 1.24.2 from Debian; the versions are recorded in
/// the fixture), computed once by tests/reference/make_expm_fixtures.py into fixtures/expm.json,
/// and against the 60-digit reference the same script computes with Python's decimal module
/// (scaled Taylor series), which shows SciPy's own error: up to 3.5e-11 on these cases.
/// </summary>
public class ExpmFixtureTests
{
    public static TheoryData<string> CaseNames => new(Cases().Select(c => c.Name));

    [Fact]
    public void Fixture_RecordsTheReferenceLibraryVersions()
    {
        using var document = JsonDocument.Parse(File.ReadAllText(FixturePath));
        Assert.Equal("scipy.linalg.expm", document.RootElement.GetProperty("reference_function").GetString());
        Assert.Equal("1.10.1", document.RootElement.GetProperty("scipy").GetString());
        Assert.Equal("1.24.2", document.RootElement.GetProperty("numpy").GetString());
    }

    [Theory]
    [MemberData(nameof(CaseNames))]
    public void PadeExponential_MatchesSciPyExpm(string name)
    {
        var fixture = Cases().Single(c => c.Name == name);
        var k = DenseMatrix.OfRowArrays(fixture.Generator);
        for (var n = 0; n < fixture.Times.Length; n++)
        {
            var exponential = MatrixExponential.Pade((DenseMatrix)(k * fixture.Times[n]), TestProvider.Selected);
            var scipy = DenseMatrix.OfRowArrays(fixture.Exponentials[n]);
            var exact = DenseMatrix.OfRowArrays(fixture.ExactExponentials[n]);
            var scale = exact.L1Norm();

            var error = (exponential - exact).L1Norm() / scale;
            var tolerance = SquaringTolerance((DenseMatrix)(k * fixture.Times[n]));
            Assert.True(error <= tolerance, $"{name} at t = {fixture.Times[n]}: {error} from the 60-digit value, allowed {tolerance}");
            Assert.True((exponential - scipy).L1Norm() <= 1e-10 * scale, $"{name} at t = {fixture.Times[n]} from SciPy");
        }
    }

    [Theory]
    [MemberData(nameof(CaseNames))]
    public void ChosenAndPadePropagators_MatchSciPyPopulations(string name)
    {
        var fixture = Cases().Single(c => c.Name == name);
        var rates = TestRates.FromRows(fixture.Generator, fixture.Pumping);

        // The columns of the fixture's K sum to rounding (about 1e-14), read as tiny losses: the slow
        // mode they make is below the solver's accuracy but cannot move over the run, so the choice
        // is made for the run's horizon.
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), horizon: fixture.Times.Max());

        // The path decision agrees with NumPy's own eigenvector condition number (1-norm, unit columns).
        var expectedPath = fixture.NumpyCondition >= ExactPropagatorChoice.ConditionThreshold ? "pade-exponential" : "general-eigen";
        Assert.Equal(expectedPath, chosen.Name);

        var scipy = new Trajectory(fixture.Times, fixture.Populations);
        var exact = new Trajectory(fixture.Times, fixture.ExactPopulations);
        var k = DenseMatrix.OfRowArrays(fixture.Generator);
        foreach (var propagator in new[] { chosen, new PadeExponentialPropagator(rates, TestProvider.Selected) })
        {
            var trajectory = propagator.Propagate(fixture.Initial, fixture.Times);
            var fromExact = TrajectoryComparison.Compare(exact, trajectory);
            // The eigen path: rounding of about cond(V) eps, times the eigenvector sensitivity
            // rho / gap, which reaches ~100 on the stiff case.
            var tolerance = propagator is GeneralEigenPropagator general
                ? 1e-12 * Math.Max(1, general.EigenvectorCondition)
                : SquaringTolerance((DenseMatrix)(k * fixture.Times[^1]));
            Assert.True(fromExact.MaxRelativeToTotal <= tolerance, $"{name} by {propagator.Name} from the 60-digit value: {fromExact}");
            var fromScipy = TrajectoryComparison.Compare(scipy, trajectory);
            Assert.True(fromScipy.MaxRelativeToTotal <= 1e-10, $"{name} by {propagator.Name} from SciPy: {fromScipy}");
        }
    }

    [Fact]
    public void NearlyDefectiveChain_TakesPadePathAndQuotesCondition()
    {
        var fixture = Cases().Single(c => c.Name == "nearly_defective3");
        var rates = TestRates.FromRows(fixture.Generator, fixture.Pumping);
        var general = new GeneralEigenPropagator(rates, new ManagedLinearAlgebra());
        var chosen = ExactPropagatorChoice.Choose(rates, new ManagedLinearAlgebra(), horizon: fixture.Times.Max());

        // Three eigenvalues within 2e-7: the eigenvector matrix is about 1 / (1e-7)^2 from singular
        // (NumPy gives 2e14 for the same matrix).
        Assert.True(general.EigenvectorCondition >= 1e12, $"condition {general.EigenvectorCondition}");
        Assert.Equal("pade-exponential", chosen.Name);
        Assert.Contains("condition estimate", chosen.Reason, StringComparison.Ordinal);
        Assert.Contains(">= 1e8", chosen.Reason, StringComparison.Ordinal);
    }

    /// <summary>
    /// 4 N eps 2^s for s = ceil(log2(||A||_1 / theta_13)) squarings: each squaring of a non-negative
    /// matrix doubles the relative error of its entries and adds about N eps (rounding of a matrix
    /// product, Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., section 3.5).
    /// </summary>
    private static double SquaringTolerance(DenseMatrix a)
    {
        var squarings = Math.Max(0, Math.Ceiling(Math.Log2(a.L1Norm() / 5.371920351148152)));
        return 4 * a.RowCount * 2.220446049250313e-16 * Math.Pow(2, squarings);
    }

    private static string FixturePath => Path.Combine(AppContext.BaseDirectory, "fixtures", "expm.json");

    private static IEnumerable<ExpmCase> Cases()
    {
        using var document = JsonDocument.Parse(File.ReadAllText(FixturePath));
        return document.RootElement.GetProperty("cases").EnumerateArray().Select(c => new ExpmCase(
            c.GetProperty("name").GetString()!,
            Rows(c.GetProperty("generator")),
            Vector(c.GetProperty("pumping")),
            Vector(c.GetProperty("initial")),
            Vector(c.GetProperty("times")),
            c.GetProperty("exponentials").EnumerateArray().Select(Rows).ToArray(),
            Rows(c.GetProperty("populations")),
            c.GetProperty("exponentials_decimal60").EnumerateArray().Select(Rows).ToArray(),
            Rows(c.GetProperty("populations_decimal60")),
            c.GetProperty("numpy_eigenvector_condition_1norm") is { ValueKind: JsonValueKind.Number } condition
                ? condition.GetDouble()
                : double.PositiveInfinity)).ToList();
    }

    private static double[] Vector(JsonElement element) => element.EnumerateArray().Select(e => e.GetDouble()).ToArray();

    private static double[][] Rows(JsonElement element) => element.EnumerateArray().Select(Vector).ToArray();

    private sealed record ExpmCase(
        string Name,
        double[][] Generator,
        double[] Pumping,
        double[] Initial,
        double[] Times,
        double[][][] Exponentials,
        double[][] Populations,
        double[][][] ExactExponentials,
        double[][] ExactPopulations,
        double NumpyCondition);
}
