using System.Globalization;
using System.Numerics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Propagation;

/// <summary>
/// Exact propagation of a sparse (banded) generator obeying detailed balance, without eigenvectors:
/// the rational approximation of the exponential from the trapezoidal rule on a parabolic Hankel
/// contour around the negative real axis,
/// e^x = (1 / 2 pi i) integral of e^z / (z - x) dz ~ sum_k Im[w_k / (z_k - x)],
/// with z(theta) = M (0.1309 - 0.1194 theta^2 + 0.2500 i theta), M = <see cref="NodeCount"/> nodes
/// theta_k = -pi + (k - 1/2) 2 pi / M, of which the M/2 in the upper half-plane are used
/// (conjugate symmetry), w_k = (2 / M) e^(z_k) z'(theta_k) (L. N. Trefethen, J. A. C. Weideman
/// and T. Schmelzer, "Talbot quadratures and rational approximations", BIT Numer. Math. 46 (2006)
/// 653; the contour constants are quoted from memory and checked: see below).
/// <para>
/// With S = D^(-1/2) K D^(1/2) symmetric (<see cref="SymmetrizedGenerator.BuildBand"/>),
/// e^(tS) u = sum_k Im[w_k (z_k I - t S)^(-1) u] and the pumping term
/// t phi1(tS) s~ = t sum_k Im[(w_k / z_k) (z_k I - t S)^(-1) s~] (the same contour applied to
/// (e^z - 1) / z, whose integrand has the poles z = x and z = 0). Each output time costs M/2
/// complex band solves of O(N b^2) (<see cref="ComplexBandSolver"/>), independent of t: a
/// 20,000-state nearest-neighbour ladder needs about 20 x 20,000 x 30 flops per output time and
/// O(N) memory. Scaling of P(0) and s as on the symmetric eigen path (<see cref="EquilibriumScaling"/>).
/// </para>
/// <para>
/// Accuracy. S is symmetric, so the error of the approximation is the scalar one on its spectrum:
/// max over x in [-1e9, 0] of |e^x - r(x)| measured 1.5e-14 for M = 40 (and 2.9e-15 for the
/// (e^x - 1) / x form), by a NumPy evaluation of the formula above on 20,000 points; this class's
/// tests compare it with the analytic random walk and with the eigen path. Rounding in the solves
/// adds about eps times the condition of z I - t S.
/// </para>
/// <para>
/// Null space. For t rho far beyond 1 the stored S resolves its zero eigenvalue only to about
/// eps rho, and t times that would make the total population drift (measured before this was
/// added: 9e-10 at t rho = 2.5e7). So the component of each loss-free closed class's stationary
/// vector, sqrt(pi) on the class in the scaled variables (exact under detailed balance, SPEC 2),
/// is split off and carried exactly (constant, and growing like t under pumping); the contour
/// propagates only the rest, as the eigen path sets eigenvalues within its tolerance to zero.
/// </para>
/// </summary>
public sealed class ContourExponentialPropagator : IPropagator
{
    /// <summary>Quadrature nodes M on the whole contour; M/2 complex solves per output time.</summary>
    public const int NodeCount = 40;

    /// <summary>Uniform error bound of the rational approximation on the negative real axis, measured for <see cref="NodeCount"/> nodes (see the class remarks), with a margin.</summary>
    public const double ApproximationError = 5e-14;

    private readonly SymmetricBand _band;
    private readonly EquilibriumScaling _scaling;
    private readonly double[] _pumping;
    private readonly bool _driven;
    private readonly Complex[] _nodes;
    private readonly Complex[] _weights;
    private readonly double[][] _nullVectors;

    /// <summary>Sets up the contour for the sparse generator of <paramref name="rates"/>.</summary>
    /// <exception cref="ArgumentException">K is dense, or some ln pi_i is not finite.</exception>
    public ContourExponentialPropagator(RateMatrix rates)
    {
        ArgumentNullException.ThrowIfNull(rates);
        if (rates.States.LogEquilibrium.Any(v => !double.IsFinite(v)))
        {
            throw new ArgumentException("every ln pi_i must be finite for the symmetric path", nameof(rates));
        }

        _band = SymmetrizedGenerator.BuildBand(rates);
        _scaling = new EquilibriumScaling(rates.States.LogEquilibrium);
        _pumping = rates.Pumping;
        _driven = rates.IsDriven;
        (_nodes, _weights) = Contour(NodeCount);
        _nullVectors = [.. Diagnostics.TransitionGraph.Classify(rates).Closed.Where(c => !c.HasLoss).Select(c => ScaledStationaryVector(rates.States.LogEquilibrium, c.States))];
        Reason = string.Create(
            CultureInfo.InvariantCulture,
            $"rational approximation of the exponential on a Hankel contour ({NodeCount / 2} complex band solves of bandwidth {_band.Bandwidth} per output time, O(N) memory)");
    }

    /// <inheritdoc />
    public string Name => "contour-exponential";

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <summary>log10(max pi / min pi).</summary>
    public double EquilibriumDecades => _scaling.Decades;

    /// <summary>
    /// Estimated error of the populations relative to the population present: the approximation
    /// error (plus N eps for rounding) times the amplification of the scaled start, as on the
    /// symmetric eigen path (<see cref="SymmetricEigenPropagator.RelativeErrorEstimate"/>).
    /// </summary>
    public double RelativeErrorEstimate(double[] initial)
    {
        PropagationInput.Check(_band.Count, initial, []);
        var amplification = Math.Max(_scaling.Amplification(initial), _scaling.Amplification(_pumping));
        return (ApproximationError + (_band.Count * Precision.MachineEpsilon)) * amplification;
    }

    /// <summary>The estimate for the worst start, all population in the least probable state.</summary>
    public double WorstCaseRelativeError =>
        (ApproximationError + (_band.Count * Precision.MachineEpsilon)) * Math.Max(Math.Exp(_scaling.HalfLogRange), _scaling.Amplification(_pumping));

    /// <inheritdoc />
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(_band.Count, initial, times);
        var n = _band.Count;
        var (start, startScale) = _scaling.Scale(initial);
        var (source, sourceScale) = _scaling.Scale(_pumping);
        var startNull = SplitOffNullSpace(start);
        var sourceNull = SplitOffNullSpace(source);
        double[][] rightSides = _driven ? [start, source] : [start];
        var populations = new double[times.Count][];
        var throttle = new ProgressThrottle(progress);
        var done = 0;
        // The output times are independent: each is computed whole by one worker, in the same
        // order of operations whatever the number of workers, so the result does not depend on it.
        var workers = new ParallelOptions { MaxDegreeOfParallelism = Environment.ProcessorCount };
        Parallel.For(0, times.Count, workers, () => (Solver: new ComplexBandSolver(_band, rightSides.Length), Free: new double[n], Driven: new double[n]), (m, _, worker) =>
        {
            var t = times[m];
            populations[m] = t == 0 ? (double[])initial.Clone() : PopulationsAt(t, worker.Solver, rightSides, startNull, sourceNull, startScale, sourceScale, worker.Free, worker.Driven);
            lock (throttle)
            {
                throttle.Report(++done / (double)times.Count);
            }

            return worker;
        }, _ => { });
        throttle.Complete();
        return new Trajectory(times.ToArray(), populations);
    }

    /// <summary>P(t) from the scaled start and source, with one worker's solver and scratch arrays.</summary>
    private double[] PopulationsAt(double t, ComplexBandSolver solver, double[][] rightSides, double[] startNull, double[] sourceNull, double startScale, double sourceScale, double[] free, double[] driven)
    {
        var n = _band.Count;
        AddNullSpace(free, startNull, 1.0);
        AddNullSpace(driven, sourceNull, t);
        for (var k = 0; k < _nodes.Length; k++)
        {
            var x = solver.Solve(_nodes[k], t, rightSides);
            var w = _weights[k];
            var wOverZ = t * w / _nodes[k];
            for (var i = 0; i < n; i++)
            {
                free[i] += Im(w, x[i * rightSides.Length]);
                if (_driven)
                {
                    driven[i] += Im(wOverZ, x[(i * rightSides.Length) + 1]);
                }
            }
        }

        var p = new double[n];
        for (var i = 0; i < n; i++)
        {
            p[i] = _scaling.Unscale(free[i], i, startScale) + (_driven ? _scaling.Unscale(driven[i], i, sourceScale) : 0.0);
        }

        return p;
    }

    /// <summary>The nodes z_k and weights w_k of the upper half of the parabolic contour with <paramref name="count"/> nodes in all.</summary>
    internal static (Complex[] Nodes, Complex[] Weights) Contour(int count)
    {
        var h = 2 * Math.PI / count;
        var nodes = new Complex[count / 2];
        var weights = new Complex[count / 2];
        for (var k = 0; k < count / 2; k++)
        {
            var theta = (k + 0.5) * h;
            var z = count * new Complex(0.1309 - (0.1194 * theta * theta), 0.25 * theta);
            var dz = count * new Complex(-2 * 0.1194 * theta, 0.25);
            nodes[k] = z;
            weights[k] = h / Math.PI * Complex.Exp(z) * dz;
        }

        return (nodes, weights);
    }

    /// <summary>sqrt(pi) on <paramref name="states"/>, zero elsewhere, unit 2-norm, formed in log space.</summary>
    private static double[] ScaledStationaryVector(double[] logPi, int[] states)
    {
        var top = states.Max(i => 0.5 * logPi[i]);
        var vector = new double[logPi.Length];
        foreach (var i in states)
        {
            vector[i] = Math.Exp((0.5 * logPi[i]) - top);
        }

        var norm = Math.Sqrt(states.Sum(i => vector[i] * vector[i]));
        foreach (var i in states)
        {
            vector[i] /= norm;
        }

        return vector;
    }

    /// <summary>Removes from <paramref name="u"/> its components along the null vectors (orthonormal: disjoint supports) and returns them.</summary>
    private double[] SplitOffNullSpace(double[] u)
    {
        var components = new double[_nullVectors.Length];
        for (var c = 0; c < _nullVectors.Length; c++)
        {
            var q = _nullVectors[c];
            var a = 0.0;
            for (var i = 0; i < u.Length; i++)
            {
                a += q[i] * u[i];
            }

            for (var i = 0; i < u.Length; i++)
            {
                u[i] -= a * q[i];
            }

            components[c] = a;
        }

        return components;
    }

    /// <summary>Sets <paramref name="y"/> to <paramref name="factor"/> times the null-space part given by <paramref name="components"/>.</summary>
    private void AddNullSpace(double[] y, double[] components, double factor)
    {
        Array.Clear(y);
        for (var c = 0; c < _nullVectors.Length; c++)
        {
            var q = _nullVectors[c];
            var a = factor * components[c];
            for (var i = 0; i < y.Length; i++)
            {
                y[i] += a * q[i];
            }
        }
    }

    /// <summary>Im(a b).</summary>
    private static double Im(Complex a, Complex b) => (a.Real * b.Imaginary) + (a.Imaginary * b.Real);
}
