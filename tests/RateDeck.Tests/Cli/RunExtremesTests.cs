using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// <c>run</c> at the edges found by trying bad input (issue 9 §8): no rate at all, steps that
/// could never be counted, times and pumping near the largest double. Each ends in a correct
/// result or a plain refusal with a documented exit code, never "internal error" or NaN.
/// </summary>
public sealed class RunExtremesTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private string WriteDeck(string states, string energies, string transfer, string extra = "", string tEnd = "1")
    {
        var path = _folder.File("deck.toml");
        File.WriteAllText(path, $"format = 1\ntitle = \"edge\"\n[units]\nenergy = \"eV\"\ntime = \"s\"\n[temperature]\nkT = 0.05\n[states]\ncoordinates = {states}\n[energies]\nvalues = {energies}\n[transfer]\n{transfer}\n{extra}\n[initial]\nstate = 1\n[run]\nt_end = {tEnd}\noutputs = 5\n");
        return path;
    }

    private const string _unitKernel = "kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"1\"";

    public static TheoryData<string, string, string> NoRateDecks() => new()
    {
        { "[0.0]", "[0.0]", _unitKernel },
        { "[0.0, 0.1]", "[0.0, 0.1]", "kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"0\"" },
        { "[0.0, 0.1, 0.2]", "[0.0, 0.1, 0.2]", "kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"0 * exp(x - y)\"\n[losses]\nvalues = [0, 0, 0]" },
    };

    [Trait("Through", "program")]
    [Theory]
    [MemberData(nameof(NoRateDecks))]
    public void AutomaticStep_WithoutAnyRate_RunsAndNothingMoves(string states, string energies, string transfer)
    {
        var deck = WriteDeck(states, energies, transfer);
        var (code, output, error) = CliRunner.Run("run", deck, "--dt", "auto", "--no-plots", "--json", "--out", _folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        // Conservation (common practice: K's columns sum to zero) keeps the total at 1 exactly here.
        Assert.Equal(1.0, root.GetProperty("final_total_population").GetDouble(), 12);
        // dP/dt = 0: explicit and exact both stay at P(0) exactly.
        Assert.Equal(0.0, root.GetProperty("max_abs_difference").GetDouble());
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("1e-300")]
    [InlineData("1e-310")]
    public void StepNeedingMoreThan1e15Steps_IsRefusedWithExitThree(string dt)
    {
        var deck = WriteDeck("[0.0, 0.1]", "[0.0, 0.1]", _unitKernel);
        var (code, _, error) = CliRunner.Run("run", deck, "--dt", dt, "--out", _folder.File("out"));

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("more than 1e15 explicit steps", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(_folder.File("out")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void RateNear1e308_WithAutomaticStep_DeclinesExplicitAndReachesTheBoltzmannEquilibrium()
    {
        var deck = WriteDeck("[0.0, 0.1]", "[0.0, 0.1]", "kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"1e308\"");
        var output = _folder.File("out");
        var (code, printed, error) = CliRunner.Run("run", deck, "--no-plots", "--out", output);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("explicit     declined", printed, StringComparison.Ordinal);
        var last = File.ReadLines(Path.Combine(output, "populations-exact.csv")).Last().Split(',');
        // Relaxed at once: P2/P1 = exp(-(0.1 - 0) / 0.05) = exp(-2) with equal weights (common practice).
        var ratio = double.Parse(last[2], System.Globalization.CultureInfo.InvariantCulture) / double.Parse(last[1], System.Globalization.CultureInfo.InvariantCulture);
        Assert.Equal(Math.Exp(-2), ratio, 1e-12);
    }

    [Trait("Through", "program")]
    [Fact]
    public void EndTimeNear1e308_ExactOnly_ReachesTheBoltzmannEquilibrium()
    {
        var deck = WriteDeck("[0.0, 0.1]", "[0.0, 0.1]", _unitKernel, tEnd: "1e308");
        var output = _folder.File("out");
        var (code, _, error) = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", output);

        Assert.True(code == ExitCodes.Success, error);
        var last = File.ReadLines(Path.Combine(output, "populations-exact.csv")).Last().Split(',');
        Assert.Equal(1e308, double.Parse(last[0], System.Globalization.CultureInfo.InvariantCulture));
        // Boltzmann: P2/P1 = exp(-(0.1 - 0) / 0.05) = exp(-2) with equal weights (common practice).
        var ratio = double.Parse(last[2], System.Globalization.CultureInfo.InvariantCulture) / double.Parse(last[1], System.Globalization.CultureInfo.InvariantCulture);
        Assert.Equal(Math.Exp(-2), ratio, 1e-12);
    }

    [Trait("Through", "program")]
    [Fact]
    public void PumpingNear1e308_IsRefusedInsteadOfPrintingNaN()
    {
        var deck = WriteDeck("[0.0, 0.1]", "[0.0, 0.1]", _unitKernel, extra: "[pumping]\nexpression = \"1e308\"");
        var (code, output, error) = CliRunner.Run("run", deck, "--no-plots", "--out", _folder.File("out"));

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("overflows the largest double", error, StringComparison.Ordinal);
        Assert.DoesNotContain("NaN", output + error, StringComparison.Ordinal);
    }
}
