using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// A forward-Euler step above the positivity limit 1/max|K_ii| is an unsafe step for a
/// probability even when it is stable (issue 8 §2.6): I + dt K then has a negative diagonal entry,
/// so a population can go negative (common practice). The deck: two states 0.1 eV apart at
/// kT = 0.05 eV, downward rate 1 /s, upward completed as exp(-2) = 0.135 /s; rho = 1.135 /s, so
/// Euler is stable to 2/rho = 1.76 s but positive only to 1/max|K_ii| = 1 s. dt = 1.5 s lies between.
/// </summary>
public sealed class EulerPositivityTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private string WriteDeck()
    {
        var path = _folder.File("two-states.toml");
        File.WriteAllText(path, "format = 1\ntitle = \"positivity\"\n[units]\nenergy = \"eV\"\ntime = \"s\"\n[temperature]\nkT = 0.05\n"
            + "[states]\ncoordinates = [0.0, 0.1]\n[energies]\nvalues = [0.0, 0.1]\n[transfer]\nkind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"1\"\n"
            + "[initial]\nstate = 2\n[run]\nt_end = 6\noutputs = 4\n");
        return path;
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_EulerStepStableButAbovePositivityLimit_IsRefusedWithExitThree()
    {
        var (code, _, error) = CliRunner.Run("run", WriteDeck(), "--method", "euler", "--dt", "1.5", "--no-plots", "--out", _folder.File("out"));

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("positivity limit 1 s", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(_folder.File("out")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Stiffness_EulerStepStableButAbovePositivityLimit_IsUnsafeForTheMethodAskedFor()
    {
        var (code, output, _) = CliRunner.Run("stiffness", WriteDeck(), "--method", "euler", "--dt", "1.5");

        Assert.Equal(ExitCodes.UnsafeTimeStep, code);
        Assert.Contains("for the method asked for (euler) the step is UNSAFE", output, StringComparison.Ordinal);
        Assert.DoesNotContain("the deck's method", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_EulerStepWithinBothLimits_Runs()
    {
        var (code, _, error) = CliRunner.Run("run", WriteDeck(), "--method", "euler", "--dt", "0.5", "--no-plots", "--out", _folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
    }
}
