using System.Diagnostics;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Output for scripts (issue 9 §3): `--quiet` prints one summary line per run with the run's exit
/// code and files; when stdout is not a terminal no progress bar is drawn, even on a terminal's
/// stderr, and stdout carries no control characters.
/// </summary>
public sealed class PlainOutputTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("check", "cascade.toml", "ok, 7 checks passed, 48 states")]
    [InlineData("steady", "cascade.toml", "driven steady state")]
    [InlineData("run", "cascade.toml", "rk4 dt = ")]
    [InlineData("stiffness", "two-level.toml", "spectral radius")]
    public void Quiet_PrintsOneLineNamingTheVerbAndDeck_WithTheSameExitCodeAndFiles(string verb, string deckName, string saying)
    {
        using var folder = new TempFolder();
        var deck = CliRunner.DemoDeck(deckName);
        // stiffness writes no files and has no --out.
        string[] output = verb == "stiffness" ? [] : ["--out", folder.File("quiet")];
        string[] fullOutput = verb == "stiffness" ? [] : ["--out", folder.File("full")];

        var quiet = CliRunner.Run([verb, deck, "--quiet", .. output]);
        var full = CliRunner.Run([verb, deck, .. fullOutput]);

        Assert.Equal(full.ExitCode, quiet.ExitCode);
        Assert.Equal(1, quiet.Out.Count(c => c == '\n'));
        Assert.StartsWith($"{verb} {deck}: ", quiet.Out, StringComparison.Ordinal);
        Assert.Contains(saying, quiet.Out, StringComparison.Ordinal);
        Assert.Equal(Files(folder.File("full")), Files(folder.File("quiet")));
    }

    private static IEnumerable<string?> Files(string folder) =>
        Directory.Exists(folder) ? Directory.GetFiles(folder).Select(Path.GetFileName).Order() : [];

    [Trait("Through", "program")]
    [Fact]
    public void JsonAndQuiet_Together_AreRefused()
    {
        var (code, stdout, error) = CliRunner.Run("check", CliRunner.DemoDeck("two-level.toml"), "--json", "--quiet");

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", stdout);
        Assert.Contains("--json and --quiet", error, StringComparison.Ordinal);
    }

    [Trait("Through", "program")]
    [Fact]
    public async Task StdoutToAFile_DrawsNoProgressBarOnTheTerminal_AndWritesPlainText()
    {
        // `script` gives the program a terminal; the first run keeps stdout on it (the bar is drawn:
        // the control that the check below can see one), the second sends stdout to a file.
        using var folder = new TempFolder();
        var summary = folder.File("summary.txt");
        var onTerminal = await OnATerminalAsync(Program(folder));
        var piped = await OnATerminalAsync($"{Program(folder)} > '{summary}'");

        Assert.Contains("100.0%", onTerminal, StringComparison.Ordinal);
        Assert.DoesNotContain("%", piped, StringComparison.Ordinal);
        var text = File.ReadAllText(summary);
        Assert.Contains("explicit vs exact", text, StringComparison.Ordinal);
        Assert.DoesNotContain(text, c => char.IsControl(c) && c != '\n');
    }

    private static string Program(TempFolder folder) =>
        $"{CliRunner.ShellCommand()} run '{CliRunner.DemoDeck("cascade.toml")}' --no-plots --out '{folder.File("out")}'";

    private static async Task<string> OnATerminalAsync(string command)
    {
        var info = new ProcessStartInfo("script") { RedirectStandardOutput = true, RedirectStandardError = true, RedirectStandardInput = true };
        foreach (var arg in new[] { "-qec", command, "/dev/null" })
        {
            info.ArgumentList.Add(arg);
        }

        using var process = Process.Start(info)!;
        process.StandardInput.Close();
        var transcript = process.StandardOutput.ReadToEndAsync();
        var errors = process.StandardError.ReadToEndAsync();
        await process.WaitForExitAsync().WaitAsync(TimeSpan.FromMinutes(2));
        Assert.True(process.ExitCode == 0, $"exit {process.ExitCode}: {await transcript} {await errors}");
        return await transcript;
    }
}
