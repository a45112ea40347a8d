namespace RateDeck.Propagation;

/// <summary>
/// Integrates dP/dt = K P + s from P(0) and reports P at the requested output times.
/// One implementation per method, one file each. A propagator is built for one rate matrix.
/// </summary>
public interface IPropagator
{
    /// <summary>Short method name for summaries and JSON, e.g. "rk4" or "symmetric-eigen".</summary>
    string Name { get; }

    /// <summary>Why this method was chosen or how it is set up (one line, for the summary).</summary>
    string Reason { get; }

    /// <summary>
    /// P at each time in <paramref name="times"/> (ascending, starting at or after 0).
    /// <paramref name="progress"/> receives the completed fraction in [0, 1].
    /// </summary>
    Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null);
}

/// <summary>Populations at output times: <c>Populations[k][i]</c> is state i at <c>Times[k]</c>.</summary>
public sealed record Trajectory(double[] Times, double[][] Populations);
