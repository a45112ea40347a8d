using RateDeck.Fitting.Optimization;

namespace RateDeck.Fitting.Report;

/// <summary>One estimate.</summary>
/// <param name="Name">The free key.</param>
/// <param name="Value">The estimate.</param>
/// <param name="StandardError">Its standard error (NaN when the data do not determine it).</param>
/// <param name="Start">The start value of the first start.</param>
/// <param name="Bound">"lower" or "upper" when the estimate sits on a bound, else null.</param>
/// <param name="ProfileLower">Lower end of the profile-likelihood interval, when asked for.</param>
/// <param name="ProfileUpper">Upper end of the profile-likelihood interval, when asked for.</param>
/// <param name="ProfileOpen">The ends ("lower", "upper" or both, comma-separated) where the profile stays below the threshold up to the parameter's bound; null when none.</param>
public sealed record ParameterEstimate(string Name, double Value, double StandardError, double Start, string? Bound, double? ProfileLower = null, double? ProfileUpper = null, string? ProfileOpen = null);

/// <summary>
/// What a fit reports (SPEC 4): estimates with standard errors, correlations, RSS, residual
/// standard deviation, degrees of freedom, the optimizer's counts and stop reason, and warnings.
/// </summary>
public sealed record FitReport
{
    /// <summary>The estimates, in [fit.free] order.</summary>
    public required IReadOnlyList<ParameterEstimate> Parameters { get; init; }

    /// <summary>The correlation matrix in the same order.</summary>
    public required double[,] Correlation { get; init; }

    /// <summary>Sum of squared (weighted) residuals.</summary>
    public required double Rss { get; init; }

    /// <summary>sqrt(RSS / dof).</summary>
    public required double ResidualSd { get; init; }

    /// <summary>Observations minus free parameters.</summary>
    public required int Dof { get; init; }

    /// <summary>Number of observed values.</summary>
    public required int Observations { get; init; }

    /// <summary>Where the standard errors come from, in words.</summary>
    public required string ErrorSource { get; init; }

    /// <summary>The run that gave the estimates.</summary>
    public required LeastSquaresResult Best { get; init; }

    /// <summary>Residual evaluations over every start (a Jacobian by differences costs 2 per parameter).</summary>
    public required int TotalResidualEvaluations { get; init; }

    /// <summary>How many starts ran, and how many of them converged.</summary>
    public required (int Run, int Converged) Starts { get; init; }

    /// <summary>Singular values of the column-scaled Jacobian, largest first.</summary>
    public required double[] ScaledSingularValues { get; init; }

    /// <summary>Warnings, one line each.</summary>
    public required IReadOnlyList<string> Warnings { get; init; }

    /// <summary>How each parameter's Jacobian column was formed: "analytic", or "central differences (why)".</summary>
    public required IReadOnlyDictionary<string, string> Derivatives { get; init; }

    /// <summary>Exact trajectories computed over every start (trials and differences; an analytic Jacobian reuses the trial's).</summary>
    public required int TrajectoryEvaluations { get; init; }

    /// <summary>The rule of the profile-likelihood intervals (level and RSS threshold), or null when they were not asked for.</summary>
    public string? ProfileRule { get; init; }

    /// <summary>True when the best run converged.</summary>
    public bool Converged => Best.Converged;
}
