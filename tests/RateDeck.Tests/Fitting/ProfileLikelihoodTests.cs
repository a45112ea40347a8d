using System.Text.Json;
using MathNet.Numerics.Distributions;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Fitting;

/// <summary>
/// Profile-likelihood intervals through `ratedeck fit` with `fit.profile = true`: against a SciPy
/// profile of NIST StRD Misra1a (tests/reference/make_profile_fixtures.py, SciPy 1.10.1: the
/// profile RSS re-minimised over the other parameter, its crossing of the F-based threshold found
/// by brentq), and, for a model linear in its parameters, against the covariance interval
/// estimate -+ t(dof) standard errors, which the F-based profile interval equals exactly for such a
/// model (Bates and Watts, Nonlinear Regression Analysis and Its Applications, 1988, section 6.1;
/// from memory).
/// </summary>
public sealed class ProfileLikelihoodTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("0.95")]
    [InlineData("0.6827")]
    public void Misra1aProfileIntervalsMatchTheScipyProfile(string level)
    {
        using var folder = new TempFolder();
        var (code, json, error) = FitRunner.Run(FitRunner.Fixture("misra1a.toml"), folder.Path, "--set", "fit.profile=true", "--set", $"fit.profile_level={level}");
        Assert.True(code == ExitCodes.Success, error);
        using var document = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "profile-misra1a.json")));
        var reference = document.RootElement.GetProperty("levels").GetProperty(level).GetProperty("intervals");
        foreach (var name in new[] { "scale", "rate" })
        {
            var estimate = FitRunner.Value(json, name);
            var parameter = json.GetProperty("parameters").GetProperty(name);
            var (lower, upper) = (reference.GetProperty(name)[0].GetDouble(), reference.GetProperty(name)[1].GetDouble());
            // 1e-6 of each end's distance from the estimate (a stricter test than 1e-6 of the value).
            Assert.True(Math.Abs(parameter.GetProperty("profile_lower").GetDouble() - lower) <= 1e-6 * (estimate - lower), $"{name} lower end {parameter.GetProperty("profile_lower").GetDouble():R}, SciPy {lower:R}");
            Assert.True(Math.Abs(parameter.GetProperty("profile_upper").GetDouble() - upper) <= 1e-6 * (upper - estimate), $"{name} upper end {parameter.GetProperty("profile_upper").GetDouble():R}, SciPy {upper:R}");
            // Misra1a bends: the interval is asymmetric (the SciPy ends are, by more than the tolerance).
            Assert.True(Math.Abs((upper - estimate) - (estimate - lower)) > 1e-4 * (upper - lower));
        }

        Assert.Contains("F(", json.GetProperty("profile_rule").GetString(), StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void ForAModelLinearInItsParametersTheProfileIntervalIsTheCovarianceInterval()
    {
        // Lanczos3 with its three decay rates held at NIST's certified values: y = sum b_i exp(-k_i t) is linear in the b_i.
        using var folder = new TempFolder();
        var deck = folder.File("linear.toml");
        var text = File.ReadAllText(FitRunner.Fixture("lanczos3.toml"))
            .Replace("by_state = { s1 = 0.3, s2 = 5.5, s3 = 7.6 }", "by_state = { s1 = 9.5498101505E-01, s2 = 2.9515951832E+00, s3 = 4.9863565084E+00 }", StringComparison.Ordinal);
        text = string.Join('\n', text.Split('\n').Where(line => !line.StartsWith("\"loss.", StringComparison.Ordinal)));
        File.WriteAllText(deck, text);
        File.Copy(FitRunner.Fixture("lanczos3.csv"), folder.File("lanczos3.csv"));
        var (code, json, error) = FitRunner.Run(deck, folder.File("out"), "--set", "fit.profile=true");
        Assert.True(code == ExitCodes.Success, error);
        var dof = json.GetProperty("dof").GetInt32();
        Assert.Equal(21, dof);
        var t = StudentT.InvCDF(0, 1, dof, 0.975);
        foreach (var name in new[] { "initial.s1", "initial.s2", "initial.s3" })
        {
            var parameter = json.GetProperty("parameters").GetProperty(name);
            var (value, halfWidth) = (parameter.GetProperty("value").GetDouble(), t * parameter.GetProperty("std_error").GetDouble());
            Assert.True(Math.Abs(parameter.GetProperty("profile_lower").GetDouble() - (value - halfWidth)) <= 1e-6 * halfWidth, $"{name} lower end {parameter.GetProperty("profile_lower").GetDouble():R}, covariance {value - halfWidth:R}");
            Assert.True(Math.Abs(parameter.GetProperty("profile_upper").GetDouble() - (value + halfWidth)) <= 1e-6 * halfWidth, $"{name} upper end {parameter.GetProperty("profile_upper").GetDouble():R}, covariance {value + halfWidth:R}");
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void AProfileLevelOutsideZeroToOneIsABadInputAtItsColumn()
    {
        using var folder = new TempFolder();
        var (code, _, error) = FitRunner.Run(FitRunner.Fixture("misra1a.toml"), folder.Path, "--set", "fit.profile=true", "--set", "fit.profile_level=95");
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("fit.profile_level", error, StringComparison.Ordinal);
        Assert.Contains("between 0 and 1", error, StringComparison.Ordinal);
    }
}
