using System.Globalization;

namespace RateDeck.Bench;

/// <summary>
/// Whole-process timings: <c>ratedeck run DECK --exact-only --no-plots</c> against
/// tests/bench/reference_run.py on the same generated dense deck (<see cref="BenchDecks.WriteDense"/>),
/// each a child process under GNU time, one warm-up of each, then runs round-robin; median,
/// minimum and maximum wall time, median processor time and median peak resident memory; the
/// ratio of the median wall times against the target of issue 9 where one is set, the load
/// average before and after each size, and (with the reference) the stages of one run in process
/// (<see cref="RunPhases"/>). Also prints the memory budget of the target, 6 N^2 doubles + 200 MB.
/// </summary>
public static class RunBench
{
    /// <summary>The whole-process targets of issue 9: ratedeck's median wall time at most this times the reference's.</summary>
    private static readonly Dictionary<int, double> _ratioTargets = new() { [1000] = 1.0, [2000] = 0.9 };

    private const string _python = "/usr/bin/python3";

    /// <summary>Runs the suite for each size; <paramref name="withReference"/> false times ratedeck alone (the memory suite).</summary>
    public static void Run(IReadOnlyList<int> sizes, int runs, bool withReference, TextWriter output)
    {
        var cli = Repository.Cli();
        var script = Path.Combine(Repository.Root, "tests", "bench", "reference_run.py");
        output.WriteLine($"ratedeck: {cli}; reference: {_python} {script}{(withReference ? $" ({ReferenceVersions()})" : "")}");
        output.WriteLine($"timing: child processes under /usr/bin/time -v, 1 warm-up each, then {runs} runs round-robin; {Environment.ProcessorCount} logical processors");
        output.WriteLine();
        output.WriteLine($"{"N",6}  {"contender",-12}  {"median s",9}  {"min s",9}  {"max s",9}  {"cpu s",9}  {"peak MB",9}  {"budget MB",9}");
        foreach (var n in sizes)
        {
            var folder = Path.Combine(Path.GetTempPath(), $"ratedeck-bench-dense-{n}");
            var deck = BenchDecks.WriteDense(folder, n);
            var before = LoadAverage();
            var contenders = new List<(string Label, Func<ProcessMeasure> Work)>
            {
                ("ratedeck", () => ProcessRun.Measure(cli, ["run", deck, "--exact-only", "--no-plots", "--out", Path.Combine(folder, "out")])),
            };
            if (withReference)
            {
                contenders.Add(("reference", () => ProcessRun.Measure(_python, [script, folder])));
            }

            var samples = contenders.Select(_ => new List<ProcessMeasure>()).ToArray();
            foreach (var contender in contenders)
            {
                contender.Work();
            }

            for (var run = 0; run < runs; run++)
            {
                for (var c = 0; c < contenders.Count; c++)
                {
                    samples[c].Add(contenders[c].Work());
                }
            }

            var budget = (6.0 * n * n * 8 / 1e6) + 200; // MB = 10^6 bytes
            for (var c = 0; c < contenders.Count; c++)
            {
                var seconds = samples[c].Select(s => s.Seconds).ToArray();
                output.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{n,6}  {contenders[c].Label,-12}  {Timing.Median(seconds),9:F2}  {seconds.Min(),9:F2}  {seconds.Max(),9:F2}  {Timing.Median([.. samples[c].Select(s => s.ProcessorSeconds)]),9:F2}  {Timing.Median([.. samples[c].Select(s => s.PeakMegabytes)]),9:F0}  {budget,9:F0}"));
            }

            if (withReference)
            {
                var ratio = Timing.Median([.. samples[0].Select(s => s.Seconds)]) / Timing.Median([.. samples[1].Select(s => s.Seconds)]);
                var verdict = _ratioTargets.TryGetValue(n, out var target)
                    ? string.Create(CultureInfo.InvariantCulture, $"; target {target:F1}: {(ratio <= target ? "met" : "NOT met")}")
                    : "";
                output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{n,6}  ratedeck / reference wall time (medians): {ratio:F2}{verdict}"));
            }

            output.WriteLine($"{n,6}  load average (1, 5, 15 min) before: {before}; after: {LoadAverage()}");
        }

        if (withReference)
        {
            output.WriteLine();
            foreach (var n in sizes)
            {
                RunPhases.Run(n, output);
            }
        }
    }

    /// <summary>The 1, 5 and 15 minute load averages from /proc/loadavg.</summary>
    private static string LoadAverage() =>
        File.Exists("/proc/loadavg") ? string.Join(' ', File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "unknown";

    /// <summary>The Python, NumPy and SciPy versions the reference runs with.</summary>
    private static string ReferenceVersions()
    {
        var start = new System.Diagnostics.ProcessStartInfo(_python) { RedirectStandardOutput = true };
        foreach (var argument in new[] { "-c", "import sys, numpy, scipy; print(f'Python {sys.version.split()[0]}, NumPy {numpy.__version__}, SciPy {scipy.__version__}')" })
        {
            start.ArgumentList.Add(argument);
        }

        using var process = System.Diagnostics.Process.Start(start) ?? throw new InvalidOperationException($"cannot start {_python}");
        var versions = process.StandardOutput.ReadToEnd().Trim();
        process.WaitForExit();
        return versions;
    }
}

/// <summary>Where the repository and the built command-line program are.</summary>
public static class Repository
{
    /// <summary>The repository root: the first folder above the bench binary that holds solver/.</summary>
    public static string Root { get; } = FindRoot();

    /// <summary>
    /// The installed program: the build the <c>ratedeck</c> script publishes into
    /// solver/RateDeck.Cli/bin/published (native code where clang is installed, ReadyToRun otherwise;
    /// run <c>./ratedeck --version</c> once to make it), or the path in RATEDECK_BENCH_CLI.
    /// </summary>
    public static string Cli()
    {
        var path = Environment.GetEnvironmentVariable("RATEDECK_BENCH_CLI")
            ?? Path.Combine(Root, "solver", "RateDeck.Cli", "bin", "published", "ratedeck");
        return File.Exists(path) ? path : throw new InvalidOperationException($"{path} not found: run ./ratedeck --version once (it publishes the program)");
    }

    /// <summary>The plain (JIT-only) build of the program, <c>dotnet build -c Release solver/RateDeck.Cli</c>.</summary>
    public static string PlainCli()
    {
        var path = Path.Combine(Root, "solver", "RateDeck.Cli", "bin", "Release", "net10.0", "ratedeck");
        return File.Exists(path) ? path : throw new InvalidOperationException($"{path} not found: run dotnet build -c Release solver/RateDeck.Cli first");
    }

    /// <summary>The <c>ratedeck</c> script at the repository root, which publishes the program when its sources changed.</summary>
    public static string Script => Path.Combine(Root, "ratedeck");

    private static string FindRoot()
    {
        for (var folder = new DirectoryInfo(AppContext.BaseDirectory); folder is not null; folder = folder.Parent)
        {
            if (Directory.Exists(Path.Combine(folder.FullName, "solver")))
            {
                return folder.FullName;
            }
        }

        throw new InvalidOperationException("cannot find the repository root above the bench binary");
    }
}

/// <summary>The stages of one <c>run</c>, timed in process, to show where the whole-process time goes.</summary>
public static class RunPhases
{
    /// <summary>Loads the dense deck of <paramref name="n"/> states and times each stage once (after one warm-up of all).</summary>
    public static void Run(int n, TextWriter output)
    {
        var folder = Path.Combine(Path.GetTempPath(), $"ratedeck-bench-dense-{n}");
        var deck = BenchDecks.WriteDense(folder, n);
        var algebra = LinearAlgebra.LinearAlgebraProviders.Select(null, out _);
        for (var pass = 0; pass < 2; pass++)
        {
            var clock = System.Diagnostics.Stopwatch.StartNew();
            var read = Decks.DeckReader.Read(deck, []);
            var tRead = clock.Elapsed.TotalSeconds;
            var loaded = Pipeline.DeckPipeline.Assemble(read, algebra);
            var tAssemble = clock.Elapsed.TotalSeconds;
            var balance = Diagnostics.DetailedBalance.Analyze(loaded.Rates);
            var tBalance = clock.Elapsed.TotalSeconds;
            var spectrum = Diagnostics.Spectrum.Compute(loaded.Rates, algebra, balance);
            var tSpectrum = clock.Elapsed.TotalSeconds;
            var initial = new double[n];
            initial[n - 1] = 1;
            var times = Enumerable.Range(0, 101).Select(k => 2.0 * k / 100).ToArray();
            var trajectory = Propagation.ExactPropagatorChoice.Choose(loaded.Rates, algebra, initial: initial, spectrum: spectrum).Propagate(initial, times);
            var tPropagate = clock.Elapsed.TotalSeconds;
            var steady = Diagnostics.SteadyState.Compute(loaded.Rates, spectrum, initial, algebra);
            var tSteady = clock.Elapsed.TotalSeconds;
            Outputs.ResultCsv.WriteTrajectory(Path.Combine(folder, "stages-populations.csv"), Outputs.OutputHeader.For(read), loaded.States.Labels, trajectory, read.TimeUnit);
            var tWrite = clock.Elapsed.TotalSeconds;
            if (pass == 1)
            {
                output.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"stages, N = {n} (in process, second pass): read deck and CSV {tRead:F2} s, assemble {tAssemble - tRead:F2} s, balance {tBalance - tAssemble:F2} s, spectrum {tSpectrum - tBalance:F2} s, propagate 101 times {tPropagate - tSpectrum:F2} s, steady state {tSteady - tPropagate:F2} s, write populations {tWrite - tSteady:F2} s; final total {trajectory.Populations[^1].Sum():R} ({steady.Kind})"));
            }
        }
    }
}
