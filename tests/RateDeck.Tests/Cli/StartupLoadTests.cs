using System.Diagnostics;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// What a run loads (issue 9 §6): `check` of a kernel deck (no rate file) pulls in neither the plotting
/// libraries nor the CSV library, and `run` of the same deck, which draws plots, does load the
/// plotting libraries, which shows that the trace sees those loads. The program runs as its own process, as a user starts it,
/// with <see cref="Program.TraceAssembliesVariable"/> set; the test host has every library loaded already.
/// </summary>
public sealed class StartupLoadTests
{
    private static readonly string[] _plottingAndCsv = ["ScottPlot", "SkiaSharp", "HarfBuzzSharp", "SkiaSharp.HarfBuzz", "CsvHelper"];

    [Fact]
    public async Task CheckOfAKernelDeck_LoadsNoPlottingOrCsvLibrary()
    {
        // The starter deck `init` writes: a kernel deck, no rate file.
        using var folder = new TempFolder();
        var deck = folder.File("starter.toml");
        Assert.Equal(ExitCodes.Success, CliRunner.Run("init", deck).ExitCode);

        var (code, loaded) = await LoadedAssembliesAsync("check", deck, "--out", folder.File("out"));

        Assert.Equal(ExitCodes.Success, code);
        Assert.Contains("Tomlyn", loaded);
        Assert.Empty(loaded.Intersect(_plottingAndCsv));
        Assert.DoesNotContain("RateDeck.Fitter", loaded);
    }

    [Fact]
    public async Task RunWithPlots_LoadsThePlottingLibraries()
    {
        using var folder = new TempFolder();
        var deck = folder.File("starter.toml");
        Assert.Equal(ExitCodes.Success, CliRunner.Run("init", deck).ExitCode);

        var (code, loaded) = await LoadedAssembliesAsync("run", deck, "--out", folder.File("out"));

        Assert.Equal(ExitCodes.Success, code);
        Assert.Contains("ScottPlot", loaded);
        Assert.Contains("SkiaSharp", loaded);
    }

    /// <summary>Runs the test's build of the program and returns the names of the assemblies it reported loading.</summary>
    private static async Task<(int Code, HashSet<string> Loaded)> LoadedAssembliesAsync(params string[] args)
    {
        var program = Path.Combine(AppContext.BaseDirectory, "ratedeck.dll");
        var info = new ProcessStartInfo("dotnet") { RedirectStandardOutput = true, RedirectStandardError = true };
        info.ArgumentList.Add(program);
        foreach (var arg in args)
        {
            info.ArgumentList.Add(arg);
        }

        info.Environment[Program.TraceAssembliesVariable] = "1";
        using var process = Process.Start(info)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = await process.StandardError.ReadToEndAsync();
        await process.WaitForExitAsync().WaitAsync(TimeSpan.FromMinutes(2));
        _ = await stdout;
        const string prefix = "ratedeck: loaded ";
        var loaded = stderr.Split('\n').Where(line => line.StartsWith(prefix, StringComparison.Ordinal)).Select(line => line[prefix.Length..].Trim()).ToHashSet();
        return (process.ExitCode, loaded);
    }
}
