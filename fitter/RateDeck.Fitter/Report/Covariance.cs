using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.Fitting.Report;

/// <summary>
/// The linearised covariance of the estimates from the Jacobian J of the weighted residuals with
/// respect to the parameter values at the optimum: C = s^2 (J^T J)^-1 with s^2 = RSS / dof, or
/// (J^T J)^-1 when the data give standard deviations. Computed from the SVD of the column-scaled
/// Jacobian J diag(1/|J_j|) (thin QR first), never by inverting J^T J, whose condition is the square.
/// A scaled singular value below <see cref="UndeterminedThreshold"/> is a direction the data
/// do not determine: it is left out of the pseudo-inverse and the standard errors of the
/// parameters it involves are reported as not determined (NaN).
/// </summary>
public sealed class Covariance
{
    /// <summary>
    /// Scaled singular values below this are undetermined: the central-difference Jacobian is
    /// accurate to about 1e-10 relative, so smaller values are indistinguishable from zero.
    /// </summary>
    public const double UndeterminedThreshold = 1e-8;

    /// <summary>A component above this in an undetermined direction marks the parameter as involved.</summary>
    public const double InvolvementThreshold = 0.01;

    /// <summary>Computes the covariance; <paramref name="variance"/> multiplies (J^T J)^-1 (s^2, or 1 with given standard deviations).</summary>
    public Covariance(double[,] jacobian, double variance)
    {
        ArgumentNullException.ThrowIfNull(jacobian);
        var m = jacobian.GetLength(0);
        var p = jacobian.GetLength(1);
        var norms = new double[p];
        for (var j = 0; j < p; j++)
        {
            var sum = 0.0;
            for (var i = 0; i < m; i++)
            {
                sum += jacobian[i, j] * jacobian[i, j];
            }

            norms[j] = Math.Sqrt(sum);
        }

        Matrix = new double[p, p];
        var undetermined = new List<double[]>();
        if (p == 0 || m < p)
        {
            SingularValues = [];
            Undetermined = undetermined;
            return;
        }

        var scaled = DenseMatrix.Create(m, p, (i, j) => norms[j] > 0 ? jacobian[i, j] / norms[j] : 0);
        var svd = scaled.QR(MathNet.Numerics.LinearAlgebra.Factorization.QRMethod.Thin).R.Svd(computeVectors: true);
        SingularValues = svd.S.ToArray();
        var v = svd.VT.Transpose();
        for (var k = 0; k < p; k++)
        {
            var s = SingularValues[k];
            if (!(s >= UndeterminedThreshold))
            {
                undetermined.Add([.. Enumerable.Range(0, p).Select(j => v[j, k])]);
                continue;
            }

            for (var a = 0; a < p; a++)
            {
                for (var b = 0; b < p; b++)
                {
                    Matrix[a, b] += v[a, k] * v[b, k] / (s * s);
                }
            }
        }

        for (var a = 0; a < p; a++)
        {
            for (var b = 0; b < p; b++)
            {
                Matrix[a, b] *= variance / (norms[a] * norms[b]);
            }
        }

        Undetermined = undetermined;
        StandardErrors = [.. Enumerable.Range(0, p).Select(j =>
            norms[j] == 0 || undetermined.Any(direction => Math.Abs(direction[j]) > InvolvementThreshold) ? double.NaN : Math.Sqrt(Matrix[j, j]))];
    }

    /// <summary>The covariance matrix of the parameter values.</summary>
    public double[,] Matrix { get; }

    /// <summary>Singular values of the column-scaled Jacobian, largest first.</summary>
    public double[] SingularValues { get; }

    /// <summary>The undetermined directions (unit vectors over the parameters, in the scaled variables).</summary>
    public IReadOnlyList<double[]> Undetermined { get; }

    /// <summary>The standard error of each parameter (NaN when not determined).</summary>
    public double[] StandardErrors { get; } = [];

    /// <summary>The correlation matrix (NaN where a standard error is not determined).</summary>
    public double[,] Correlation()
    {
        var p = StandardErrors.Length;
        var result = new double[p, p];
        for (var a = 0; a < p; a++)
        {
            for (var b = 0; b < p; b++)
            {
                result[a, b] = a == b ? (double.IsNaN(StandardErrors[a]) ? double.NaN : 1.0) : Matrix[a, b] / (StandardErrors[a] * StandardErrors[b]);
            }
        }

        return result;
    }
}
