using System.Diagnostics;
using System.Globalization;

namespace RateDeck.Bench;

/// <summary>
/// Start-up of the installed program (issue 9 §6): wall time of whole processes, round-robin in one
/// sitting: <c>check</c> of a 16-state kernel deck through the <c>ratedeck</c> script, by the
/// ReadyToRun build it runs and by the plain <c>dotnet build</c> output, and the ReadyToRun
/// build's <c>--version</c> (the floor: runtime start-up and the command line). No external tool needed.
/// </summary>
public static class StartupBench
{
    /// <summary>The target: median wall time of the installed program's <c>check</c> of a 16-state deck.</summary>
    public const double TargetSeconds = 0.15;

    /// <summary>States of the deck timed.</summary>
    public const int States = 16;

    /// <summary>Runs the suite: one warm-up of each contender, then <paramref name="runs"/> rounds.</summary>
    public static void Run(int runs, TextWriter output)
    {
        var deck = BenchDecks.WriteKernel(Path.Combine(Path.GetTempPath(), "ratedeck-bench-startup"), States);
        // The script publishes the program when a source is newer than it: do it before the clock runs.
        WallSeconds(Repository.Script, ["--version"]);
        var contenders = new (string Label, string Program, string[] Arguments)[]
        {
            ("script check", Repository.Script, ["check", deck]),
            ("ReadyToRun check", Repository.Cli(), ["check", deck]),
            ("plain build check", Repository.PlainCli(), ["check", deck]),
            ("ReadyToRun --version", Repository.Cli(), ["--version"]),
        };

        output.WriteLine($"deck: {deck} ({States} states); ReadyToRun: {Repository.Cli()}; plain: {Repository.PlainCli()}");
        output.WriteLine($"timing: whole child processes, 1 warm-up each, then {runs} rounds round-robin; load average before: {LoadAverage()}");
        var seconds = Timing.Measure([.. contenders.Select(c => (Action)(() => WallSeconds(c.Program, c.Arguments)))], warmups: 1, runs);
        output.WriteLine($"load average after: {LoadAverage()}");
        output.WriteLine();
        output.WriteLine($"{"contender",-22}  {"median s",9}  {"min s",9}  {"max s",9}");
        for (var c = 0; c < contenders.Length; c++)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{contenders[c].Label,-22}  {Timing.Median(seconds[c]),9:F3}  {seconds[c].Min(),9:F3}  {seconds[c].Max(),9:F3}"));
        }

        double Median(int c) => Timing.Median(seconds[c]);
        output.WriteLine();
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"ReadyToRun / plain build, check (medians): {Median(1) / Median(2):F2}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"script / ReadyToRun, check (medians): {Median(0) / Median(1):F2}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"ReadyToRun check above its --version floor (medians): {Median(1) - Median(3):F3} s"));
        output.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"target {TargetSeconds:F2} s for the installed program's check (median): script {Median(0):F3} s {(Median(0) <= TargetSeconds ? "met" : "NOT met")}, ReadyToRun build {Median(1):F3} s {(Median(1) <= TargetSeconds ? "met" : "NOT met")}"));
    }

    /// <summary>Wall time of one run of <paramref name="program"/>; throws with its error output when it fails.</summary>
    private static double WallSeconds(string program, IReadOnlyList<string> arguments)
    {
        var start = new ProcessStartInfo(program) { RedirectStandardOutput = true, RedirectStandardError = true };
        foreach (var argument in arguments)
        {
            start.ArgumentList.Add(argument);
        }

        var clock = Stopwatch.StartNew();
        using var process = Process.Start(start) ?? throw new InvalidOperationException($"cannot start {program}");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEnd();
        process.WaitForExit();
        var seconds = clock.Elapsed.TotalSeconds;
        _ = output.Result;
        return process.ExitCode == 0
            ? seconds
            : throw new InvalidOperationException($"{program} {string.Join(' ', arguments)} exited {process.ExitCode}:\n{error}");
    }

    /// <summary>The 1, 5 and 15 minute load averages from /proc/loadavg (the machine is shared: say it beside every figure).</summary>
    private static string LoadAverage() =>
        File.Exists("/proc/loadavg") ? string.Join(" ", File.ReadAllText("/proc/loadavg").Split(' ').Take(3)) : "unknown";
}
