using System.Diagnostics;
using System.Globalization;

namespace RateDeck.Bench;

/// <summary>Wall time, peak resident memory (MB = 10^6 bytes) and processor time (user + system) of one child process, measured by GNU time (<c>/usr/bin/time -v</c>, Debian package <c>time</c>).</summary>
public sealed record ProcessMeasure(double Seconds, double PeakMegabytes, int ExitCode, double ProcessorSeconds = double.NaN);


/// <summary>Runs a command under /usr/bin/time -v and reads its report.</summary>
public static class ProcessRun
{
    private const string _timeTool = "/usr/bin/time";

    /// <summary>Runs <paramref name="program"/> with <paramref name="arguments"/>; throws when it fails, with its error output.</summary>
    public static ProcessMeasure Measure(string program, IReadOnlyList<string> arguments)
    {
        if (!File.Exists(_timeTool))
        {
            throw new InvalidOperationException("GNU time is needed for wall time and peak memory: apt-get install time");
        }

        var start = new ProcessStartInfo(_timeTool) { RedirectStandardError = true, RedirectStandardOutput = true };
        start.ArgumentList.Add("-v");
        start.ArgumentList.Add(program);
        foreach (var argument in arguments)
        {
            start.ArgumentList.Add(argument);
        }

        using var process = Process.Start(start) ?? throw new InvalidOperationException($"cannot start {program}");
        var output = process.StandardOutput.ReadToEndAsync();
        var report = process.StandardError.ReadToEnd();
        process.WaitForExit();
        _ = output.Result;
        var exit = (int)Field(report, "Exit status");
        if (exit != 0)
        {
            throw new InvalidOperationException($"{program} {string.Join(' ', arguments)} exited {exit}:\n{report}");
        }

        // GNU time reports kibibytes; megabytes here are 10^6 bytes, as in the memory target.
        return new ProcessMeasure(WallSeconds(report), Field(report, "Maximum resident set size (kbytes)") * 1024.0 / 1e6, exit,
            Field(report, "User time (seconds)") + Field(report, "System time (seconds)"));
    }

    private static double Field(string report, string name)
    {
        var line = report.Split('\n').Select(l => l.Trim()).First(l => l.StartsWith(name + ":", StringComparison.Ordinal));
        return double.Parse(line[(line.LastIndexOf(':') + 1)..].Trim(), CultureInfo.InvariantCulture);
    }

    /// <summary>"Elapsed (wall clock) time (h:mm:ss or m:ss): 0:03.12".</summary>
    private static double WallSeconds(string report)
    {
        var line = report.Split('\n').Select(l => l.Trim()).First(l => l.StartsWith("Elapsed (wall clock)", StringComparison.Ordinal));
        var value = line[(line.IndexOf("): ", StringComparison.Ordinal) + 3)..].Trim();
        return value.Split(':').Aggregate(0.0, (total, part) => (total * 60) + double.Parse(part, CultureInfo.InvariantCulture));
    }
}
