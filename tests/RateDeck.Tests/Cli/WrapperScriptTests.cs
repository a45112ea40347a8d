using System.Diagnostics;
using System.Text.Json;
using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The `ratedeck` script at the repository root, as README.md tells a user to run it: executable
/// as it is checked out, it runs the built program with the arguments given and keeps stdout to the
/// program (issue 9 §1). The suite runs after a build, so the script finds the program up to date.
/// </summary>
public sealed class WrapperScriptTests
{
    [Fact]
    public async Task Script_RunsTheProgramWithItsArgumentsAndExitCode()
    {
        var root = CliRunner.RepositoryRoot();

        var ok = await RunScriptAsync(root, "check", Path.Combine(root, "decks", "two-level.toml"), "--json");
        var bad = await RunScriptAsync(root, "check", Path.Combine(root, "decks", "two-level.toml"), "--jsn");

        Assert.True(ok.Code == ExitCodes.Success, ok.Error);
        Assert.True(JsonDocument.Parse(ok.Out).RootElement.GetProperty("ok").GetBoolean());
        Assert.Equal("", ok.Error);
        Assert.Equal(ExitCodes.BadInput, bad.Code);
        Assert.Contains("`--json`", bad.Error, StringComparison.Ordinal);
    }

    private static async Task<(int Code, string Out, string Error)> RunScriptAsync(string root, params string[] args)
    {
        var info = new ProcessStartInfo(Path.Combine(root, "ratedeck")) { RedirectStandardOutput = true, RedirectStandardError = true, WorkingDirectory = root };
        foreach (var arg in args)
        {
            info.ArgumentList.Add(arg);
        }

        using var process = Process.Start(info)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        await process.WaitForExitAsync().WaitAsync(TimeSpan.FromMinutes(5));
        return (process.ExitCode, await stdout, await stderr);
    }
}
