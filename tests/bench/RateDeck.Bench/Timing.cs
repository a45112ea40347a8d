using System.Diagnostics;

namespace RateDeck.Bench;

/// <summary>
/// Wall-clock timing: warm-up runs first (JIT, library initialisation, caches), then timed runs taken
/// round-robin over the contenders, so that a change of machine load during the measurement falls on
/// all of them alike. Report the median; on a busy machine the minimum is the better estimate of the
/// undisturbed time.
/// </summary>
public static class Timing
{
    /// <summary>Seconds of each timed run, per contender, after <paramref name="warmups"/> untimed runs of each.</summary>
    public static double[][] Measure(IReadOnlyList<Action> contenders, int warmups, int runs)
    {
        foreach (var work in contenders)
        {
            for (var i = 0; i < warmups; i++)
            {
                work();
            }
        }

        var seconds = contenders.Select(_ => new double[runs]).ToArray();
        for (var run = 0; run < runs; run++)
        {
            for (var c = 0; c < contenders.Count; c++)
            {
                var clock = Stopwatch.StartNew();
                contenders[c]();
                seconds[c][run] = clock.Elapsed.TotalSeconds;
            }
        }

        return seconds;
    }

    /// <summary>The median of the samples (the mean of the middle two for an even count).</summary>
    public static double Median(IReadOnlyList<double> samples)
    {
        var sorted = samples.Order().ToArray();
        var middle = sorted.Length / 2;
        return sorted.Length % 2 == 1 ? sorted[middle] : 0.5 * (sorted[middle - 1] + sorted[middle]);
    }
}
