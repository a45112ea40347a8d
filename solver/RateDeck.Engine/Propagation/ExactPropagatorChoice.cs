using System.Globalization;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// Picks the exact propagator for a rate matrix and says why (SPEC 2): for a sparse (banded) K
/// under detailed balance for the deck's pi the contour exponential (<see cref="ContourExponentialPropagator"/>,
/// O(N) memory) while its rounding is harmless for the start; else the symmetric
/// eigen-decomposition when detailed balance holds for the deck's pi and its rounding is harmless for the start
/// (see <see cref="SymmetricEigenPropagator.RelativeErrorEstimate"/>), else the general
/// eigen-decomposition while its eigenvector matrix is well conditioned, else the Pade matrix
/// exponential.
/// </summary>
public static class ExactPropagatorChoice
{
    /// <summary>
    /// The general eigen path is taken while ||V||_1 ||V^-1||_1 is below this: its rounding is
    /// about the condition times eps, so 1e8 still leaves about 1e-8 of the total population.
    /// </summary>
    public const double ConditionThreshold = 1e8;

    /// <summary>
    /// The propagator for <paramref name="rates"/>. <paramref name="balance"/> is the diagnostics'
    /// balance report of the same matrix (measured here when null); the symmetric paths are open
    /// only when <see cref="BalanceReport.SymmetrizesWithDeckEquilibrium"/>, the one policy the
    /// spectrum follows too.
    /// Pass <paramref name="initial"/> (P(0)) when known: under detailed balance the symmetric
    /// path is then kept unless its rounding for this start would exceed
    /// <see cref="SymmetricEigenPropagator.RelativeErrorLimit"/>; without it the worst start (all
    /// population in the least probable state) is assumed, so that the choice is safe for any.
    /// The returned <see cref="IPropagator.Reason"/> names the path and the numbers behind it.
    /// Pass <paramref name="spectrum"/> (the diagnostics' <see cref="Spectrum"/> of the same matrix)
    /// to reuse its decomposition instead of computing a second one: its symmetric decomposition
    /// on the symmetric path, its general one on the general path.
    /// </summary>
    public static IPropagator Choose(RateMatrix rates, ILinearAlgebra la, BalanceReport? balance = null, double[]? initial = null, Spectrum? spectrum = null)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(la);
        balance ??= DetailedBalance.Analyze(rates);
        if (balance.Origin != rates.Origin)
        {
            throw new ArgumentException("the balance report belongs to another rate matrix", nameof(balance));
        }

        return balance.SymmetrizesWithDeckEquilibrium
            ? ChooseSymmetric(rates, la, balance.SymmetryReason, initial, spectrum)
            : ChooseGeneral(rates, la, balance.SymmetryReason, spectrum);
    }

    private static IPropagator ChooseSymmetric(RateMatrix rates, ILinearAlgebra la, string balance, double[]? initial, Spectrum? spectrum)
    {
        if (rates.IsSparse)
        {
            var contour = new ContourExponentialPropagator(rates);
            var contourEstimate = initial is null ? contour.WorstCaseRelativeError : contour.RelativeErrorEstimate(initial);
            if (contourEstimate <= SymmetricEigenPropagator.RelativeErrorLimit)
            {
                contour.Reason = Format($"contour exponential: {balance}; K is {rates.StorageReason}, so no N x N eigenvectors are formed ({ContourExponentialPropagator.NodeCount / 2} band solves per output time, O(N) memory)");
                return contour;
            }

            if (rates.Count > DenseStorage.StateLimit)
            {
                throw new DenseStorageException(Format(
                    $"no exact path fits: pi spans {contour.EquilibriumDecades:F0} decades, so the sparse contour path's rounding for {(initial is null ? "the worst initial state" : "this initial state")} is estimated at {contourEstimate:G2} of the population (> {SymmetricEigenPropagator.RelativeErrorLimit:G2}), and the dense Pade path needs more than the {DenseStorage.StateLimit}-state limit"));
            }
        }

        var symmetric = spectrum?.Symmetric is { } decomposition
            ? new SymmetricEigenPropagator(rates, decomposition, la)
            : new SymmetricEigenPropagator(rates, la);
        var estimate = initial is null ? symmetric.WorstCaseRelativeError : symmetric.RelativeErrorEstimate(initial);
        var start = initial is null ? "the worst initial state" : "this initial state";
        if (estimate <= SymmetricEigenPropagator.RelativeErrorLimit)
        {
            symmetric.Reason = $"symmetric eigen-decomposition: {balance}";
            return symmetric;
        }

        return new PadeExponentialPropagator(rates, la)
        {
            Reason = Format($"Pade matrix exponential: {balance}, but pi spans {symmetric.EquilibriumDecades:F0} decades and the symmetric path's rounding for {start} is estimated at {estimate:G2} of the population (> {SymmetricEigenPropagator.RelativeErrorLimit:G2})"),
        };
    }

    private static IPropagator ChooseGeneral(RateMatrix rates, ILinearAlgebra la, string violation, Spectrum? spectrum)
    {
        var general = spectrum?.General is { } eigen
            ? new GeneralEigenPropagator(rates, eigen, la)
            : new GeneralEigenPropagator(rates, la);
        if (general.EigenvectorCondition < ConditionThreshold)
        {
            general.Reason = Format($"general eigen-decomposition: {violation}; eigenvector condition estimate {general.EigenvectorCondition:G3} < {ConditionThreshold:G3}");
            return general;
        }

        return new PadeExponentialPropagator(rates, la)
        {
            Reason = Format($"Pade matrix exponential: {violation} and eigenvector condition estimate {general.EigenvectorCondition:G3} >= {ConditionThreshold:G3} (eigenvectors nearly dependent)"),
        };
    }

    private static string Format(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}
