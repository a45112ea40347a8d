using System.Globalization;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using RateDeck.Cli;
using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The implicit integrator gives up after 2,000,000 steps (docs/cli.md, exit code 8). Every step
/// ends at or before the next output time, so a run that asks for more output times than that
/// reaches the limit: 2,100,000 evenly spaced outputs make a real deck give up in about two
/// seconds, without any test hook. As the exact path the give-up is a refusal (exit 8, one line,
/// nothing printed or written); as the `--implicit` comparison beside another exact path it is
/// reported as not done and the run keeps the exact results.
/// </summary>
public sealed partial class ImplicitGiveUpTests : IDisposable
{
    private const int _outputs = 2_100_000;
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Trait("Through", "program")]
    [Theory]
    // A rate of 1e7 /s run to 21 s: t_end eps rho = 5.3e-8 > 1e-8, so the dense eigen paths are
    // declined and the implicit integrator is the exact path run chooses (docs/stiff-decks.md).
    [InlineData("1e7", new string[0], "take the double-double eigen path, which serves this deck (--exact extended)")]
    // A rate of 1 /s: the eigen path serves the deck, and the user asks for the implicit one.
    [InlineData("1", new[] { "--exact", "implicit" }, "drop --exact implicit to let run choose the path")]
    public void Run_WhenTheExactPathGivesUp_ExitsEightWithOneLineAndWritesNothing(string rate, string[] options, string remedy)
    {
        var deck = WriteDeck("dense.toml", rate);
        var entries = _folder.Entries();

        var (code, output, error) = CliRunner.Run(["run", deck, "--exact-only", "--out", _folder.File("out"), .. options]);

        Assert.True(code == ExitCodes.IntegrationGaveUp, $"exit {code}: {error}");
        Assert.Equal("", output);
        var line = Assert.Single(error.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.StartsWith("ratedeck run: exact path: the implicit integrator gave up after 2,000,000 steps", line, StringComparison.Ordinal);
        Assert.Contains("ask for fewer output times (run.outputs or run.times) or a shorter run.t_end", line, StringComparison.Ordinal);
        Assert.Contains(remedy, line, StringComparison.Ordinal);
        Assert.DoesNotContain("internal error", line, StringComparison.Ordinal);
        AssertReachedAtMostOneOutputPerStep(line);
        // No output folder, no staging folder: the folder holds the deck alone, as before the run.
        Assert.Equal(entries, _folder.Entries());
    }

    [Trait("Through", "program")]
    [Fact]
    public void Run_WhenTheImplicitComparisonGivesUpBesideTheEigenPath_ReportsItNotDoneAndKeepsTheExactResults()
    {
        var deck = WriteDeck("dense.toml", "1");
        var output = _folder.File("out");

        var (code, json, error) = CliRunner.Run("run", deck, "--exact-only", "--implicit", "--no-plots", "--json", "--out", output);

        Assert.True(code == ExitCodes.Success, error);
        var line = Assert.Single(error.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.StartsWith("ratedeck run: the implicit cross-check (--implicit) was not done, the results are the exact path's: the implicit integrator gave up after 2,000,000 steps", line, StringComparison.Ordinal);
        var root = JsonDocument.Parse(json).RootElement;
        Assert.Equal("symmetric-eigen", root.GetProperty("propagator").GetString());
        AssertReachedAtMostOneOutputPerStep(root.GetProperty("implicit_not_done").GetString()!);
        // No number of the unfinished integration is given.
        foreach (var key in new[] { "implicit_steps", "implicit_vs_exact_max_abs_difference", "implicit_vs_exact_max_rel_difference" })
        {
            Assert.Equal(JsonValueKind.Null, root.GetProperty(key).ValueKind);
        }

        // A closed two-state chain keeps its total population 1 (the master equation conserves probability).
        Assert.Equal(1.0, root.GetProperty("final_total_population").GetDouble(), 1e-12);
        Assert.True(File.Exists(Path.Combine(output, "populations-exact.csv")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Sweep_APointWhoseExactPathGivesUp_IsAFailedRowWithExitCodeEight()
    {
        var deck = WriteDeck("dense.toml", "1e7");
        var sweep = _folder.File("sweep");

        var (code, _, error) = CliRunner.Run("sweep", deck, "--vary", $"run.outputs=10:{_outputs}:2", "--exact-only", "--jobs", "1", "--out", sweep);

        Assert.True(code == ExitCodes.PointsFailed, $"exit {code}: {error}");
        var table = ResultCsv.ReadRecords(Path.Combine(sweep, "summary.csv"));
        string Cell(int row, string column) => table.Rows[row][table.Columns.ToList().IndexOf(column)];
        Assert.Equal(("ok", "0"), (Cell(0, "status"), Cell(0, "exit_code")));
        Assert.Equal(("failed", "8"), (Cell(1, "status"), Cell(1, "exit_code")));
        Assert.StartsWith("ratedeck run: exact path: the implicit integrator gave up after 2,000,000 steps", Cell(1, "message"), StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(sweep, "point-0001")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Fit_WhenTheKeptPathGivesUpAtTheStartValues_ExitsEightAndWritesNothing()
    {
        // The stiff deck with its rate free, fitted to more data times than the integrator has steps.
        var deck = WriteDeck("fit.toml", "rate", "[parameters]\nrate = 1e7\n", "[fit.free]\nrate = { log = true }\n[fit.data.dense]\ncsv = \"dense.csv\"\n");
        var data = new StringBuilder("t,s1\n");
        for (var k = 1; k <= _outputs; k++)
        {
            data.Append(CultureInfo.InvariantCulture, $"{k * 1e-5:0.#####},0.88\n");
        }

        File.WriteAllText(_folder.File("dense.csv"), data.ToString());
        var entries = _folder.Entries();

        var (code, output, error) = CliRunner.Run("fit", deck, "--out", _folder.File("out"));

        Assert.True(code == ExitCodes.IntegrationGaveUp, $"exit {code}: {error}");
        Assert.Equal("", output);
        var line = Assert.Single(error.Split('\n', StringSplitOptions.RemoveEmptyEntries));
        Assert.StartsWith("ratedeck fit: the implicit integrator gave up after 2,000,000 steps", line, StringComparison.Ordinal);
        Assert.Contains("fewer output or data times", line, StringComparison.Ordinal);
        Assert.Equal(entries, _folder.Entries());
    }

    /// <summary>
    /// Each step reaches at most one output time, so after 2,000,000 steps at most 2,000,001 of
    /// the 2,100,001 output times (t = 0 included) are reached, and the give-up is before t_end.
    /// </summary>
    private static void AssertReachedAtMostOneOutputPerStep(string message)
    {
        var match = Reached().Match(message);
        Assert.True(match.Success, message);
        Assert.Equal("21 s", match.Groups["end"].Value);
        Assert.Equal("2,100,001", match.Groups["count"].Value);
        Assert.InRange(int.Parse(match.Groups["reached"].Value, NumberStyles.AllowThousands, CultureInfo.InvariantCulture), 1, 2_000_001);
    }

    /// <summary>
    /// Two states 0.1 eV apart at kT = 0.05 eV, the downward rate given and the upward one completed
    /// by detailed balance, all population in the upper state, 2,100,000 outputs to 21 s (docs/deck-format.md).
    /// </summary>
    private string WriteDeck(string name, string kernel, string parameters = "", string fit = "")
    {
        var path = _folder.File(name);
        File.WriteAllText(path, "format = 1\ntitle = \"many outputs\"\n[units]\nenergy = \"eV\"\ntime = \"s\"\n[temperature]\nkT = 0.05\n" + parameters
            + "[states]\nspacing = \"linear\"\ncount = 2\nfrom = 0.0\nto = 0.1\n[energies]\nexpression = \"x\"\n"
            + $"[transfer]\nkind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"{kernel}\"\n"
            + $"[initial]\nstate = 2\n[run]\nt_end = 21\noutputs = {_outputs}\n" + fit);
        return path;
    }

    [GeneratedRegex(@"at t = [0-9.e+-]+ s of (?<end>[0-9.e+-]+ s), with (?<reached>[0-9,]+) of (?<count>[0-9,]+) output times reached")]
    private static partial Regex Reached();
}
