using System.Globalization;
using System.Numerics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using ComplexDense = MathNet.Numerics.LinearAlgebra.Complex.DenseMatrix;

namespace RateDeck.Propagation;

/// <summary>
/// Exact propagation without detailed balance by the general eigen-decomposition
/// K = V diag(l) V^(-1) in complex arithmetic (SPEC 2): P(t) = Re V [e^(l t) .* V^(-1) P(0)
/// + t phi1(l t) .* V^(-1) s], phi1(z) = (e^z - 1) / z. One O(N^3) decomposition and inversion
/// in the constructor, O(N^2) per output time. Rounding in the result is about
/// <see cref="EigenvectorCondition"/> times eps, so use it only while V is well conditioned;
/// <see cref="ExactPropagatorChoice"/> decides. Eigenvalues with |l| &lt;= 16 N eps rho are set to
/// exactly zero and positive real parts (rounding: a generator has none, by Gershgorin's theorem
/// on the columns) to zero.
/// </summary>
public sealed class GeneralEigenPropagator : IPropagator
{
    private readonly Complex[] _values;
    private readonly ComplexDense _vectors;
    private readonly ComplexDense _inverse;
    private readonly Complex[]? _pumping;

    /// <summary>Decomposes K of <paramref name="rates"/> with <paramref name="la"/> and inverts the eigenvector matrix.</summary>
    public GeneralEigenPropagator(RateMatrix rates, ILinearAlgebra la)
        : this(rates, (la ?? throw new ArgumentNullException(nameof(la))).GeneralEigen((rates ?? throw new ArgumentNullException(nameof(rates))).Generator), la)
    {
    }

    /// <summary>
    /// Uses a decomposition of K made before (<see cref="Diagnostics.Spectrum.General"/>), so that a
    /// run decomposes K once; it inverts the eigenvector matrix (O(N^3)) and copies nothing else.
    /// </summary>
    /// <exception cref="ArgumentException">The decomposition is not of order N.</exception>
    public GeneralEigenPropagator(RateMatrix rates, GeneralEigenDecomposition decomposition, ILinearAlgebra la)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(decomposition);
        ArgumentNullException.ThrowIfNull(la);
        if (decomposition.Values.Length != rates.Count)
        {
            throw new ArgumentException($"the decomposition is of order {decomposition.Values.Length}, the rate matrix has {rates.Count} states", nameof(decomposition));
        }

        SpectralRadius = decomposition.Values.Length == 0 ? 0.0 : decomposition.Values.Max(Complex.Abs);
        ZeroTolerance = Precision.ZeroEigenvalueTolerance(SpectralRadius, rates.Count);
        _values = decomposition.Values.Select(Clean).ToArray();
        _vectors = decomposition.Vectors;
        _inverse = (ComplexDense)_vectors.Inverse();
        var condition = _vectors.L1Norm() * _inverse.L1Norm();
        EigenvectorCondition = double.IsFinite(condition) ? condition : double.PositiveInfinity;
        _pumping = rates.IsDriven ? Transform(_inverse, rates.Pumping.Select(v => new Complex(v, 0)).ToArray()) : null;
        Reason = string.Create(
            CultureInfo.InvariantCulture,
            $"general eigen-decomposition of K ({la.Name}); eigenvector condition ||V||_1 ||V^-1||_1 = {Text.Format.Number(EigenvectorCondition)}");
    }

    /// <inheritdoc />
    public string Name => "general-eigen";

    /// <inheritdoc />
    public string Reason { get; internal set; }

    /// <summary>Eigenvalues of K after the zero clean-up, in the order of the decomposition.</summary>
    public IReadOnlyList<Complex> Eigenvalues => _values;

    /// <summary>rho = max |l|.</summary>
    public double SpectralRadius { get; }

    /// <summary>16 N eps rho: eigenvalues this close to zero are exactly zero.</summary>
    public double ZeroTolerance { get; }

    /// <summary>
    /// ||V||_1 ||V^(-1)||_1 with unit 2-norm eigenvector columns (computed from the explicit
    /// inverse, so exact rather than estimated); +infinity when V is singular (a defective K).
    /// </summary>
    public double EigenvectorCondition { get; }

    /// <inheritdoc />
    /// <exception cref="InvalidOperationException">The eigenvectors are linearly dependent.</exception>
    public Trajectory Propagate(double[] initial, IReadOnlyList<double> times, IProgress<double>? progress = null)
    {
        PropagationInput.Check(_values.Length, initial, times);
        if (double.IsPositiveInfinity(EigenvectorCondition))
        {
            throw new InvalidOperationException(
                "the eigenvectors of K are linearly dependent (a defective matrix): use the Pade exponential instead");
        }

        var n = _values.Length;
        var coefficients = Transform(_inverse, initial.Select(v => new Complex(v, 0)).ToArray());
        var modes = new Complex[n];
        var populations = new double[times.Count][];
        var throttle = new ProgressThrottle(progress);
        for (var k = 0; k < times.Count; k++)
        {
            var t = times[k];
            for (var m = 0; m < n; m++)
            {
                var lt = _values[m] * t;
                modes[m] = Complex.Exp(lt) * coefficients[m];
                if (_pumping is not null)
                {
                    modes[m] += t * SpectralFunctions.Phi1(lt) * _pumping[m];
                }
            }

            populations[k] = Transform(_vectors, modes).Select(c => c.Real).ToArray();
            throttle.Report((k + 1.0) / times.Count);
        }

        throttle.Complete();
        PropagationInput.PinStart(initial, times, populations);
        return new Trajectory(times.ToArray(), populations);
    }

    private Complex Clean(Complex l)
    {
        if (Complex.Abs(l) <= ZeroTolerance)
        {
            return Complex.Zero;
        }

        return l.Real > 0 ? new Complex(0, l.Imaginary) : l;
    }

    /// <summary>A x over the column-major storage of A.</summary>
    private static Complex[] Transform(ComplexDense a, Complex[] x)
    {
        var rows = a.RowCount;
        var storage = a.Values;
        var y = new Complex[rows];
        for (var j = 0; j < x.Length; j++)
        {
            var xj = x[j];
            if (xj == Complex.Zero)
            {
                continue;
            }

            var offset = j * rows;
            for (var i = 0; i < rows; i++)
            {
                y[i] += storage[offset + i] * xj;
            }
        }

        return y;
    }
}
