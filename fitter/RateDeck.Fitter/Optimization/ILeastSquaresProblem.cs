namespace RateDeck.Fitting.Optimization;

/// <summary>
/// A bounded nonlinear least-squares problem in the optimizer's variables u: minimise
/// sum r_i(u)^2 subject to Lower &lt;= u &lt;= Upper. A trial the model cannot evaluate (a negative
/// rate, a kT at zero, a propagator that refuses) is infeasible: the methods return false and the
/// optimizer rejects the trial instead of failing.
/// </summary>
public interface ILeastSquaresProblem
{
    /// <summary>Number of variables.</summary>
    int ParameterCount { get; }

    /// <summary>Number of residuals.</summary>
    int ResidualCount { get; }

    /// <summary>Lower bound of each variable (may be -infinity).</summary>
    IReadOnlyList<double> Lower { get; }

    /// <summary>Upper bound of each variable (may be +infinity).</summary>
    IReadOnlyList<double> Upper { get; }

    /// <summary>
    /// The RSS at or below which the residuals are the model's rounding (an exact fit): the
    /// optimizer stops there as converged when no step reduces the RSS further.
    /// </summary>
    double RoundingRss { get; }

    /// <summary>Fills <paramref name="residuals"/> at <paramref name="u"/>; false when the trial is infeasible.</summary>
    bool TryResiduals(double[] u, double[] residuals);

    /// <summary>
    /// Fills <paramref name="jacobian"/> (ResidualCount x ParameterCount, dr_i/du_j) at
    /// <paramref name="u"/>, where the residuals are <paramref name="residuals"/>; false when it
    /// cannot be evaluated. Returns the number of residual evaluations it spent (for the report).
    /// </summary>
    bool TryJacobian(double[] u, double[] residuals, double[,] jacobian, out int residualEvaluations);
}
