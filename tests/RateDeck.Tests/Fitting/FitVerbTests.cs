using RateDeck.Cli;
using RateDeck.Decks;
using RateDeck.Tests.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Fitting;

/// <summary>The `ratedeck fit` verb end to end: the fitted deck written back, files, exit codes and bad input.</summary>
public sealed class FitVerbTests
{
    [Trait("Through", "program")]
    [Fact]
    public void TheFittedDeckDiffersFromTheInputOnlyInTheFittedValues()
    {
        using var folder = new TempFolder();
        var deck = CopyMisra(folder);
        var (code, json, error) = FitRunner.Run(deck, folder.File("out"));
        Assert.True(code == ExitCodes.Success, error);
        var fitted = json.GetProperty("fitted_deck").GetString()!;
        var before = File.ReadAllLines(deck);
        var after = File.ReadAllLines(fitted);
        Assert.Equal(before.Length, after.Length);
        var changed = Enumerable.Range(0, before.Length).Where(k => before[k] != after[k]).ToList();
        Assert.Equal(2, changed.Count);
        Assert.All(changed, k => Assert.Matches(@"^(rate|scale) = [0-9.e+-]+ +# b[12], NIST start 1$", after[k]));
        var reread = DeckReader.Read(fitted, []);
        Assert.Equal(FitRunner.Value(json, "rate"), reread.Parameters["rate"].Value);
        Assert.Equal(FitRunner.Value(json, "scale"), reread.Parameters["scale"].Value);
        Assert.Contains("fit.png", Directory.GetFiles(folder.File("out")).Select(Path.GetFileName));
        Assert.Contains("correlation.csv", Directory.GetFiles(folder.File("out")).Select(Path.GetFileName));
    }

    [Trait("Through", "program")]
    [Fact]
    public void AFitStoppedByTheIterationLimitExitsSixAndWritesNoFittedDeck()
    {
        using var folder = new TempFolder();
        var deck = CopyMisra(folder);
        var (code, json, _) = FitRunner.Run(deck, folder.File("out"), "--set", "fit.max_iterations=2");
        Assert.Equal(ExitCodes.NotConverged, code);
        Assert.False(json.GetProperty("converged").GetBoolean());
        Assert.Equal(System.Text.Json.JsonValueKind.Null, json.GetProperty("fitted_deck").ValueKind);
        Assert.DoesNotContain(Directory.GetFiles(folder.Path), f => f.EndsWith(".fitted.toml", StringComparison.Ordinal));
    }

    [Trait("Through", "program")]
    [Fact]
    public void ADataColumnNamingNoStateOrObservableIsReportedAtItsLineAndColumn()
    {
        using var folder = new TempFolder();
        var deck = CopyMisra(folder);
        File.WriteAllText(folder.File("misra1a.csv"), "# data\nt,volum\n1,2\n");
        var (code, _, error) = CliRunner.Run("fit", deck, "--out", folder.File("out"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("misra1a.csv:2:3: column `volum` is neither a state label nor an observable", error);
        Assert.Contains("Did you mean `volume`?", error);
    }

    [Trait("Through", "program")]
    [Fact]
    public void ADeckWithoutAFitTableIsBadInput()
    {
        var (code, _, error) = CliRunner.Run("fit", CliRunner.DemoDeck("two-level.toml"));
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Contains("the deck has no [fit] table", error);
    }

    private static string CopyMisra(TempFolder folder)
    {
        File.Copy(FitRunner.Fixture("misra1a.csv"), folder.File("misra1a.csv"));
        File.Copy(FitRunner.Fixture("misra1a.toml"), folder.File("misra1a.toml"));
        return folder.File("misra1a.toml");
    }
}
