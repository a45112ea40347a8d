using RateDeck.Diagnostics;
using RateDeck.Pipeline;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

/// <summary>
/// The extremes-only spectrum of a sparse tridiagonal deck gives the same spectral radius, slowest
/// rate and zero count as the whole spectrum, and both agree with the closed form of the uniform
/// birth-death chain (<see cref="UniformLadder"/>), with the provider under test.
/// </summary>
public sealed class ExtremesSpectrumTests
{
    private const int _count = 2000;
    private const double _slope = 1e-3;

    [Fact]
    public void ExtremesOnly_GivesTheWholeSpectrumsRadiusSlowestRateAndZeros()
    {
        var rates = LoadLadder();
        var balance = DetailedBalance.Analyze(rates);

        var whole = Spectrum.Compute(rates, TestProvider.Selected, balance, SpectrumExtent.Full);
        var extremes = Spectrum.Compute(rates, TestProvider.Selected, balance, SpectrumExtent.Extremes);

        Assert.False(whole.IsPartial);
        Assert.True(extremes.IsPartial);
        Assert.Equal(_count, extremes.ModeCount);
        Assert.Equal([.. Enumerable.Range(1, 8), .. Enumerable.Range(_count - 8, 9)], extremes.ModeNumbers);
        var rho = UniformLadder.SpectralRadius(_count, _slope);
        Assert.Equal(rho, whole.SpectralRadius, rho * 1e-12);
        Assert.Equal(rho, extremes.SpectralRadius, rho * 1e-12);
        var slowest = UniformLadder.SlowestRate(_count, _slope);
        Assert.Equal(slowest, whole.SlowestRate!.Value, slowest * 1e-9);
        Assert.Equal(slowest, extremes.SlowestRate!.Value, slowest * 1e-9);
        Assert.Equal(1, whole.NullDimension);
        Assert.Equal(1, extremes.NullDimension);
        Assert.Equal(0, extremes.NonDecayingCount);
        // The k-th computed mode from the top is the k-th slowest: mode N - k holds eigenvalue k of the closed form.
        for (var k = 1; k <= 8; k++)
        {
            var expected = UniformLadder.Eigenvalue(_count, _slope, k);
            Assert.True(Math.Abs(extremes.ReportedValues[^(k + 1)].Real - expected) <= 1e-9 * Math.Abs(expected) + 1e-12, $"mode {_count - k}: {extremes.ReportedValues[^(k + 1)].Real:R} vs {expected:R}");
        }
    }

    [Fact]
    public void Automatic_UpToTheLimit_ComputesEveryEigenvalue()
    {
        var spectrum = Spectrum.Compute(LoadLadder(), TestProvider.Selected);

        Assert.Null(spectrum.Coverage);
        Assert.Equal(_count, spectrum.Values.Length);
    }

    /// <summary>The ladder deck written to a file and loaded as the CLI would, with the provider under test.</summary>
    private static RateDeck.Rates.RateMatrix LoadLadder()
    {
        using var folder = new TempFolder();
        var path = folder.File("ladder.toml");
        File.WriteAllText(path, UniformLadder.Deck(_count, _slope, endTime: 1e6, outputs: 4));
        return DeckPipeline.Load(path, [], TestProvider.Selected).Rates;
    }
}
