using System.Globalization;
using System.Text.Json;
using RateDeck.Cli;
using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// <c>sweep --fit</c> (issue 9 §4: fit results in the sweep table), from the verb down on the fit
/// demo deck: each row carries what <c>fit</c> itself reports for the same overrides, the emitted
/// job lines are fits, and the table collected from those jobs is the in-process one byte for byte.
/// The sweep varies the start value of z with one start per fit: the least-squares minimum does not
/// depend on where it is approached from (common practice), and the demo's data were made from
/// z = 2, alpha = 0.7 plus noise (decks/tools/make_fit_ladder_data.py), so every row must find them
/// within three standard errors.
/// </summary>
public sealed class FitSweepTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private static string FitDeck => CliRunner.DemoDeck("fit-ladder.toml");

    private static string Cell(CsvRecords table, int row, string column) => table.Rows[row][table.Columns.ToList().IndexOf(column)];

    [Trait("Through", "program")]
    [Fact]
    public void SweepWithFit_RowsHoldWhatFitReportsForTheSameOverrides()
    {
        var sweep = _folder.File("sweep");

        var (code, _, error) = CliRunner.Run("sweep", FitDeck, "--fit", "--set", "fit.starts=1", "--vary", "parameters.z=0.5:4:3:log", "--out", sweep, "--jobs", "2");

        Assert.True(code == ExitCodes.Success, error);
        var table = ResultCsv.ReadRecords(Path.Combine(sweep, "summary.csv"));
        Assert.Equal(3, table.Rows.Count);
        for (var row = 0; row < 3; row++)
        {
            var start = Cell(table, row, "parameters.z");
            var single = CliRunner.Run("fit", FitDeck, "--set", "fit.starts=1", "--set", $"parameters.z={start}", "--json", "--no-plots", "--out", _folder.File($"single-{row}"));
            Assert.True(single.ExitCode == ExitCodes.Success, single.Error);
            using var json = JsonDocument.Parse(single.Out);
            var parameters = json.RootElement.GetProperty("parameters");
            Assert.Equal("ok", Cell(table, row, "status"));
            Assert.Equal("true", Cell(table, row, "converged"));
            foreach (var (name, truth) in new[] { ("z", 2.0), ("alpha", 0.7) })
            {
                var estimate = Parse(Cell(table, row, $"estimate_{name}"));
                var standardError = Parse(Cell(table, row, $"std_error_{name}"));
                Assert.Equal(parameters.GetProperty(name).GetProperty("value").GetDouble(), estimate);
                Assert.Equal(parameters.GetProperty(name).GetProperty("std_error").GetDouble(), standardError);
                Assert.True(Math.Abs(estimate - truth) < 3 * standardError, $"{name} = {estimate} +- {standardError} from start z = {start}");
            }

            Assert.Equal(json.RootElement.GetProperty("rss").GetDouble(), Parse(Cell(table, row, "rss")));
            Assert.True(File.Exists(Path.Combine(sweep, $"point-000{row}", "fit-ladder.fitted.toml")));
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void SweepWithFit_EmitsFitJobLines_WhoseCollectedTableIsTheInProcessOne()
    {
        var (inProcess, jobs) = (_folder.File("in-process"), _folder.File("jobs"));
        string[] sweep = ["sweep", FitDeck, "--fit", "--set", "fit.starts=1", "--vary", "parameters.alpha=0.5:2:2"];
        Assert.Equal(ExitCodes.Success, CliRunner.Run([.. sweep, "--out", inProcess]).ExitCode);
        Assert.Equal(ExitCodes.Success, CliRunner.Run([.. sweep, "--emit-jobs", jobs]).ExitCode);

        var lines = File.ReadAllLines(Path.Combine(jobs, "jobs.txt"));
        Assert.Equal($"ratedeck fit {FitDeck} --set fit.starts=1 --set parameters.alpha=0.5 --no-plots --quiet --out {jobs}/point-0000 --status-file {jobs}/status/point-0000.csv", lines[0]);
        foreach (var line in lines)
        {
            // The deck path and folders have no spaces here, so the words split on spaces.
            var (code, _, error) = CliRunner.Run(line.Split(' ')[1..]);
            Assert.True(code == ExitCodes.Success, error);
        }

        Assert.Equal(ExitCodes.Success, CliRunner.Run("collect", jobs).ExitCode);
        Assert.Equal(File.ReadAllBytes(Path.Combine(inProcess, "summary.csv")), File.ReadAllBytes(Path.Combine(jobs, "summary.csv")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void SweepWithFit_OnADeckWithoutAFitTable_IsOneLocatedErrorBeforeAnyPoint()
    {
        var sweep = _folder.File("sweep");

        var (code, output, error) = CliRunner.Run("sweep", CliRunner.DemoDeck("two-level.toml"), "--fit", "--vary", "temperature.kT=0.02:0.04:2", "--out", sweep);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.Contains("the deck has no [fit] table", error, StringComparison.Ordinal);
        Assert.False(Directory.Exists(sweep));
    }

    private static double Parse(string text) => double.Parse(text, CultureInfo.InvariantCulture);
}
