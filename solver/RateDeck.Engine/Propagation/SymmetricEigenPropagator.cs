using System.Globalization;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Propagation;

/// <summary>
/// Exact propagation for a generator obeying detailed balance (SPEC 2). Once, in the constructor:
/// S = D^(-1/2) K D^(1/2) = V L V^T (<see cref="SymmetrizedGenerator.Build"/>, O(N^3)). Then
/// P(t) = D^(1/2) V [exp(L t) V^T D^(-1/2) P(0) + diag(phi(l, t)) V^T D^(-1/2) s] with
/// phi(l, t) = (exp(l t) - 1) / l, evaluated as t phi1(l t) so that it tends to t as l -> 0.
/// Each output time costs O(N^2): the times are handled in blocks, one matrix-matrix product
/// V Z per block through <see cref="ILinearAlgebra.Multiply(DenseMatrix, DenseMatrix, bool, bool)"/>.
/// <para>
/// Scaling. pi may span hundreds of decades, so exp(+-0.5 ln pi_i) can overflow or underflow on
/// its own. A vector x (P(0) or s) is projected as u_i = x_i exp(-0.5 ln pi_i - c) with
/// c = max_i (ln|x_i| - 0.5 ln pi_i), so that max |u_i| = 1 exactly and nothing overflows; then
/// |W| = |V^T u| &lt;= sqrt(N) and |y| = |V (e^(Lt) W)| &lt;= sqrt(N) because V is orthogonal and
/// e^(l t) &lt;= 1 (likewise |t phi1(l t)| &lt;= t for l &lt;= 0). The population is recombined in one
/// exponent, P_i = sign(y_i) exp(ln|y_i| + 0.5 ln pi_i + c): an intermediate can overflow only if
/// this final value does, so the result is finite whenever the answer is.
/// </para>
/// <para>
/// Accuracy. The eigenvectors carry an absolute error of about N eps, so P_i carries an absolute
/// error of about N eps sqrt(pi_i) max_j(|P_j(0)| / sqrt(pi_j)): full accuracy when P(0) (and s)
/// is spread like pi or sits in the most probable states, but a start in states many decades
/// less probable than others loses the populations of the probable states (measured: a 20-state
/// ladder spanning 20 decades started at the top is off by 2e-7; at 60 decades by 5e12).
/// <see cref="RelativeErrorEstimate"/> gives this bound relative to the population;
/// <see cref="Propagate"/> refuses a start whose estimate exceeds <see cref="RelativeErrorLimit"/>,
/// and <see cref="ExactPropagatorChoice"/> then takes the Pade path instead.
/// </para>
/// Eigenvalues at or above -<see cref="ZeroTolerance"/> are set to exactly zero (a generator has
/// no positive eigenvalues, so anything above zero is rounding).
/// </summary>
public sealed class SymmetricEigenPropagator : IPropagator
{
    /// <summary>Largest <see cref="RelativeErrorEstimate"/> that <see cref="Propagate"/> accepts.</summary>
    public const double RelativeErrorLimit = 1e-9;

    private const int _timesPerBlock = 32;
    private readonly ILinearAlgebra _la;
    private readonly EquilibriumScaling _scaling;
    private readonly double[] _values;
    private readonly DenseMatrix _vectors;
    private readonly ScaledProjection? _pumping;
    private readonly double _pumpingAmplification;

    /// <summary>Decomposes the symmetrized generator of <paramref name="rates"/> with <paramref name="la"/>.</summary>
    /// <exception cref="ArgumentException">Some ln pi_i is not finite.</exception>
    public SymmetricEigenPropagator(RateMatrix rates, ILinearAlgebra la)
        : this(rates, Decompose(rates, la), la)
    {
    }

    /// <summary>
    /// Uses a decomposition of S = D^(-1/2) K D^(1/2) made before, so that a run decomposes S once:
    /// pass <c>Spectrum.Symmetric</c> of the diagnostics (<see cref="Diagnostics.Spectrum.Symmetric"/>).
    /// The eigenvectors are shared, not copied; <paramref name="la"/> does the products.
    /// </summary>
    /// <exception cref="ArgumentException">Some ln pi_i is not finite, or the decomposition is not N x N.</exception>
    public SymmetricEigenPropagator(RateMatrix rates, SymmetricEigenDecomposition decomposition, ILinearAlgebra la)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(decomposition);
        ArgumentNullException.ThrowIfNull(la);
        RequireFiniteLogPi(rates);
        var n = rates.Count;
        if (decomposition.Values.Length != n || decomposition.Vectors.RowCount != n || decomposition.Vectors.ColumnCount != n)
        {
            throw new ArgumentException($"the decomposition is of order {decomposition.Values.Length}, the rate matrix has {n} states", nameof(decomposition));
        }

        _la = la;
        _scaling = new EquilibriumScaling(rates.States.LogEquilibrium);
        SpectralRadius = decomposition.Values.Length == 0 ? 0.0 : decomposition.Values.Max(Math.Abs);
        ZeroTolerance = Precision.ZeroEigenvalueTolerance(SpectralRadius, rates.Count);
        _values = decomposition.Values.Select(l => l >= -ZeroTolerance ? 0.0 : l).ToArray();
        _vectors = decomposition.Vectors;
        _pumping = rates.IsDriven ? Project(rates.Pumping) : null;
        _pumpingAmplification = _scaling.Amplification(rates.Pumping);
        EquilibriumDecades = _scaling.Decades;
        WorstCaseRelativeError = ErrorFromAmplification(Math.Max(Math.Exp(_scaling.HalfLogRange), _pumpingAmplification));
        ZeroEigenvalueCount = _values.Count(l => l == 0);
        Reason = string.Create(
            CultureInfo.InvariantCulture,
            $"symmetric eigen-decomposition of D^-1/2 K D^1/2 ({la.Name}); {ZeroEigenvalueCount} zero eigenvalue(s) within {Text.Format.Rate(ZeroTolerance, rates.TimeUnit)}");
    }

    /// <inheritdoc />
    public string Name => "symmetric-eigen";

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <summary>Eigenvalues of S (= those of K), ascending, with those within <see cref="ZeroTolerance"/> of zero set to 0.</summary>
    public IReadOnlyList<double> Eigenvalues => _values;

    /// <summary>The orthonormal eigenvectors V of S, column m for <see cref="Eigenvalues"/>[m] (shared, not copied: do not modify).</summary>
    internal DenseMatrix Vectors => _vectors;

    /// <summary>rho = max |l|.</summary>
    public double SpectralRadius { get; }

    /// <summary>16 N eps rho: eigenvalues at or above minus this are exactly zero.</summary>
    public double ZeroTolerance { get; }

    /// <summary>How many eigenvalues were set to zero (the dimension of the null space when undriven and lossless).</summary>
    public int ZeroEigenvalueCount { get; }

    /// <summary>log10 (max pi / min pi): how many decades the equilibrium distribution spans.</summary>
    public double EquilibriumDecades { get; }

    /// <summary>
    /// <see cref="RelativeErrorEstimate"/> for the worst start, all population in the least
    /// probable state: N eps sqrt(max pi / min pi) (or the pumping's estimate, if larger).
    /// </summary>
    public double WorstCaseRelativeError { get; }

    /// <summary>
    /// Estimated rounding error of the propagated populations relative to the population present:
    /// N eps max_i sqrt(pi_i) max_j (|x_j| / sqrt(pi_j)) / sum_j |x_j| for x = P(0) and x = s,
    /// the larger of the two. About N eps when x is spread like pi.
    /// </summary>
    public double RelativeErrorEstimate(double[] initial)
    {
        PropagationInput.Check(_values.Length, initial, []);
        return ErrorFromAmplification(Math.Max(_scaling.Amplification(initial), _pumpingAmplification));
    }

    /// <inheritdoc />
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(_values.Length, initial, times);
        var estimate = RelativeErrorEstimate(initial);
        if (estimate > RelativeErrorLimit)
        {
            throw new InvalidOperationException(string.Create(
                CultureInfo.InvariantCulture,
                $"the symmetric eigen path would lose accuracy for this initial state (estimated error {Text.Format.Number(estimate)} of the population, pi spans {EquilibriumDecades:F0} decades): use ExactPropagatorChoice.Choose with the initial state, or the Pade exponential"));
        }

        var n = _values.Length;
        var start = Project(initial);
        var columnsPerTime = _pumping is null ? 1 : 2;
        var populations = new double[times.Count][];
        var throttle = new ProgressThrottle(progress);
        for (var first = 0; first < times.Count; first += _timesPerBlock)
        {
            var count = Math.Min(_timesPerBlock, times.Count - first);
            var modes = DenseMatrix.Create(n, count * columnsPerTime, 0.0);
            var z = modes.Values;
            for (var k = 0; k < count; k++)
            {
                var t = times[first + k];
                var column = k * columnsPerTime * n;
                for (var m = 0; m < n; m++)
                {
                    z[column + m] = Math.Exp(_values[m] * t) * start.Coefficients[m];
                    if (_pumping is not null)
                    {
                        z[column + n + m] = t * SpectralFunctions.Phi1(_values[m] * t) * _pumping.Coefficients[m];
                    }
                }
            }

            var y = _la.Multiply(_vectors, modes).Values;
            for (var k = 0; k < count; k++)
            {
                var column = k * columnsPerTime * n;
                var p = new double[n];
                for (var i = 0; i < n; i++)
                {
                    p[i] = _scaling.Unscale(y[column + i], i, start.LogScale);
                    if (_pumping is not null)
                    {
                        p[i] += _scaling.Unscale(y[column + n + i], i, _pumping.LogScale);
                    }
                }

                populations[first + k] = p;
            }

            throttle.Report((double)(first + count) / times.Count);
        }

        throttle.Complete();
        PropagationInput.PinStart(initial, times, populations);
        return new Trajectory(times.ToArray(), populations);
    }

    private static SymmetricEigenDecomposition Decompose(RateMatrix rates, ILinearAlgebra la)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(la);
        RequireFiniteLogPi(rates);
        return la.SymmetricEigen(SymmetrizedGenerator.Build(rates));
    }

    private static void RequireFiniteLogPi(RateMatrix rates)
    {
        if (rates.States.LogEquilibrium.Any(v => !double.IsFinite(v)))
        {
            throw new ArgumentException("every ln pi_i must be finite for the symmetric path", nameof(rates));
        }
    }

    private double ErrorFromAmplification(double amplification) => _values.Length * Precision.MachineEpsilon * amplification;

    /// <summary>W = V^T u with u the scaled vector of <see cref="EquilibriumScaling.Scale"/>.</summary>
    private ScaledProjection Project(double[] x)
    {
        var (u, logScale) = _scaling.Scale(x);
        return new ScaledProjection(_la.Multiply(_vectors, u, transposeA: true), logScale);
    }

    /// <summary>Mode coefficients V^T D^(-1/2) x divided by exp(c), c the scale of <see cref="EquilibriumScaling.LogScale"/>.</summary>
    private sealed record ScaledProjection(double[] Coefficients, double LogScale);
}
