using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Propagation;

/// <summary>
/// Exact propagation on the double-double eigen-decomposition of S = D^(-1/2) K D^(1/2)
/// (<see cref="ExtendedSymmetricEigen"/>, from the spectrum when the double one lost slow modes):
/// P(t) = D^(1/2) V [exp(L t) V^T u + diag(t phi1(l t)) V^T u_s] with u, u_s the scaled start and
/// pumping of <see cref="EquilibriumScaling"/>. The mode sums, exponentials and phi1 run in
/// double-double, and only the result is rounded to double, so the cancellation in a population
/// that is small against the total (say 1e-9 of it, at t = 1e-9) costs nothing at double
/// precision: each population is good to about 1e-16 of itself down to about 1e-16 of the total,
/// and every eigenvalue to N 2^-103 rho absolutely, which resolves modes 10^15 times slower than
/// the fastest. The structural null modes (eigenvalues within the spectrum's zero tolerance) are
/// set to exactly zero. Cost: N^2 double-double operations per output time.
/// </summary>
public sealed class ExtendedEigenPropagator : IPropagator
{
    private readonly int _n;
    private readonly DoubleDouble[] _values;
    private readonly DoubleDouble[] _vectors;
    private readonly EquilibriumScaling _scaling;
    private readonly double[] _pumping;

    /// <summary>Propagator for <paramref name="rates"/> on its extended decomposition; <paramref name="zeroTolerance"/> sets null modes to zero.</summary>
    public ExtendedEigenPropagator(RateMatrix rates, ExtendedSymmetricEigenDecomposition decomposition, double zeroTolerance)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(decomposition);
        if (decomposition.Count != rates.Count)
        {
            throw new ArgumentException($"the decomposition is of order {decomposition.Count}, the rate matrix has {rates.Count} states", nameof(decomposition));
        }

        _n = rates.Count;
        _values = [.. decomposition.Values.Select(v => Math.Abs(v.Hi) <= zeroTolerance ? DoubleDouble.Zero : v)];
        _vectors = decomposition.Vectors;
        _scaling = new EquilibriumScaling(rates.States.LogEquilibrium);
        _pumping = rates.Pumping;
        Reason = "symmetric eigen-decomposition in double-double";
    }

    /// <inheritdoc />
    public string Name => "extended-eigen";

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <inheritdoc />
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(_n, initial, times);
        var (start, startScale) = Project(initial);
        var driven = _pumping.Any(s => s != 0);
        var (source, sourceScale) = driven ? Project(_pumping) : ([], 0.0);
        var populations = new double[times.Count][];
        var throttle = new ProgressThrottle(progress);
        var modes = new DoubleDouble[_n];
        var sourceModes = new DoubleDouble[_n];
        for (var k = 0; k < times.Count; k++)
        {
            var t = times[k];
            for (var m = 0; m < _n; m++)
            {
                var rate = _values[m] * t;
                modes[m] = DoubleDouble.Exp(rate) * start[m];
                if (driven)
                {
                    // t phi1(l t) = (e^(l t) - 1) / l, and t itself for a null mode.
                    sourceModes[m] = (_values[m].Hi == 0 ? (DoubleDouble)t : DoubleDouble.ExpMinusOne(rate) / _values[m]) * source[m];
                }
            }

            var p = new double[_n];
            for (var i = 0; i < _n; i++)
            {
                var y = DoubleDouble.Zero;
                var ys = DoubleDouble.Zero;
                for (var m = 0; m < _n; m++)
                {
                    var v = _vectors[(m * _n) + i];
                    y += v * modes[m];
                    if (driven)
                    {
                        ys += v * sourceModes[m];
                    }
                }

                p[i] = _scaling.Unscale(y.Value, i, startScale) + (driven ? _scaling.Unscale(ys.Value, i, sourceScale) : 0.0);
            }

            populations[k] = p;
            throttle.Report((double)(k + 1) / times.Count);
        }

        PropagationInput.PinStart(initial, times, populations);
        throttle.Complete();
        return new Trajectory([.. times], populations);
    }

    /// <summary>V^T u in double-double, u the scaled vector, and its log scale.</summary>
    private (DoubleDouble[] Coefficients, double LogScale) Project(double[] x)
    {
        var (u, logScale) = _scaling.Scale(x);
        var coefficients = new DoubleDouble[_n];
        for (var m = 0; m < _n; m++)
        {
            var sum = DoubleDouble.Zero;
            for (var i = 0; i < _n; i++)
            {
                sum += _vectors[(m * _n) + i] * u[i];
            }

            coefficients[m] = sum;
        }

        return (coefficients, logScale);
    }
}
