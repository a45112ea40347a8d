using System.Diagnostics;

namespace RateDeck.Bench;

/// <summary>Wall-clock timing: warm-up runs first (JIT, library initialisation, caches), then the median of the timed runs.</summary>
public static class Timing
{
    /// <summary>Seconds of each timed run of <paramref name="work"/>, after <paramref name="warmups"/> untimed runs.</summary>
    public static double[] Measure(Action work, int warmups, int runs)
    {
        for (var i = 0; i < warmups; i++)
        {
            work();
        }

        var seconds = new double[runs];
        for (var i = 0; i < runs; i++)
        {
            var clock = Stopwatch.StartNew();
            work();
            seconds[i] = clock.Elapsed.TotalSeconds;
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
