using RateDeck.Cli;
using RateDeck.Decks;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>Issue 8 section 5: initial populations from a CSV file of state (label or number) and population.</summary>
public sealed class InitialCsvTests
{
    /// <summary>
    /// A two-level deck as docs/deck-format.md describes it (levels 0.1 eV apart, degeneracies 1 and
    /// 3, kT = 0.05 eV, a measured downward rate of 2000 per second) whose [initial] table is
    /// <paramref name="initial"/>.
    /// </summary>
    private static string Deck(TempFolder folder, string name, string initial)
    {
        File.WriteAllText(folder.File("rates.csv"), "from,to,rate\nupper,ground,2000\n");
        File.WriteAllText(folder.File(name), $"""
            format = 1
            [units]
            energy = "eV"
            [temperature]
            kT = 0.05
            [states]
            labels = ["ground", "upper"]
            coordinates = [0.0, 0.1]
            [energies]
            values = [0.0, 0.1]
            [weights]
            values = [1, 3]
            [run]
            t_end = 2.0e-3
            outputs = 8
            [transfer]
            csv = "rates.csv"
            kind = "one_way"
            direction = "toward_smaller"
            [initial]
            {initial}
            """);
        return folder.File(name);
    }

    private static string[] DataRows(TempFolder folder, string deck, string output)
    {
        var (code, printed, error) = CliRunner.Run("run", deck, "--no-plots", "--out", folder.File(output));
        Assert.True(code == ExitCodes.Success, printed + error);
        return [.. File.ReadAllLines(folder.File($"{output}/populations-exact.csv")).Where(l => !l.StartsWith('#'))];
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_FromAnInitialCsv_IsTheRunWithTheSamePopulationsInline()
    {
        using var folder = new TempFolder();
        // One state by label, one by its one-based number, a comment and spaces as a user might write them.
        File.WriteAllText(folder.File("start.csv"), "# measured at t = 0\nstate,population\nground, 0.2\n2,0.8\n");
        var fromFile = DataRows(folder, Deck(folder, "file.toml", "csv = \"start.csv\""), "file");
        var inline = DataRows(folder, Deck(folder, "inline.toml", "values = [0.2, 0.8]"), "inline");

        Assert.Equal(inline, fromFile);

        // Two-level relaxation from P_upper(0) = 0.8 (textbook first-order kinetics, e.g. Atkins'
        // Physical Chemistry): P_upper(t) = P_eq + (0.8 - P_eq) exp(-(k_down + k_up) t), k_up = k_down 3 exp(-2).
        var kUp = 2000 * 3 * Math.Exp(-2);
        var rate = 2000 + kUp;
        var equilibriumUpper = kUp / rate;
        foreach (var row in ResultFiles.Rows(folder.File("file/populations-exact.csv")))
        {
            Assert.Equal(equilibriumUpper + (0.8 - equilibriumUpper) * Math.Exp(-rate * row[0]), row[2], 1e-12);
        }
    }

    [Fact]
    public void InitialCsv_ColumnsInAnyOrderAndStatesLeftOutStartEmpty()
    {
        using var folder = new TempFolder();
        File.WriteAllText(folder.File("start.csv"), "population,state\n0.5,upper\n");
        var deck = DeckReader.Read(Deck(folder, "deck.toml", "csv = \"start.csv\""), []);

        var given = Assert.IsType<PerStateValues>(Assert.IsType<InitialGiven>(deck.Initial).Source);
        Assert.Equal([0.0, 0.5], given.Values);
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("state,population\nground,0.2\n§uper,0.8\n", "unknown state `uper`. Did you mean `upper`? The states are ground, upper.")]
    [InlineData("state,population\nground,0.2\nupper,0.3\n§1,0.5\n", "the population of this state is already given on line 2; give each state once")]
    [InlineData("state,population\nground,§-0.2\n", "a population cannot be negative (-0.2); populations are >= 0")]
    [InlineData("state,population\nground,§lots\n", "`lots` is not a number; a population is written like 0.25")]
    [InlineData("state,population\n§3,0.5\n", "state number 3 does not exist; states are numbered 1..2")]
    [InlineData("state,§amount\n", "unknown column `amount`. The header must name the columns state,population.")]
    [InlineData("state,population\nground,0.2,§7\n", "this row has 3 cells; every row needs 2: state,population")]
    public void BadInitialCsv_IsAnErrorAtTheFileLineAndColumnOfTheCell(string markedCsv, string message)
    {
        using var folder = new TempFolder();
        var (text, line, column) = Decks.DeckScratch.Unmark(markedCsv);
        var csv = folder.File("start.csv");
        File.WriteAllText(csv, text);

        var (code, output, error) = CliRunner.Run("check", Deck(folder, "deck.toml", "csv = \"start.csv\""));

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal($"{csv}:{line}:{column}: {message}", (output + error).Trim());
    }
}
