using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The same deck and overrides give byte-identical CSV files (no clock time in them), two runs
/// into different folders at once do not interfere, and two into the same folder either both
/// complete with whole outputs or the second refuses plainly (issue 9 §7).
/// </summary>
public sealed class DeterminismTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private static readonly string[] _runArgs = ["--set", "temperature.kT=0.03", "--no-plots"];

    private (int Code, string Error) Run(string output)
    {
        var (code, _, error) = CliRunner.Run(["run", CliRunner.DemoDeck("cascade.toml"), .. _runArgs, "--out", output]);
        return (code, error);
    }

    private static Dictionary<string, byte[]> Csvs(string folder) =>
        Directory.GetFiles(folder, "*.csv").ToDictionary(f => Path.GetFileName(f), File.ReadAllBytes);

    [Trait("Through", "program")]
    [Fact]
    public async Task SameDeckTwiceAtOnce_IntoTwoFolders_GivesByteIdenticalCsvs()
    {
        var (first, second) = (_folder.File("a"), _folder.File("b"));
        var runs = await Task.WhenAll(Task.Run(() => Run(first)), Task.Run(() => Run(second)));

        Assert.All(runs, r => Assert.True(r.Code == ExitCodes.Success, r.Error));
        var (a, b) = (Csvs(first), Csvs(second));
        Assert.NotEmpty(a);
        Assert.Equal(a.Keys.Order(), b.Keys.Order());
        foreach (var name in a.Keys)
        {
            Assert.True(a[name].AsSpan().SequenceEqual(b[name]), $"{name} differs between the two runs");
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public async Task TwoRunsIntoOneFolderAtOnce_BothCompleteOrTheSecondRefusesPlainly()
    {
        var reference = _folder.File("reference");
        Assert.Equal(ExitCodes.Success, Run(reference).Code);
        var shared = _folder.File("shared");

        var runs = await Task.WhenAll(Task.Run(() => Run(shared)), Task.Run(() => Run(shared)));

        Assert.Contains(runs, r => r.Code == ExitCodes.Success);
        foreach (var (code, error) in runs.Where(r => r.Code != ExitCodes.Success))
        {
            Assert.Equal(ExitCodes.OutputFailed, code);
            Assert.Contains("another run is writing", error, StringComparison.Ordinal);
        }

        var expected = Csvs(reference);
        var actual = Csvs(shared);
        Assert.Equal(expected.Keys.Order(), actual.Keys.Order());
        Assert.All(expected, e => Assert.True(e.Value.AsSpan().SequenceEqual(actual[e.Key]), e.Key));
        // No staging folder or lock is left beside the output folders.
        Assert.Equal(["reference", "shared"], Directory.GetFileSystemEntries(_folder.Path).Select(e => Path.GetFileName(e)).Order(StringComparer.Ordinal).ToArray());
    }

    [Trait("Through", "program")]
    [Fact]
    public void RerunIntoAFolderOfAnotherRun_ReplacesItsFilesAndKeepsFilesItDidNotWrite()
    {
        var output = _folder.File("out");
        Assert.Equal(ExitCodes.Success, CliRunner.Run("run", CliRunner.DemoDeck("cascade.toml"), "--no-plots", "--out", output).ExitCode);
        Assert.True(File.Exists(Path.Combine(output, "populations-rk4.csv")));
        File.WriteAllText(Path.Combine(output, "notes.txt"), "mine");

        var (code, _, error) = CliRunner.Run("run", CliRunner.DemoDeck("two-level.toml"), "--exact-only", "--no-plots", "--out", output);

        Assert.True(code == ExitCodes.Success, error);
        // The earlier run's explicit populations are gone, not left beside the new exact ones.
        Assert.False(File.Exists(Path.Combine(output, "populations-rk4.csv")));
        Assert.Equal("mine", File.ReadAllText(Path.Combine(output, "notes.txt")));
        Assert.Contains("two-level.toml", File.ReadAllText(Path.Combine(output, "populations-exact.csv")), StringComparison.Ordinal);
    }
}
