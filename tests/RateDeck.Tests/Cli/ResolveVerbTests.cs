using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// `ratedeck resolve DECK` (issue 9 §3): the deck with every default written out is TOML that checks
/// as the deck does and whose run writes byte-identical CSV files; only the provenance lines naming
/// the deck file, its hash and the overrides differ, as they must.
/// </summary>
public sealed class ResolveVerbTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("two-level.toml")]
    [InlineData("three-level.toml")]
    [InlineData("cascade.toml")]
    [InlineData("pendulum-ladder.toml")]
    [InlineData("stiff-three.toml")]
    public void ResolvedDeck_ChecksTheSame_AndItsRunWritesByteIdenticalCsvFiles(string name)
    {
        using var folder = new TempFolder();
        var deck = CopyDemoDecks(folder, name);

        var (resolvedDeck, resolveError) = Resolve(deck, []);

        Assert.True(resolvedDeck is not null, resolveError);
        Assert.Equal(CliRunner.Run("check", deck).ExitCode, CliRunner.Run("check", resolvedDeck).ExitCode);
        AssertSameRun(folder, deck, [], resolvedDeck);
    }

    [Trait("Through", "program")]
    [Fact]
    public void ResolvedDeck_CarriesTheOverrides_SoItRunsAsTheDeckWithThem()
    {
        using var folder = new TempFolder();
        var deck = CopyDemoDecks(folder, "cascade.toml");
        string[] overrides = ["--set", "temperature.kT=2", "--set", "run.outputs=20", "--set", "remove:run.dt"];

        var (resolvedDeck, resolveError) = Resolve(deck, overrides);

        Assert.True(resolvedDeck is not null, resolveError);
        var text = File.ReadAllText(resolvedDeck);
        Assert.Contains("kT = 2", text, StringComparison.Ordinal);
        Assert.Contains("dt = \"auto\"", text, StringComparison.Ordinal);
        AssertSameRun(folder, deck, overrides, resolvedDeck);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Resolve_WritesEveryRunDefaultTheDeckLeftOut()
    {
        using var folder = new TempFolder();
        var deck = CopyDemoDecks(folder, "two-level.toml");

        var (resolvedDeck, _) = Resolve(deck, []);

        // docs/deck-format.md, [run]: outputs 50, spacing linear, explicit rk4, dt auto, safety 0.5, accuracy 1e-3.
        var lines = File.ReadAllLines(resolvedDeck!);
        Assert.Contains("spacing = \"linear\"", lines);
        Assert.Contains("explicit = \"rk4\"", lines);
        Assert.Contains("dt = \"auto\"", lines);
        Assert.Contains("safety = 0.5", lines);
        Assert.Contains("accuracy = 0.001", lines);
    }

    private static string CopyDemoDecks(TempFolder folder, string name)
    {
        foreach (var file in Directory.GetFiles(Path.GetDirectoryName(CliRunner.DemoDeck(name))!))
        {
            File.Copy(file, folder.File(Path.GetFileName(file)));
        }

        return folder.File(name);
    }

    // Resolves the deck into a file beside it (where its relative CSV paths hold).
    private static (string? Path, string Error) Resolve(string deck, string[] overrides)
    {
        var (code, output, error) = CliRunner.Run(["resolve", deck, .. overrides]);
        if (code != ExitCodes.Success)
        {
            return (null, error);
        }

        var resolved = Path.ChangeExtension(deck, ".resolved.toml");
        File.WriteAllText(resolved, output);
        return (resolved, error);
    }

    private static void AssertSameRun(TempFolder folder, string deck, string[] overrides, string resolvedDeck)
    {
        var original = CliRunner.Run(["run", deck, "--no-plots", "--out", folder.File("original"), .. overrides]);
        var resolved = CliRunner.Run("run", resolvedDeck, "--no-plots", "--out", folder.File("resolved"));

        Assert.True(original.ExitCode == ExitCodes.Success, original.Error);
        Assert.True(resolved.ExitCode == ExitCodes.Success, resolved.Error);
        var files = Directory.GetFiles(folder.File("original"), "*.csv").Select(Path.GetFileName).Order().ToList();
        Assert.NotEmpty(files);
        Assert.Equal(files, Directory.GetFiles(folder.File("resolved"), "*.csv").Select(Path.GetFileName).Order());
        foreach (var file in files)
        {
            Assert.True(
                WithoutDeckProvenance(folder.File(Path.Combine("original", file!))).SequenceEqual(WithoutDeckProvenance(folder.File(Path.Combine("resolved", file!)))),
                $"{file} differs between the deck and its resolved form");
        }
    }

    // The bytes of a CSV file without the three header lines that name the deck file, its hash and the overrides.
    private static byte[] WithoutDeckProvenance(string path) =>
        System.Text.Encoding.UTF8.GetBytes(string.Concat(File.ReadAllText(path).Split('\n')
            .Where(line => !line.StartsWith("# deck: ", StringComparison.Ordinal) && !line.StartsWith("# deck_sha256: ", StringComparison.Ordinal) && !line.StartsWith("# overrides: ", StringComparison.Ordinal))
            .Select(line => line + "\n")));
}
