using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Issue 8 section 2, items 3, 4, 5 and 7: what `check` and `run` say about full matrices without a
/// stated pi, classes with losses, one-way edges, the first and the grid rows of a trajectory, and
/// completed rates that dwarf their partners. Decks are written as a user would, from docs/deck-format.md.
/// </summary>
public sealed class TrustworthyAnswersTests
{
    private const int _balls = 6;

    /// <summary>
    /// Continuous-time Ehrenfest urn with m balls (Kac, Amer. Math. Monthly 54 (1947) 369): from n
    /// balls in the first urn, n -> n - 1 at rate n and n -> n + 1 at rate m - n; its stationary law
    /// is Binomial(m, 1/2), C(m, n) / 2^m.
    /// </summary>
    private static string EhrenfestDeck(TempFolder folder, string extra = "")
    {
        var rows = new List<string> { "from,to,rate" };
        for (var n = 0; n <= _balls; n++)
        {
            if (n > 0)
            {
                rows.Add($"{n + 1},{n},{n}");
            }

            if (n < _balls)
            {
                rows.Add($"{n + 1},{n + 2},{_balls - n}");
            }
        }

        File.WriteAllLines(folder.File("urn.csv"), rows);
        var coordinates = string.Join(", ", Enumerable.Range(0, _balls + 1));
        File.WriteAllText(folder.File("urn.toml"), $"""
            format = 1
            title = "Ehrenfest urn"

            [temperature]
            kT = 1.0

            [states]
            coordinates = [{coordinates}]
            {extra}
            [transfer]
            kind = "full"
            csv = "urn.csv"

            [initial]
            state = 1

            [run]
            t_end = 3.0
            outputs = 6
            """);
        return folder.File("urn.toml");
    }

    private static double Binomial(int m, int n)
    {
        var c = 1.0;
        for (var k = 1; k <= n; k++)
        {
            c = c * (m - n + k) / k;
        }

        return c;
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_FullMatrixWithoutEnergiesOrWeights_ReportsItsOwnStationaryLawAndPasses()
    {
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("check", EhrenfestDeck(folder), "--json", "--out", folder.Path);

        Assert.True(code == ExitCodes.Success, output + error);
        var root = JsonDocument.Parse(output).RootElement;
        Assert.Equal(JsonValueKind.Null, root.GetProperty("equilibrium_compared_with").ValueKind);
        var law = root.GetProperty("stationary_laws")[0].EnumerateArray().Select(e => e.GetDouble()).ToArray();

        // Binomial(6, 1/2) (Kac 1947): 1, 6, 15, 20, 15, 6, 1 over 64.
        Assert.Equal(_balls + 1, law.Length);
        for (var n = 0; n <= _balls; n++)
        {
            Assert.Equal(Binomial(_balls, n) / Math.Pow(2, _balls), law[n], 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_FullMatrixWithWeights_ComparesWithTheDecksPiAndSaysWhichPartsItCameFrom()
    {
        using var folder = new TempFolder();
        var binomialWeights = string.Join(", ", Enumerable.Range(0, _balls + 1).Select(n => Binomial(_balls, n).ToString(CultureInfo.InvariantCulture)));
        var deck = EhrenfestDeck(folder, $"\n[weights]\nvalues = [{binomialWeights}]\n");

        // Weights C(m, n) with no energies make pi the binomial law, the urn's own (Kac 1947).
        var (code, output, _) = CliRunner.Run("check", deck, "--out", folder.Path);
        Assert.Equal(ExitCodes.Success, code);
        Assert.Contains("the deck's pi (from its weights, energies all 0) agrees with the null vector", output, StringComparison.Ordinal);

        // Energies all 0 stated explicitly are a claim of a uniform pi, which the urn does not have.
        var zeros = string.Join(", ", Enumerable.Repeat("0", _balls + 1));
        var uniform = EhrenfestDeck(folder, $"\n[energies]\nvalues = [{zeros}]\n");
        var (failed, text, _) = CliRunner.Run("check", uniform, "--out", folder.Path);
        Assert.Equal(ExitCodes.CheckFailed, failed);
        Assert.Contains("the deck's pi (from its energies, weights all 1) differs from the null vector", text, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_EquilibriumLine_MeasuresOnlyLossFreeClassesAndNamesTheOthers()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("pairs.csv"), "from,to,rate\nb,a,2.0\nd,c,1.0\n");
        File.WriteAllText(folder.File("pairs.toml"), """
            format = 1
            [temperature]
            kT = 1.0
            [states]
            coordinates = [0, 1, 2, 3]
            labels = ["a", "b", "c", "d"]
            [energies]
            values = [0, 1, 0, 1]
            [transfer]
            kind = "one_way"
            direction = "toward_smaller"
            csv = "pairs.csv"
            [losses]
            by_state = { d = 0.5 }
            [run]
            t_end = 1.0
            """);

        var (code, output, _) = CliRunner.Run("check", folder.File("pairs.toml"), "--json", "--out", folder.Path);

        Assert.Equal(ExitCodes.Success, code);
        var equilibrium = JsonDocument.Parse(output).RootElement.GetProperty("checks").EnumerateArray()
            .Single(c => c.GetProperty("name").GetString() == "equilibrium").GetProperty("detail").GetString()!;
        Assert.Contains("1 class with loss has no stationary law and is not compared", equilibrium, StringComparison.Ordinal);

        // The figure quoted is the loss-free class's agreement, so it is within the quoted tolerance.
        var figures = System.Text.RegularExpressions.Regex.Match(equilibrium, @"to (\S+) \(tolerance (\S+)\)");
        Assert.True(figures.Success, equilibrium);
        Assert.True(double.Parse(figures.Groups[1].Value, CultureInfo.InvariantCulture) <= double.Parse(figures.Groups[2].Value, CultureInfo.InvariantCulture), equilibrium);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_FullMatrixWithOneWayEdges_SaysWhyThereIsNoBalanceInsteadOfNaN()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("ring.csv"), "from,to,rate\n3,2,1\n2,1,1\n1,3,0.2\n");
        File.WriteAllText(folder.File("ring.toml"), """
            format = 1
            [temperature]
            kT = 1.0
            [states]
            coordinates = [0, 1, 2]
            [transfer]
            kind = "full"
            csv = "ring.csv"
            [initial]
            state = 3
            [run]
            t_end = 2.0
            outputs = 4
            """);

        var (code, output, error) = CliRunner.Run("run", folder.File("ring.toml"), "--no-plots", "--out", folder.File("out"));

        Assert.True(code == ExitCodes.Success, error);
        Assert.DoesNotContain("NaN", output, StringComparison.Ordinal);
        Assert.Contains("no detailed balance: 3 one-way edges (rate one way, none back)", output, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_ExactTrajectory_StartsAtExactlyPZeroAtTheDecksOwnTimes()
    {
        using var folder = new TempFolder();
        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("three-level.toml"), "--no-plots", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, error);

        // decks/three-level.toml: all population in "upper"; t_first = 1.0e-8, t_end = 1.0e-4 (the deck's numbers).
        var rows = DataRows(folder.File("populations-exact.csv"));
        Assert.Equal(["0", "0", "0", "1"], rows[0]);
        Assert.Equal("1E-08", rows[1][0]);
        Assert.Equal("0.0001", rows[^1][0]);

        // A linear grid of 50 outputs to 5e-3 s (decks/two-level.toml) lands on multiples of 1e-4 as written.
        var (linear, _, linearError) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--no-plots", "--out", folder.File("two"));
        Assert.True(linear == ExitCodes.Success, linearError);
        var times = DataRows(folder.File("two/populations-exact.csv")).Select(r => r[0]).ToArray();
        var expected = Enumerable.Range(0, 51).Select(k => (k / 1e4).ToString("R", CultureInfo.InvariantCulture)).ToArray();
        Assert.Equal(expected, times);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("stiff-three.toml", "0,0,0,1")]
    [InlineData("stiff-six.toml", "0,0,0,0,0,0,1")]
    public void Run_StiffDeckOnTheDoubleDoublePath_StartsAtExactlyPZero(string deck, string startRow)
    {
        // The stiff demos start with all population in their top state (decks/stiff-*.toml) and
        // propagate in double-double, whose round trip through the eigenbasis leaves 1e-32 noise.
        using var folder = new TempFolder();
        var (code, output, error) = CliRunner.Run("run", CliRunner.DemoDeck(deck), "--no-plots", "--out", folder.Path);
        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("double-double", output, StringComparison.Ordinal);

        var rows = DataRows(folder.File("populations-exact.csv"));
        Assert.Equal(startRow, string.Join(",", rows[0]));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Check_HugeCompletedRate_IsNamedWithItsPairAndBoltzmannFactor()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("uphill.csv"), "from,to,rate\na,b,1e-25\nb,c,1\n");
        File.WriteAllText(folder.File("uphill.toml"), """
            format = 1
            [temperature]
            kT = 1.0
            [states]
            coordinates = [0, 1, 2]
            labels = ["a", "b", "c"]
            [energies]
            values = [0, 200, 201]
            [transfer]
            kind = "one_way"
            direction = "toward_larger"
            csv = "uphill.csv"
            [initial]
            state = "a"
            [run]
            t_end = 1.0
            """);

        var (_, output, _) = CliRunner.Run("check", folder.File("uphill.toml"), "--out", folder.Path);
        Assert.Contains("the completed rate b -> a is 7.23e61 /s", output, StringComparison.Ordinal);
        Assert.Contains("e^200 = 7.23e86", output, StringComparison.Ordinal);

        // e^200 = 7.2259737681257...e86 (mpmath, 30 digits, exp(200)); the completed rate is 1e-25 times it.
        var loaded = DeckPipeline.Load(folder.File("uphill.toml"), [], new ManagedLinearAlgebra());
        var (listed, count) = LargeCompletedRates.Find(loaded.Rates, loaded.Deck.Coupling);
        Assert.Equal(1, count);
        Assert.Equal(("b", "a"), (listed[0].From, listed[0].To));
        Assert.Equal(7.2259737681257e61, listed[0].Rate, 7.2259737681257e61 * 1e-12);
        Assert.Equal(200, listed[0].LogBoltzmannFactor, 1e-12);

        // The pair c -> b (factor e^1) is not flagged.
        Assert.DoesNotContain(listed, f => f.From == "c");
    }

    private static string[][] DataRows(string path) =>
        [.. File.ReadAllLines(path).Where(l => !l.StartsWith('#')).Skip(1).Select(l => l.Split(','))];
}
