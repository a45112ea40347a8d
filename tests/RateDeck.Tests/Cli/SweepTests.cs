using System.Diagnostics;
using System.Globalization;
using RateDeck.Cli;
using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// <c>ratedeck sweep</c> and <c>collect</c> (issue 9 §4-5): a sweep gives the files of the same runs
/// made one by one, one summary row per point whatever the number of workers, resumes by skipping
/// complete points, reports a failing point in its row, and a job list run by GNU parallel collects
/// into the same table byte for byte.
/// </summary>
public sealed class SweepTests : IDisposable
{
    private static readonly string[] _kTs = ["0.02", "0.04", "0.06", "0.08"];
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private static string TwoLevel => CliRunner.DemoDeck("two-level.toml");

    private static Dictionary<string, byte[]> Files(string folder) =>
        Directory.GetFiles(folder).ToDictionary(f => Path.GetFileName(f), File.ReadAllBytes);

    private static CsvRecords Summary(string folder) => ResultCsv.ReadRecords(Path.Combine(folder, "summary.csv"));

    private static string Cell(CsvRecords table, int row, string column) => table.Rows[row][table.Columns.ToList().IndexOf(column)];

    [Trait("Through", "program")]
    [Fact]
    public void SweepOverKT_WritesTheSameFilesAsTheShellLoopOfRuns()
    {
        var sweep = _folder.File("sweep");
        var (code, _, error) = CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.08:4", "--jobs", "2", "--out", sweep);
        Assert.True(code == ExitCodes.Success, error);

        // The shell loop: for kt in 0.02 0.04 0.06 0.08; do ratedeck run DECK --set temperature.kT=$kt --no-plots --out loop/$kt; done
        for (var k = 0; k < _kTs.Length; k++)
        {
            var loop = _folder.File("loop-" + _kTs[k]);
            var run = CliRunner.Run("run", TwoLevel, "--set", "temperature.kT=" + _kTs[k], "--no-plots", "--out", loop);
            Assert.True(run.ExitCode == ExitCodes.Success, run.Error);
            var (one, other) = (Files(loop), Files(Path.Combine(sweep, $"point-000{k}")));
            Assert.Equal(one.Keys.Order(), other.Keys.Order());
            Assert.All(one, file => Assert.Equal(file.Value, other[file.Key]));
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void SweepOverKT_SummaryRowsHoldTheTwoLevelBoltzmannFractionsAndRelaxationRate()
    {
        var sweep = _folder.File("sweep");
        var (code, _, error) = CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.08:4", "--out", sweep);
        Assert.True(code == ExitCodes.Success, error);

        var table = Summary(sweep);
        Assert.Equal(_kTs, table.Rows.Select(r => r[1]));
        for (var k = 0; k < _kTs.Length; k++)
        {
            // Closed form (Boltzmann law, common practice): upper/ground = (g_u/g_g) exp(-dE/kT) with
            // g = 1, 3 and dE = 0.1 eV from the deck; the one decay rate of two levels is k_down + k_up,
            // k_up = k_down (g_u/g_g) exp(-dE/kT), k_down = 2000 /s from two-level-rates.csv.
            var ratio = 3 * Math.Exp(-0.1 / double.Parse(_kTs[k], CultureInfo.InvariantCulture));
            Assert.Equal("ok", Cell(table, k, "status"));
            Assert.Equal(ratio / (1 + ratio), Parse(Cell(table, k, "steady_fraction_upper")), 1e-12);
            Assert.Equal(1 / (1 + ratio), Parse(Cell(table, k, "steady_fraction_ground")), 1e-12);
            Assert.Equal(1, Parse(Cell(table, k, "slowest_rate")) / (2000 * (1 + ratio)), 1e-12);
        }
    }

    [Trait("Through", "program")]
    [Fact]
    public void Summary_IsByteIdenticalWhateverTheNumberOfJobs()
    {
        var (one, three) = (_folder.File("one"), _folder.File("three"));
        string[] vary = ["--vary", "temperature.kT=0.01:0.1:5:log", "--vary", "run.t_end=1e-3:5e-3:3"];

        Assert.Equal(ExitCodes.Success, CliRunner.Run(["sweep", TwoLevel, .. vary, "--jobs", "1", "--out", one]).ExitCode);
        Assert.Equal(ExitCodes.Success, CliRunner.Run(["sweep", TwoLevel, .. vary, "--jobs", "3", "--out", three]).ExitCode);

        Assert.Equal(File.ReadAllBytes(Path.Combine(one, "summary.csv")), File.ReadAllBytes(Path.Combine(three, "summary.csv")));
        Assert.Equal(15, Summary(one).Rows.Count);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Product_TakesEveryCombinationLastAxisFastest_ZipWalksTheAxesTogether()
    {
        var (product, zip) = (_folder.File("product"), _folder.File("zip"));
        string[] vary = ["--vary", "temperature.kT=0.02:0.04:2", "--vary", "run.t_end=1e-3:3e-3:3"];

        Assert.Equal(ExitCodes.Success, CliRunner.Run(["sweep", TwoLevel, .. vary, "--exact-only", "--out", product]).ExitCode);
        var zipped = CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.06:3", "--vary", "run.t_end=1e-3:3e-3:3", "--zip", "--exact-only", "--out", zip);
        Assert.True(zipped.ExitCode == ExitCodes.Success, zipped.Error);

        Assert.Equal(
            ["0.02 0.001", "0.02 0.002", "0.02 0.003", "0.04 0.001", "0.04 0.002", "0.04 0.003"],
            Summary(product).Rows.Select(r => $"{r[1]} {r[2]}"));
        Assert.Equal(["0.02 0.001", "0.04 0.002", "0.06 0.003"], Summary(zip).Rows.Select(r => $"{r[1]} {r[2]}"));
        Assert.Equal(["point-0000", "point-0001", "point-0002"], Summary(zip).Rows.Select(r => r[0]));
    }

    [Trait("Through", "program")]
    [Fact]
    public void SweepOverAWholeNumberKey_GivesItAsAnInteger()
    {
        var sweep = _folder.File("sweep");

        // run.outputs must be a whole number: `--set run.outputs=10.0` is refused, `=10` is not.
        var (code, _, error) = CliRunner.Run("sweep", TwoLevel, "--vary", "run.outputs=10:40:4", "--exact-only", "--out", sweep);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Equal([11, 21, 31, 41], Enumerable.Range(0, 4).Select(k => ResultFiles.Rows(Path.Combine(sweep, $"point-000{k}", "populations-exact.csv")).Length));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Zip_WithUnequalCounts_IsAUsageError()
    {
        AssertBadInput("--zip walks the axes together, so every count must be equal (temperature.kT: 3, run.t_end: 2)",
            "sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.06:3", "--vary", "run.t_end=1e-3:3e-3:2", "--zip", "--out", _folder.File("s"));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Resume_SkipsCompletePoints_AndRunsAgainAPointWhoseFolderIsIncomplete()
    {
        var sweep = _folder.File("sweep");
        string[] args = ["sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.08:4", "--out", sweep];
        Assert.Equal(ExitCodes.Success, CliRunner.Run(args).ExitCode);
        var summary = File.ReadAllBytes(Path.Combine(sweep, "summary.csv"));
        var kept = Path.Combine(sweep, "point-0000", "results.csv");
        var keptTime = File.GetLastWriteTimeUtc(kept);
        // An interrupted sweep: one point lost a file, another never recorded its end.
        File.Delete(Path.Combine(sweep, "point-0001", "spectrum.csv"));
        File.Delete(Path.Combine(sweep, "status", "point-0002.csv"));
        Thread.Sleep(20);

        var (code, output, error) = CliRunner.Run(args);

        Assert.True(code == ExitCodes.Success, error);
        Assert.Contains("4 points (2 complete from an earlier sweep, not run again): 4 ok", output, StringComparison.Ordinal);
        Assert.Equal(keptTime, File.GetLastWriteTimeUtc(kept));
        Assert.True(File.Exists(Path.Combine(sweep, "point-0001", "spectrum.csv")));
        Assert.Equal(summary, File.ReadAllBytes(Path.Combine(sweep, "summary.csv")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Resume_IntoAFolderHoldingAnotherSweep_IsRefused()
    {
        var sweep = _folder.File("sweep");
        Assert.Equal(ExitCodes.Success, CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.04:2", "--out", sweep).ExitCode);

        AssertBadInput("holds another sweep", "sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.06:2", "--out", sweep);
    }

    [Trait("Through", "program")]
    [Fact]
    public void FailingPoint_IsReportedInItsRow_AndTheOtherPointsComplete()
    {
        var sweep = _folder.File("sweep");

        var (code, _, error) = CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=-0.02:0.02:3", "--out", sweep);

        Assert.Equal(ExitCodes.PointsFailed, code);
        Assert.Contains("2 of 3 points have no results", error, StringComparison.Ordinal);
        Assert.Contains("  point-0000 (temperature.kT=-0.02): failed with exit code 2: --set temperature.kT=-0.02: `temperature.kT` must be > 0", error, StringComparison.Ordinal);
        var table = Summary(sweep);
        Assert.Equal(["failed", "failed", "ok"], table.Rows.Select(r => Cell(table, table.Rows.ToList().IndexOf(r), "status")));
        Assert.Equal("2", Cell(table, 0, "exit_code"));
        Assert.Equal("--set temperature.kT=-0.02: `temperature.kT` must be > 0, not -0.02", Cell(table, 0, "message"));
        Assert.Equal("", Cell(table, 0, "spectral_radius"));
        Assert.NotEqual("", Cell(table, 2, "spectral_radius"));
        Assert.False(Directory.Exists(Path.Combine(sweep, "point-0000")));
    }

    [Trait("Through", "program")]
    [Theory]
    [InlineData("temperature.kT=1:2", "--vary temperature.kT=1:2: after `temperature.kT=` give start:stop:count")]
    [InlineData("temperature.kT=1:2:0", "--vary temperature.kT=1:2:0: the count `0` must be a whole number of 1 or more")]
    [InlineData("temperature.kT=1:2:two", "--vary temperature.kT=1:2:two: the count `two` must be a whole number")]
    [InlineData("temperature.kT=0:2:3:log", "--vary temperature.kT=0:2:3:log: geometric spacing (:log) needs start and stop above 0")]
    [InlineData("temperature.kT=-1:2:3:log", "geometric spacing (:log) needs start and stop above 0")]
    [InlineData("temperature.kT=1:2:3:lin", "the fourth part `lin` may only be `log`")]
    [InlineData("temperature.kT=a:2:3", "the start `a` is not a finite number")]
    [InlineData("0.5:2:3", "write key=start:stop:count")]
    [InlineData("kt=0.5:2:3", "--vary kt=0.5:2:3: `kt` is neither a parameter of the deck nor a deck key")]
    [InlineData("temprature.kT=0.5:2:3", "--vary temprature.kT=0.5:2:3: unknown key `temprature`")]
    [InlineData("temperature=0.5:2:3", "--vary temperature=0.5:2:3: `temperature` is a table")]
    public void BadVary_ExitsTwoWithAMessageAtTheSpecification(string spec, string message)
    {
        AssertBadInput(message, "sweep", TwoLevel, "--vary", spec, "--out", _folder.File("s"));

        Assert.False(Directory.Exists(_folder.File("s")));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Collect_OnAFolderWithoutManifest_ExitsTwo()
    {
        AssertBadInput("holds no sweep.json", "collect", _folder.Path);
    }

    [Trait("Through", "program")]
    [Fact]
    public void EmitJobs_WritesOneRunLinePerPointAndASlurmArrayOverThem()
    {
        var jobs = _folder.File("jobs");

        var (code, _, error) = CliRunner.Run("sweep", TwoLevel, "--vary", "temperature.kT=0.02:0.08:4", "--emit-jobs", jobs);

        Assert.True(code == ExitCodes.Success, error);
        var lines = File.ReadAllLines(Path.Combine(jobs, "jobs.txt"));
        Assert.Equal(4, lines.Length);
        Assert.Equal($"ratedeck run {TwoLevel} --set temperature.kT=0.04 --no-plots --quiet --out {jobs}/point-0001 --status-file {jobs}/status/point-0001.csv", lines[1]);
        var script = File.ReadAllText(Path.Combine(jobs, "slurm-array.sh"));
        Assert.Contains("#SBATCH --array=0-3\n", script, StringComparison.Ordinal);
        Assert.Contains("$((SLURM_ARRAY_TASK_ID + 1))p", script, StringComparison.Ordinal);
        Assert.False(Directory.Exists(Path.Combine(jobs, "point-0000")));
    }

    [Trait("Through", "program")]
    [GnuParallelFact]
    public void EmittedJobs_RunByGnuParallel_CollectIntoTheInProcessTableByteForByte()
    {
        var (inProcess, jobs) = (_folder.File("in-process"), _folder.File("jobs"));
        string[] vary = ["--vary", "temperature.kT=-0.02:0.06:5"];
        Assert.Equal(ExitCodes.PointsFailed, CliRunner.Run(["sweep", TwoLevel, .. vary, "--out", inProcess]).ExitCode);
        Assert.Equal(ExitCodes.Success, CliRunner.Run(["sweep", TwoLevel, .. vary, "--emit-jobs", jobs]).ExitCode);

        // `ratedeck` on PATH, as the job lines expect: here the program under test.
        var bin = Directory.CreateDirectory(_folder.File("bin")).FullName;
        var command = Path.Combine(bin, "ratedeck");
        File.WriteAllText(command, $"#!/bin/sh\nexec {CliRunner.ShellCommand()} \"$@\"\n");
        if (!OperatingSystem.IsWindows())
        {
            File.SetUnixFileMode(command, UnixFileMode.UserRead | UnixFileMode.UserWrite | UnixFileMode.UserExecute);
        }

        var info = new ProcessStartInfo("parallel", ["--jobs", "2"]) { RedirectStandardInput = true, RedirectStandardOutput = true, RedirectStandardError = true };
        info.Environment["PATH"] = bin + ":" + Environment.GetEnvironmentVariable("PATH");
        using var parallel = Process.Start(info)!;
        parallel.StandardInput.Write(File.ReadAllText(Path.Combine(jobs, "jobs.txt")));
        parallel.StandardInput.Close();
        var stdout = parallel.StandardOutput.ReadToEndAsync();
        var stderr = parallel.StandardError.ReadToEnd();
        parallel.WaitForExit();

        // GNU parallel's exit status is the number of failed jobs: the two kT <= 0 points; each
        // of the other three prints its one --quiet summary line.
        Assert.True(parallel.ExitCode == 2, stderr);
        Assert.All(stdout.Result.Split('\n', StringSplitOptions.RemoveEmptyEntries), line => Assert.StartsWith($"run {TwoLevel}: ", line, StringComparison.Ordinal));
        Assert.Equal(3, stdout.Result.Split('\n', StringSplitOptions.RemoveEmptyEntries).Length);
        var collected = CliRunner.Run("collect", jobs);
        Assert.Equal(ExitCodes.PointsFailed, collected.ExitCode);
        Assert.Equal(File.ReadAllBytes(Path.Combine(inProcess, "summary.csv")), File.ReadAllBytes(Path.Combine(jobs, "summary.csv")));
        Assert.Equal(["failed", "failed", "ok", "ok", "ok"], Summary(jobs).Rows.Select(r => r[2]));
    }

    // Exit 2, nothing on stdout, and the message on stderr.
    private static void AssertBadInput(string message, params string[] args)
    {
        var (code, output, error) = CliRunner.Run(args);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
        Assert.Contains(message, error, StringComparison.Ordinal);
    }

    private static double Parse(string text) => double.Parse(text, CultureInfo.InvariantCulture);
}

/// <summary>A test that needs GNU parallel on PATH; skipped, saying how to install it, when it is absent.</summary>
public sealed class GnuParallelFactAttribute : FactAttribute
{
    public GnuParallelFactAttribute()
    {
        var found = (Environment.GetEnvironmentVariable("PATH") ?? "").Split(':').Any(folder => folder.Length > 0 && File.Exists(Path.Combine(folder, "parallel")));
        if (!found)
        {
            Skip = "GNU parallel is not installed (apt-get install parallel; .ci/run installs it)";
        }
    }
}
