using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>From the verb down to the exact propagator's choice: the balance report decides the path, not a bare number.</summary>
public sealed class PropagatorChoiceTests
{
    [Trait("Through", "program")]
    [Fact]
    public void Run_OnFullMatrixBalancedForAnotherEquilibrium_AvoidsTheSymmetricPathAndConservesMass()
    {
        using var folder = new TempFolder();
        var deck = WriteDeck(folder);

        var (code, output, error) = CliRunner.Run("run", deck, "--json", "--no-plots", "--out", folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
        var root = JsonDocument.Parse(output).RootElement;
        Assert.NotEqual("symmetric-eigen", root.GetProperty("propagator").GetString());
        Assert.Contains("no detailed balance for the deck's pi", root.GetProperty("propagator_reason").GetString(), StringComparison.Ordinal);

        // K = J - 3 I with J the all-ones matrix; J^2 = 3 J gives exp(K t) = e^(-3t) I + (1 - e^(-3t)) J / 3
        // (derived by hand; a doubly stochastic generator relaxes to the uniform law, a known result).
        // From all mass in a: P_a = 1/3 + 2/3 e^(-3t), P_b = P_c = 1/3 - 1/3 e^(-3t).
        var rows = ResultFiles.Rows(Path.Combine(folder.File("out"), "populations-exact.csv"));
        Assert.Equal(21, rows.Length);
        foreach (var cells in rows)
        {
            var decay = Math.Exp(-3 * cells[0]);
            Assert.Equal((1.0 / 3) + (2.0 / 3 * decay), cells[1], 1e-12);
            Assert.Equal((1.0 / 3) - (decay / 3), cells[2], 1e-12);
            Assert.Equal((1.0 / 3) - (decay / 3), cells[3], 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_OnFullMatrixBalancedForAnotherEquilibrium_FailsTheEquilibriumCheck()
    {
        using var folder = new TempFolder();
        var deck = WriteDeck(folder);

        var (code, output, _) = CliRunner.Run("check", deck, "--json");

        Assert.Equal(ExitCodes.CheckFailed, code);
        var checks = JsonDocument.Parse(output).RootElement.GetProperty("checks").EnumerateArray();
        Assert.Contains(checks, c => c.GetProperty("name").GetString() == "equilibrium" && !c.GetProperty("passed").GetBoolean());
    }

    /// <summary>
    /// Three states, every off-diagonal rate 1 in a full measured matrix, deck energies 0, 1, 2 at
    /// kT = 1. The matrix is balanced (it is symmetric), but for the uniform law, not for the
    /// deck's Boltzmann law, so S = D^(-1/2) K D^(1/2) built with the deck's pi is not symmetric.
    /// </summary>
    private static string WriteDeck(TempFolder folder) => ResultFiles.FullMatrixDeck(folder, "uniform", "[0, 1, 2]",
        "a,b,1\nb,a,1\na,c,1\nc,a,1\nb,c,1\nc,b,1\n", "[initial]\nstate = \"a\"\n[run]\nt_end = 5\noutputs = 20\nspacing = \"linear\"");
}
