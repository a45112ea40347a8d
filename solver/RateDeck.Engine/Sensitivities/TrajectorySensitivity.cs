using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Rates;

namespace RateDeck.Sensitivities;

/// <summary>
/// Analytic sensitivities of the exact trajectory on the symmetric eigen path: for
/// P(t) = exp(K t) P(0) + int_0^t exp(K s) ds S (S the pumping) and a change (dK, dS, dP(0)) of the
/// model (<see cref="GeneratorDerivative"/>),
/// dP(t) = int_0^t exp(K (t - s)) (dK P(s) + dS) ds + exp(K t) dP(0).
/// With K = X diag(l) X^-1, X = D^(1/2) V (D = diag(pi), V the eigenvectors of the symmetrised
/// generator the propagator decomposed), c = X^-1 P(0), d = X^-1 S and G = X^-1 dK X, the mode
/// coefficients of dP(t) are
/// w_m(t) = sum_n G_mn [t exp[l_m t, l_n t] c_n + t^2 exp[l_m t, l_n t, 0] d_n] + e^(l_m t) (X^-1 dP(0))_m + t phi1(l_m t) (X^-1 dS)_m,
/// the Daleckii-Krein formula with the divided differences of <see cref="DividedDifferences"/>
/// (exact for any dK, symmetrisable or not), and dP(t) = X w(t). One decomposition serves the
/// trajectory and every input: per input two N x N x N products (G), per output time O(N^2).
/// </summary>
public static class TrajectorySensitivity
{
    /// <summary>|ln pi_i| / 2 above this would overflow sqrt(pi_i) or its inverse: refused (the caller takes differences).</summary>
    public const double HalfLogLimit = 700;

    /// <summary>
    /// dP/d(input) at <paramref name="times"/> for each of <paramref name="changes"/>, as
    /// [input][time][state], on the decomposition of <paramref name="propagator"/> (which propagated
    /// <paramref name="rates"/> from <paramref name="initial"/>).
    /// </summary>
    /// <exception cref="NotSupportedException">pi spans too many decades for the unscaled transform.</exception>
    public static double[][][] Compute(SymmetricEigenPropagator propagator, RateMatrix rates, double[] initial, IReadOnlyList<double> times, IReadOnlyList<GeneratorDerivative> changes, ILinearAlgebra algebra)
    {
        ArgumentNullException.ThrowIfNull(propagator);
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(initial);
        ArgumentNullException.ThrowIfNull(times);
        ArgumentNullException.ThrowIfNull(changes);
        ArgumentNullException.ThrowIfNull(algebra);
        var n = rates.Count;
        var logPi = rates.States.LogEquilibrium;
        if (logPi.Any(l => Math.Abs(0.5 * l) > HalfLogLimit))
        {
            throw new NotSupportedException("pi spans too many decades for sqrt(pi) in double");
        }

        var root = logPi.Select(l => Math.Exp(0.5 * l)).ToArray();
        var vectors = propagator.Vectors;
        var values = propagator.Eigenvalues.ToArray();
        double[] Modes(double[] x) => algebra.Multiply(vectors, [.. x.Select((v, i) => v / root[i])], transposeA: true);
        var start = Modes(initial);
        var driven = rates.IsDriven;
        var pumping = driven ? Modes(rates.Pumping) : new double[n];
        var coupling = changes.Select(change =>
        {
            // D^-1/2 dK D^1/2 in the eigenbasis, row-major for the row sums below.
            var scaled = DenseMatrix.Create(n, n, (i, j) => change.Generator[(j * n) + i] * root[j] / root[i]);
            var g = algebra.Multiply(algebra.Multiply(vectors, scaled, transposeA: true), vectors);
            return g.ToRowMajorArray();
        }).ToArray();
        var startChanges = changes.Select(c => Modes(c.Initial)).ToArray();
        var pumpingChanges = changes.Select(c => Modes(c.Pumping)).ToArray();
        var modes = changes.Select(_ => new DenseMatrix(n, times.Count)).ToArray();
        var kernel = new double[n * n];
        var exp = new double[n];
        var phi = new double[n];
        var z = new double[n];
        for (var k = 0; k < times.Count; k++)
        {
            var t = times[k];
            for (var m = 0; m < n; m++)
            {
                z[m] = values[m] * t;
                exp[m] = Math.Exp(z[m]);
                phi[m] = SpectralFunctions.Phi1(z[m]);
            }

            // kernel_mn = t exp[z_m, z_n] c_n + t^2 exp[z_m, z_n, 0] d_n, z = l t; both differences are symmetric in m, n.
            for (var m = 0; m < n; m++)
            {
                for (var q = m; q < n; q++)
                {
                    var first = t * DividedDifferences.Exp1(z[m], z[q], exp[m], exp[q]);
                    var second = driven ? t * t * DividedDifferences.Exp2AtZero(z[m], z[q], phi[m], phi[q]) : 0;
                    kernel[(m * n) + q] = (first * start[q]) + (second * pumping[q]);
                    kernel[(q * n) + m] = (first * start[m]) + (second * pumping[m]);
                }
            }

            for (var p = 0; p < changes.Count; p++)
            {
                var g = coupling[p];
                for (var m = 0; m < n; m++)
                {
                    var sum = 0.0;
                    for (var q = 0; q < n; q++)
                    {
                        sum += g[(m * n) + q] * kernel[(m * n) + q];
                    }

                    modes[p][m, k] = sum + (exp[m] * startChanges[p][m]) + (t * phi[m] * pumpingChanges[p][m]);
                }
            }
        }

        return [.. modes.Select(w =>
        {
            var y = algebra.Multiply(vectors, w).Values;
            return times.Select((_, k) => root.Select((r, i) => r * y[(k * n) + i]).ToArray()).ToArray();
        })];
    }
}
