namespace RateDeck.Propagation;

/// <summary>
/// The largest differences between two trajectories on the same output times (SPEC 2: explicit
/// and exact results side by side). For each time t and state i, with a = first, b = second:
/// absolute |a - b|; relative |a - b| / max(|a|, |b|), entry by entry, over the entries where
/// max(|a|, |b|) is at least <see cref="TrajectoryComparison.RelativeFloor"/> of the total
/// population at that time (a state holding a billionth of the population would otherwise
/// dominate with a relative difference of order 1 that says nothing about the run); relative to
/// the total, |a - b| / max(sum_i |a_i|, 1e-300), which measures every entry against the
/// population present at that time.
/// </summary>
/// <param name="MaxAbsolute">Largest |a - b|.</param>
/// <param name="MaxRelative">Largest entrywise relative difference over the resolved entries.</param>
/// <param name="MaxRelativeToTotal">Largest |a - b| over the total population of the first trajectory at that time.</param>
/// <param name="WorstTime">Output time of <paramref name="MaxAbsolute"/>.</param>
/// <param name="WorstState">State index of <paramref name="MaxAbsolute"/>.</param>
public sealed record TrajectoryDifference(double MaxAbsolute, double MaxRelative, double MaxRelativeToTotal, double WorstTime, int WorstState);

/// <summary>Compares two trajectories (see <see cref="TrajectoryDifference"/> for the definitions).</summary>
public static class TrajectoryComparison
{
    /// <summary>Floor of every denominator, so that two zero populations differ by 0, not NaN.</summary>
    public const double DenominatorFloor = 1e-300;

    /// <summary>Entries below this fraction of the total population are left out of the entrywise relative difference.</summary>
    public const double RelativeFloor = 1e-9;

    /// <summary>The differences of <paramref name="b"/> from <paramref name="a"/>.</summary>
    /// <exception cref="ArgumentException">The output times or the state counts differ.</exception>
    public static TrajectoryDifference Compare(Trajectory a, Trajectory b)
    {
        ArgumentNullException.ThrowIfNull(a);
        ArgumentNullException.ThrowIfNull(b);
        if (!a.Times.SequenceEqual(b.Times) || a.Populations.Length != b.Populations.Length)
        {
            throw new ArgumentException("the trajectories must have the same output times", nameof(b));
        }

        var (absolute, relative, relativeToTotal, worstTime, worstState) = (0.0, 0.0, 0.0, a.Times.FirstOrDefault(), 0);
        for (var k = 0; k < a.Populations.Length; k++)
        {
            var (pa, pb) = (a.Populations[k], b.Populations[k]);
            if (pa.Length != pb.Length)
            {
                throw new ArgumentException("the trajectories must have the same number of states", nameof(b));
            }

            var total = Math.Max(pa.Sum(Math.Abs), DenominatorFloor);
            for (var i = 0; i < pa.Length; i++)
            {
                var difference = Math.Abs(pa[i] - pb[i]);
                var magnitude = Math.Max(Math.Abs(pa[i]), Math.Abs(pb[i]));
                if (magnitude >= RelativeFloor * total)
                {
                    relative = Math.Max(relative, difference / magnitude);
                }

                relativeToTotal = Math.Max(relativeToTotal, difference / total);
                if (difference > absolute)
                {
                    (absolute, worstTime, worstState) = (difference, a.Times[k], i);
                }
            }
        }

        return new TrajectoryDifference(absolute, relative, relativeToTotal, worstTime, worstState);
    }
}
