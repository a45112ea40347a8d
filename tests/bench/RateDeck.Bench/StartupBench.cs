using System.Diagnostics;
using System.Globalization;

namespace RateDeck.Bench;

/// <summary>
/// Start-up of the installed program (issue 9 §6): wall time of whole processes, round-robin in one
/// sitting: <c>check</c> of a 16-state kernel deck through the <c>ratedeck</c> script, by the program
/// it publishes (native code where clang is installed), by a ReadyToRun build (the script's other
/// route, published here into a scratch folder) and by the plain <c>dotnet build</c> output, and the
/// installed program's <c>--version</c> (the floor: process start-up and the command line). No
/// external tool needed.
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
        var installed = Repository.Cli();
        var readyToRun = PublishReadyToRun(Path.Combine(Path.GetTempPath(), "ratedeck-bench-readytorun"));
        var kind = IsNative(installed) ? "native" : "ReadyToRun";
        var contenders = new (string Label, string Program, string[] Arguments)[]
        {
            ("script check", Repository.Script, ["check", deck]),
            ($"installed ({kind}) check", installed, ["check", deck]),
            ("ReadyToRun check", readyToRun, ["check", deck]),
            ("plain build check", Repository.PlainCli(), ["check", deck]),
            ("installed --version", installed, ["--version"]),
        };

        output.WriteLine($"deck: {deck} ({States} states); installed: {installed} ({kind}); ReadyToRun: {readyToRun}; plain: {Repository.PlainCli()}");
        output.WriteLine($"timing: whole child processes, 1 warm-up each, then {runs} rounds round-robin; load average before: {LoadAverage()}");
        var seconds = Timing.Measure([.. contenders.Select(c => (Action)(() => WallSeconds(c.Program, c.Arguments)))], warmups: 1, runs);
        output.WriteLine($"load average after: {LoadAverage()}");
        output.WriteLine();
        output.WriteLine($"{"contender",-26}  {"median s",9}  {"min s",9}  {"max s",9}");
        for (var c = 0; c < contenders.Length; c++)
        {
            output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"{contenders[c].Label,-26}  {Timing.Median(seconds[c]),9:F3}  {seconds[c].Min(),9:F3}  {seconds[c].Max(),9:F3}"));
        }

        double Median(int c) => Timing.Median(seconds[c]);
        output.WriteLine();
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"installed / ReadyToRun, check (medians): {Median(1) / Median(2):F2}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"ReadyToRun / plain build, check (medians): {Median(2) / Median(3):F2}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"script / installed, check (medians): {Median(0) / Median(1):F2}"));
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"installed check above its --version floor (medians): {Median(1) - Median(4):F3} s"));
        output.WriteLine(string.Create(
            CultureInfo.InvariantCulture,
            $"target {TargetSeconds:F2} s for the installed program's check (median): script {Median(0):F3} s {(Median(0) <= TargetSeconds ? "met" : "NOT met")}, installed ({kind}) {Median(1):F3} s {(Median(1) <= TargetSeconds ? "met" : "NOT met")}"));
    }

    /// <summary>True for an ELF executable (magic 0x7F 'E' 'L' 'F'): a native build, not a runtime's apphost beside an assembly.</summary>
    private static bool IsNative(string program) =>
        !File.Exists(Path.ChangeExtension(program, ".dll")) && File.ReadAllBytes(program).AsSpan(0, 4).SequenceEqual("\u007fELF"u8);

    /// <summary>Publishes the ReadyToRun build the script makes where no clang is installed into <paramref name="folder"/>.</summary>
    private static string PublishReadyToRun(string folder)
    {
        var project = Path.Combine(Repository.Root, "solver", "RateDeck.Cli", "RateDeck.Cli.csproj");
        var publish = new ProcessStartInfo("dotnet", ["publish", project, "-c", "Release", "--use-current-runtime", "--self-contained", "false", "-o", folder, "--nologo", "-v", "quiet"])
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
        };
        using var process = Process.Start(publish) ?? throw new InvalidOperationException("cannot start dotnet publish");
        var output = process.StandardOutput.ReadToEndAsync();
        var error = process.StandardError.ReadToEnd();
        process.WaitForExit();
        return process.ExitCode == 0
            ? Path.Combine(folder, "ratedeck")
            : throw new InvalidOperationException($"dotnet publish (ReadyToRun) failed:\n{output.Result}{error}");
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
