namespace RateDeck.Diagnostics;

/// <summary>One named check and its outcome.</summary>
/// <param name="Name">Short name, e.g. "conservation".</param>
/// <param name="Passed">True when the check passed.</param>
/// <param name="Detail">What was measured, in plain words, with the tolerance.</param>
public sealed record CheckOutcome(string Name, bool Passed, string Detail);

/// <summary>How the deck's equilibrium pi, restricted to one closed class, agrees with the null vector of K on it.</summary>
/// <param name="Class">The closed class.</param>
/// <param name="MaxDifference">max_i |pi_i - v_i| with both normalised to sum 1 on the class; null when the class carries no null vector or the deck states no pi to compare.</param>
/// <param name="StationaryLaw">The matrix's own stationary law on the class (its null vector, summing to 1, in the class's state order); null when the class carries no null vector.</param>
public sealed record ClassAgreement(ClosedClass Class, double? MaxDifference, IReadOnlyList<double>? StationaryLaw = null);

/// <summary>Everything <see cref="MatrixChecks.Check(RateDeck.Rates.RateMatrix, RateDeck.LinearAlgebra.ILinearAlgebra)"/> measured.</summary>
/// <param name="NonFiniteCount">Entries of K, the losses or the pumping that are NaN or infinite.</param>
/// <param name="ConservationError">max_j |sum_i K_ij + loss_j| / max_j |K_jj|.</param>
/// <param name="WorstConservationState">Label of the column reaching <paramref name="ConservationError"/>, or null.</param>
/// <param name="NegativeOffDiagonalCount">Number of off-diagonal entries below zero.</param>
/// <param name="WorstNegative">The most negative off-diagonal entry, or null.</param>
/// <param name="Balance">Detailed-balance measures.</param>
/// <param name="Classes">Closed classes and transient states.</param>
/// <param name="Spectrum">The spectrum of K; null when K has non-finite entries.</param>
/// <param name="ExpectedNullDimension">Number of closed classes without loss: the null-space dimension a generator must have.</param>
/// <param name="EquilibriumAgreement">Per closed class, pi against the null vector.</param>
/// <param name="EquilibriumTolerance">Largest <see cref="ClassAgreement.MaxDifference"/> that passes.</param>
/// <param name="Checks">Every check with its outcome.</param>
public sealed record CheckReport(
    int NonFiniteCount,
    double ConservationError,
    string? WorstConservationState,
    int NegativeOffDiagonalCount,
    RateEntry? WorstNegative,
    BalanceReport Balance,
    StateClasses Classes,
    Spectrum? Spectrum,
    int ExpectedNullDimension,
    IReadOnlyList<ClassAgreement> EquilibriumAgreement,
    double EquilibriumTolerance,
    IReadOnlyList<CheckOutcome> Checks)
{
    /// <summary>True when every check passed.</summary>
    public bool Ok => Checks.All(c => c.Passed);

    /// <summary>The failing checks, each as "name: detail".</summary>
    public IReadOnlyList<string> Failures => [.. Checks.Where(c => !c.Passed).Select(c => $"{c.Name}: {c.Detail}")];
}
