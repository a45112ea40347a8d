using System.Globalization;
using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// The driving loop of the explicit fixed-step methods for dP/dt = K P + s. Between two output
/// times the step is <see cref="TimeStep"/>, except the last step before each output, which is
/// shortened so that the state lands exactly on the output time (the step grid restarts there;
/// a remainder within 1e-9 of a whole step is not given a step of its own). Work vectors are
/// allocated once per <see cref="Propagate"/> call, never per step; progress is reported at most
/// 100 times. Stability is the caller's business (see the stiffness diagnostics).
/// </summary>
public abstract class FixedStepPropagator : IPropagator
{
    private const double _stepCountSlack = 1e-9;
    /// <summary>Most steps between two outputs: beyond this the run would take years, and the step count no longer fits the loop.</summary>
    public const double MaxStepsPerOutput = 1e15;
    private readonly RateMatrix _rates;
    private readonly double[] _pumping;

    /// <summary>Sets up a method of the given name and work-vector count on K and s of <paramref name="rates"/>.</summary>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="dt"/> is not positive and finite.</exception>
    protected FixedStepPropagator(RateMatrix rates, double dt, string name, string description, int workVectorCount)
    {
        ArgumentNullException.ThrowIfNull(rates);
        if (!(dt > 0) || !double.IsFinite(dt))
        {
            throw new ArgumentOutOfRangeException(nameof(dt), dt, "the time step must be positive and finite");
        }

        StateCount = rates.Count;
        _rates = rates;
        _pumping = rates.Pumping;
        TimeStep = dt;
        Name = name;
        WorkVectorCount = workVectorCount;
        Reason = string.Create(
            CultureInfo.InvariantCulture,
            $"{description}, fixed step dt = {Text.Format.Time(dt, rates.TimeUnit)}; the last step before each output is shortened to land on it");
    }

    /// <inheritdoc />
    public string Name { get; }

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <summary>The fixed step dt.</summary>
    public double TimeStep { get; }

    /// <summary>Number of states N.</summary>
    protected int StateCount { get; }

    /// <summary>How many length-N work vectors <see cref="Step"/> receives.</summary>
    protected int WorkVectorCount { get; }

    /// <inheritdoc />
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(StateCount, initial, times);
        var work = new double[WorkVectorCount][];
        for (var w = 0; w < work.Length; w++)
        {
            work[w] = new double[StateCount];
        }

        var throttle = new ProgressThrottle(progress);
        var endTime = times.Count > 0 ? times[^1] : 0.0;
        var populations = new double[times.Count][];
        var p = (double[])initial.Clone();
        var t = 0.0;
        for (var k = 0; k < times.Count; k++)
        {
            var target = times[k];
            var span = target - t;
            if (span > 0)
            {
                var stepCount = Math.Ceiling(span / TimeStep - _stepCountSlack);
                if (stepCount > MaxStepsPerOutput)
                {
                    throw new ArgumentException("the time step is too small for the output times (more than 1e15 steps)", nameof(times));
                }

                var steps = Math.Max(1L, (long)stepCount);
                var lastStep = span - (steps - 1) * TimeStep;
                for (var m = 1L; m <= steps; m++)
                {
                    Step(p, m < steps ? TimeStep : lastStep, work);
                    throttle.Report((t + m * TimeStep) / endTime);
                }

                t = target;
            }

            populations[k] = (double[])p.Clone();
        }

        throttle.Complete();
        return new Trajectory(times.ToArray(), populations);
    }

    /// <summary>Advances <paramref name="p"/> in place by one step of length <paramref name="h"/>.</summary>
    protected abstract void Step(double[] p, double h, double[][] work);

    /// <summary>Writes dP/dt = K P + s into <paramref name="derivative"/>: O(N^2) for dense K, O(stored entries) for sparse K.</summary>
    protected void EvaluateDerivative(ReadOnlySpan<double> p, Span<double> derivative)
    {
        _pumping.CopyTo(derivative);
        _rates.MultiplyAdd(p, derivative);
    }
}
