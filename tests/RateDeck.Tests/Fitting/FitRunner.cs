using System.Text.Json;
using RateDeck.Tests.Cli;
using Xunit;

namespace RateDeck.Tests.Fitting;

/// <summary>Runs <c>ratedeck fit --json</c> in process and reads the parts of its JSON the tests check.</summary>
internal static class FitRunner
{
    public static string Fixture(string name) => Path.Combine(AppContext.BaseDirectory, "fixtures", "nist", name);

    public static (int ExitCode, JsonElement Json, string Error) Run(string deck, string outFolder, params string[] extra)
    {
        var (code, stdout, stderr) = CliRunner.Run(["fit", deck, "--json", "--out", outFolder, .. extra]);
        var json = stdout.Length > 0 ? JsonDocument.Parse(stdout).RootElement.Clone() : default;
        return (code, json, stderr);
    }

    public static double Value(JsonElement json, string parameter) => json.GetProperty("parameters").GetProperty(parameter).GetProperty("value").GetDouble();

    public static double StdError(JsonElement json, string parameter) => json.GetProperty("parameters").GetProperty(parameter).GetProperty("std_error").GetDouble();

    public static void Relative(double expected, double actual, double tolerance, string what)
    {
        var relative = Math.Abs(actual - expected) / Math.Abs(expected);
        Assert.True(relative <= tolerance, $"{what}: expected {expected:R}, got {actual:R} (relative {relative:G3} > {tolerance:G3})");
    }
}
