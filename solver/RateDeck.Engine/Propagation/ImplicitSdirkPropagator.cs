using System.Globalization;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// An L-stable implicit integrator with error control: the singly diagonally implicit Runge-Kutta
/// method SDIRK4 of Hairer and Wanner (Solving Ordinary Differential Equations II, sec. IV.6,
/// Table 6.5: five stages, gamma = 1/4, order 4, stiffly accurate, with an embedded order-3
/// solution for the error estimate).
/// <para>
/// Why this method. Every stage solves (I - h gamma K) Y = r with one real gamma, and I - h gamma K
/// is a column diagonally dominant M-matrix (off-diagonals -h gamma K_ij &lt;= 0, column excess
/// 1 + h gamma loss_j), so each solve runs through <see cref="MMatrixFactorization"/>: no pivoting,
/// no subtraction in the factors, one factorization per step size for all five stages. Radau IIA
/// of order 5 would need complex shifts, whose systems are not M-matrices; the backward
/// differentiation formulas above order 2 are not A-stable. L-stability (R(z) -&gt; 0 as
/// z -&gt; -infinity) damps modes 10^15 times faster than the step, and the error control follows
/// every slower mode, so every mode whose rate is above the time horizon is resolved whatever the
/// stiffness: the cost grows with the number of time scales crossed, not with rho t_end.
/// </para>
/// <para>
/// Stage derivatives are never formed as h K Y (which would carry errors of eps h rho |Y|): with
/// Z_i = h f(Y_i) the stage equation Y_i = y + sum_(j&lt;i) a_ij Z_j + gamma Z_i gives
/// Z_i = (Y_i - y - sum_(j&lt;i) a_ij Z_j) / gamma (Hairer and Wanner, sec. IV.8).
/// Error control: err = max_i |y_i - yhat_i| / (atol + rtol max(|y_i|, |y_new,i|)) with
/// rtol = <see cref="RelativeTolerance"/> and atol = <see cref="AbsoluteTolerance"/> times the
/// population scale (sum |P(0)| + t_end sum s), so every population above about 1e-12 of the total
/// is controlled relative to itself; the step grows or shrinks by 0.9 err^(-1/4) within [0.2, 4],
/// and is kept (with its factorization) when the proposed change is within [1, 1.5]; a step
/// clipped to land on an output time keeps the running step's factorization for the next step.
/// </para>
/// </summary>
public sealed class ImplicitSdirkPropagator : IPropagator
{
    /// <summary>Relative tolerance of the local error.</summary>
    public const double RelativeTolerance = 1e-10;

    /// <summary>Absolute tolerance of the local error, as a fraction of the population scale.</summary>
    public const double AbsoluteTolerance = 1e-22;

    /// <summary>Steps after which the integration gives up with <see cref="IntegrationGaveUpException"/> (a deck crossing that many time scales, or asking for that many output times, is better served by another path or fewer outputs).</summary>
    public const int MaxSteps = 2_000_000;

    private const double _gamma = 0.25;

    /// <summary>Stage coefficients a_ij below the diagonal (Hairer and Wanner, Table IV.6.5).</summary>
    private static readonly double[][] _a =
    [
        [],
        [1.0 / 2],
        [17.0 / 50, -1.0 / 25],
        [371.0 / 1360, -137.0 / 2720, 15.0 / 544],
        [25.0 / 24, -49.0 / 48, 125.0 / 16, -85.0 / 12],
    ];

    /// <summary>b - bhat: the solution is the last stage (b = its row, with gamma); bhat = (59/48, -17/96, 225/32, -85/12, 0).</summary>
    private static readonly double[] _errorWeights = [(25.0 / 24) - (59.0 / 48), (-49.0 / 48) + (17.0 / 96), (125.0 / 16) - (225.0 / 32), 0.0, 0.25];

    private readonly RateMatrix _rates;
    private readonly int _n;

    /// <summary>The largest off-diagonal rate or loss, to tell when h gamma K would overflow.</summary>
    private readonly double _maxRate;

    /// <summary>Integrator for <paramref name="rates"/> (dense form; every off-diagonal rate must be &gt;= 0).</summary>
    /// <exception cref="ArgumentException">K has a negative off-diagonal rate, so I - h gamma K is no M-matrix.</exception>
    public ImplicitSdirkPropagator(RateMatrix rates)
    {
        ArgumentNullException.ThrowIfNull(rates);
        var negative = false;
        var maxRate = rates.Loss.DefaultIfEmpty(0).Max();
        rates.ForEachOffDiagonal((_, _, rate) => (negative, maxRate) = (negative | rate < 0, Math.Max(maxRate, rate)));
        _maxRate = maxRate;
        if (negative)
        {
            throw new ArgumentException("the rate matrix has a negative off-diagonal rate, so the implicit integrator's systems are not M-matrices", nameof(rates));
        }

        _rates = rates;
        _n = rates.Count;
        Reason = "implicit SDIRK4 (L-stable, order 4, error-controlled) with subtraction-free M-matrix solves";
    }

    /// <inheritdoc />
    public string Name => "implicit-sdirk4";

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <summary>Steps accepted in the last <see cref="Propagate"/>.</summary>
    public int AcceptedSteps { get; private set; }

    /// <summary>Steps rejected by the error control in the last <see cref="Propagate"/>.</summary>
    public int RejectedSteps { get; private set; }

    /// <summary>Factorizations of I - h gamma K in the last <see cref="Propagate"/>.</summary>
    public int Factorizations { get; private set; }

    /// <summary>One line: steps, rejections and factorizations of the last run.</summary>
    public string Statistics => string.Create(CultureInfo.InvariantCulture, $"{AcceptedSteps} steps, {RejectedSteps} rejected, {Factorizations} factorizations");

    /// <inheritdoc />
    /// <exception cref="IntegrationGaveUpException"><see cref="MaxSteps"/> steps were taken and the last output time is not reached.</exception>
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(_n, initial, times);
        (AcceptedSteps, RejectedSteps, Factorizations) = (0, 0, 0);
        var end = times.Count == 0 ? 0.0 : times[^1];
        var scale = initial.Sum(Math.Abs) + (end * _rates.Pumping.Sum(Math.Abs));
        var atol = AbsoluteTolerance * (scale > 0 ? scale : 1.0);
        var maxDiagonal = Enumerable.Range(0, _n).Select(i => Math.Abs(_rates.Diagonal(i))).DefaultIfEmpty(0).Max();

        var y = (double[])initial.Clone();
        var t = 0.0;
        var populations = new double[times.Count][];
        var throttle = new ProgressThrottle(progress);
        var h = maxDiagonal > 0 ? 1e-3 / maxDiagonal : end;
        var stages = new double[5][];
        for (var s = 0; s < 5; s++)
        {
            stages[s] = new double[_n];
        }

        var stage = new double[_n];
        var candidate = new double[_n];
        // Two factorizations are kept: the running step's and the last clipped one's, so that a step
        // clipped to reach an output time does not cost the running step its factorization.
        var cache = new (double Step, StepFactors? Factors)[] { (double.NaN, null), (double.NaN, null) };
        for (var k = 0; k < times.Count; k++)
        {
            while (t < times[k])
            {
                if (AcceptedSteps + RejectedSteps >= MaxSteps)
                {
                    throw new IntegrationGaveUpException(string.Create(CultureInfo.InvariantCulture,
                        $"the implicit integrator gave up after {MaxSteps:N0} steps, its limit ({AcceptedSteps:N0} accepted, {RejectedSteps:N0} rejected), at t = {Text.Format.Time(t, _rates.TimeUnit)} of {Text.Format.Time(end, _rates.TimeUnit)}, with {k:N0} of {times.Count:N0} output times reached"));
                }

                var remaining = times[k] - t;
                var step = Math.Min(h, remaining);
                if (remaining - step < 1e-12 * remaining)
                {
                    step = remaining;
                }

                var slot = step == cache[0].Step ? 0 : step == cache[1].Step ? 1 : -1;
                if (slot < 0)
                {
                    slot = step < h ? 1 : 0;
                    cache[slot] = (step, Factor(step));
                    Factorizations++;
                }

                var error = TryStep(cache[slot].Factors!, step, y, stages, stage, candidate, atol);
                if (error <= 1)
                {
                    (y, candidate) = (candidate, y);
                    t = step == remaining ? times[k] : t + step;
                    AcceptedSteps++;
                }
                else
                {
                    RejectedSteps++;
                }

                // A step clipped to reach an output time does not set the next step size, unless it failed.
                if (step < h && error <= 1)
                {
                    continue;
                }

                var proposal = step * Math.Clamp(0.9 * Math.Pow(Math.Max(error, 1e-300), -0.25), 0.2, 4.0);
                h = error <= 1 && proposal >= step && proposal <= 1.5 * step ? step : proposal;
            }

            populations[k] = (double[])y.Clone();
            throttle.Report((double)(k + 1) / times.Count);
        }

        throttle.Complete();
        return new Trajectory([.. times], populations);
    }

    /// <summary>
    /// I - h gamma K as an M-matrix: off-diagonal magnitudes h gamma K_ij, column excess 1 + h gamma loss_j.
    /// When h gamma times the largest rate could overflow (rates near 1e308), the matrix is factored as
    /// 2^-e (I - h gamma K) with h gamma 2^-e in [0.5, 1), exactly, and the right side is scaled alike.
    /// </summary>
    private StepFactors Factor(double step)
    {
        var scale = step * _gamma;
        var shrink = scale * _maxRate > 1e300 ? Math.ScaleB(1, -Math.ILogB(scale) - 1) : 1;
        var scaled = scale * shrink;
        var offDiagonal = new double[_n * _n];
        _rates.ForEachOffDiagonal((i, j, rate) => offDiagonal[(j * _n) + i] = scaled * rate);
        var excess = new double[_n];
        for (var j = 0; j < _n; j++)
        {
            excess[j] = shrink + (scaled * _rates.Loss[j]);
        }

        return new StepFactors(MMatrixFactorization.Factor(_n, offDiagonal, excess), shrink);
    }

    /// <summary>The factors of shrink (I - h gamma K); a solve scales the right side by the same power of two.</summary>
    private sealed class StepFactors(MMatrixFactorization factors, double shrink)
    {
        public void Solve(double[] b)
        {
            if (shrink != 1)
            {
                for (var i = 0; i < b.Length; i++)
                {
                    b[i] *= shrink;
                }
            }

            factors.Solve(b);
        }
    }

    /// <summary>One SDIRK4 step of size <paramref name="step"/> from <paramref name="y"/> into <paramref name="result"/>; returns the scaled error (accept when &lt;= 1).</summary>
    private double TryStep(StepFactors factors, double step, double[] y, double[][] z, double[] stage, double[] result, double atol)
    {
        var pumping = _rates.Pumping;
        for (var s = 0; s < 5; s++)
        {
            // Y_s = (I - h gamma K)^-1 (y + sum_(j<s) a_sj Z_j + h gamma p); Z_s = (Y_s - y - sum_(j<s) a_sj Z_j) / gamma.
            var row = _a[s];
            for (var i = 0; i < _n; i++)
            {
                var known = y[i];
                for (var j = 0; j < row.Length; j++)
                {
                    known += row[j] * z[j][i];
                }

                stage[i] = known + (step * _gamma * pumping[i]);
                z[s][i] = known;
            }

            factors.Solve(stage);
            for (var i = 0; i < _n; i++)
            {
                z[s][i] = (stage[i] - z[s][i]) / _gamma;
            }
        }

        // The last stage is the solution (stiffly accurate).
        var error = 0.0;
        for (var i = 0; i < _n; i++)
        {
            result[i] = stage[i];
            var difference = 0.0;
            for (var s = 0; s < 5; s++)
            {
                difference += _errorWeights[s] * z[s][i];
            }

            var tolerance = atol + (RelativeTolerance * Math.Max(Math.Abs(y[i]), Math.Abs(stage[i])));
            error = Math.Max(error, Math.Abs(difference) / tolerance);
        }

        return double.IsFinite(error) ? error : double.PositiveInfinity;
    }
}
