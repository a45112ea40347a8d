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
/// exponential. Before any of these, the spectrum's resolution decides (docs/stiff-decks.md): when
/// the spectrum had to be recomputed in double-double (its slow modes were not resolved in
/// double), the double-double eigen path is taken (<see cref="ExtendedEigenPropagator"/>); when the
/// double spectrum lost slow modes (more zero eigenvalues than closed classes without loss) that
/// can move over the run (t_end N eps rho above <see cref="HorizonTolerance"/>, or no t_end given), or
/// cannot resolve the run's horizon (t_end eps rho above <see cref="HorizonTolerance"/>), the
/// eigen paths are not trusted and the implicit integrator is taken (<see cref="ImplicitSdirkPropagator"/>).
/// </summary>
public static class ExactPropagatorChoice
{
    /// <summary>
    /// A dense eigen path in double serves a run to t_end while t_end eps rho is at most this:
    /// every eigenvalue carries an absolute error of at least about eps rho (a backward-stable
    /// solver's, Golub and Van Loan as in <see cref="Spectrum"/>), which shifts exp(lambda t) by
    /// about t eps rho relative to the total over the run. The sparse contour path forms no
    /// eigenvalues and is not held to it.
    /// </summary>
    public const double HorizonTolerance = 1e-8;

    /// <summary>Largest N the implicit integrator takes (it factors N x N matrices: 2/3 N^3 operations per step size).</summary>
    public const int ImplicitStateLimit = 2000;


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
    /// <para>
    /// Pass <paramref name="horizon"/> (t_end) to hold the eigen paths to <see cref="HorizonTolerance"/>
    /// over the run; without it only the spectrum's own resolution is judged.
    /// </para>
    /// </summary>
    /// <exception cref="DenseStorageException">No path fits: the spectrum is unresolved and N exceeds <see cref="ImplicitStateLimit"/>.</exception>
    public static IPropagator Choose(RateMatrix rates, ILinearAlgebra la, BalanceReport? balance = null, double[]? initial = null, Spectrum? spectrum = null, double? horizon = null)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(la);
        balance ??= DetailedBalance.Analyze(rates);
        if (balance.Origin != rates.Origin)
        {
            throw new ArgumentException("the balance report belongs to another rate matrix", nameof(balance));
        }

        spectrum ??= Spectrum.Compute(rates, la, balance);
        // The contour path forms no eigenvalues, so slow modes a spectrum loses in rounding do not touch it.
        (ContourExponentialPropagator Propagator, double Estimate)? declinedContour = null;
        if (balance.SymmetrizesWithDeckEquilibrium && rates.IsSparse)
        {
            if (Contour(rates, balance.SymmetryReason, initial, out var tried) is { } contour)
            {
                return contour;
            }

            declinedContour = tried;
        }

        if (StiffChoice(rates, spectrum, horizon) is { } stiff)
        {
            return stiff;
        }

        return balance.SymmetrizesWithDeckEquilibrium
            ? ChooseSymmetric(rates, la, balance.SymmetryReason, initial, spectrum, declinedContour)
            : ChooseGeneral(rates, la, balance.SymmetryReason, spectrum);
    }

    // declinedContour: the contour path Choose tried for a sparse K and declined for its rounding,
    // with its estimate (for the refusal's message); null for a dense K.
    private static IPropagator ChooseSymmetric(RateMatrix rates, ILinearAlgebra la, string balance, double[]? initial, Spectrum? spectrum,
        (ContourExponentialPropagator Propagator, double Estimate)? declinedContour)
    {
        if (declinedContour is { } rejected && rates.Count > DenseStorage.StateLimit)
        {
            throw new DenseStorageException(Format(
                $"no exact path fits: pi spans {rejected.Propagator.EquilibriumDecades:F0} decades, so the sparse contour path's rounding for {(initial is null ? "the worst initial state" : "this initial state")} is estimated at {Text.Format.Number(rejected.Estimate)} of the population (> {Text.Format.Number(SymmetricEigenPropagator.RelativeErrorLimit)}), and the dense Pade path needs more than the {DenseStorage.StateLimit}-state limit"));
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
            Reason = Format($"Pade matrix exponential: {balance}, but pi spans {symmetric.EquilibriumDecades:F0} decades and the symmetric path's rounding for {start} is estimated at {Text.Format.Number(estimate)} of the population (> {Text.Format.Number(SymmetricEigenPropagator.RelativeErrorLimit)})"),
        };
    }

    /// <summary>The contour path for a sparse K when its rounding for <paramref name="initial"/> (the worst start when null) is within <see cref="SymmetricEigenPropagator.RelativeErrorLimit"/>; else null, with the propagator and its estimate in <paramref name="tried"/>.</summary>
    private static ContourExponentialPropagator? Contour(RateMatrix rates, string balance, double[]? initial, out (ContourExponentialPropagator Propagator, double Estimate) tried)
    {
        var contour = new ContourExponentialPropagator(rates);
        var estimate = initial is null ? contour.WorstCaseRelativeError : contour.RelativeErrorEstimate(initial);
        tried = (contour, estimate);
        if (estimate > SymmetricEigenPropagator.RelativeErrorLimit)
        {
            return null;
        }

        contour.Reason = Format($"contour exponential: {balance}; K is {rates.StorageReason}, so no N x N eigenvectors are formed ({ContourExponentialPropagator.NodeCount / 2} band solves per output time, O(N) memory)");
        return contour;
    }

    private static IPropagator ChooseGeneral(RateMatrix rates, ILinearAlgebra la, string violation, Spectrum? spectrum)
    {
        var general = spectrum?.General is { } eigen
            ? new GeneralEigenPropagator(rates, eigen, la)
            : new GeneralEigenPropagator(rates, la);
        if (general.EigenvectorCondition < ConditionThreshold)
        {
            general.Reason = Format($"general eigen-decomposition: {violation}; eigenvector condition estimate {Text.Format.Number(general.EigenvectorCondition)} < {Text.Format.Number(ConditionThreshold)}");
            return general;
        }

        return new PadeExponentialPropagator(rates, la)
        {
            Reason = Format($"Pade matrix exponential: {violation} and eigenvector condition estimate {Text.Format.Number(general.EigenvectorCondition)} >= {Text.Format.Number(ConditionThreshold)} (eigenvectors nearly dependent)"),
        };
    }

    /// <summary>
    /// The path a user asked for instead of the automatic choice, or one a caller keeps for many
    /// matrices (a fit keeps the path chosen at its start for every trial, <see cref="RequestOf"/>):
    /// the implicit integrator (any deck with non-negative rates), the double-double eigen path (a
    /// deck completed by detailed balance with at most <see cref="Spectrum.ExtendedPrecisionStateLimit"/>
    /// states), or the symmetric eigen, general eigen, Pade or contour path. <paramref name="spectrum"/>
    /// is called only for the double-double path, which reuses its decomposition; the kept eigen
    /// paths decompose once themselves, and each propagator still refuses a start it cannot serve.
    /// </summary>
    /// <exception cref="ArgumentException">The deck does not allow the path; the message says why.</exception>
    public static IPropagator Requested(RateMatrix rates, ILinearAlgebra la, ExactPathRequest path, Func<Spectrum> spectrum)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(la);
        ArgumentNullException.ThrowIfNull(spectrum);
        switch (path)
        {
            case ExactPathRequest.Implicit:
                var implicitPropagator = new ImplicitSdirkPropagator(rates);
                implicitPropagator.Reason += " (asked for)";
                return implicitPropagator;
            case ExactPathRequest.SymmetricEigen:
                return new SymmetricEigenPropagator(rates, la);
            case ExactPathRequest.GeneralEigen:
                return new GeneralEigenPropagator(rates, la);
            case ExactPathRequest.Pade:
                return new PadeExponentialPropagator(rates, la);
            case ExactPathRequest.Contour:
                return new ContourExponentialPropagator(rates);
        }

        if (rates.Origin != BalanceOrigin.CompletedByDetailedBalance || rates.Count > Spectrum.ExtendedPrecisionStateLimit)
        {
            throw new ArgumentException(Format($"the double-double eigen path needs a deck completed by detailed balance (one_way or kernel) with at most {Spectrum.ExtendedPrecisionStateLimit} states"), nameof(path));
        }

        var measured = spectrum();
        var decomposition = measured.Extended ?? ExtendedSymmetricEigen.Decompose(rates.Count, SymmetrizedGenerator.BuildExtended(rates));
        var zero = Precision.ZeroEigenvalueFactor * rates.Count * 2 * DoubleDouble.Epsilon * measured.SpectralRadius;
        return new ExtendedEigenPropagator(rates, decomposition, zero) { Reason = "symmetric eigen-decomposition in double-double (asked for)" };
    }

    /// <summary>The request that keeps the path of <paramref name="chosen"/> (a propagator this class chose) for other matrices.</summary>
    public static ExactPathRequest RequestOf(IPropagator chosen) => chosen switch
    {
        SymmetricEigenPropagator => ExactPathRequest.SymmetricEigen,
        GeneralEigenPropagator => ExactPathRequest.GeneralEigen,
        PadeExponentialPropagator => ExactPathRequest.Pade,
        ContourExponentialPropagator => ExactPathRequest.Contour,
        ExtendedEigenPropagator => ExactPathRequest.Extended,
        ImplicitSdirkPropagator => ExactPathRequest.Implicit,
        _ => throw new ArgumentException($"no request keeps the path {chosen?.Name}", nameof(chosen)),
    };

    /// <summary>The propagator for a spectrum that double precision does not resolve (over the horizon), or null when it does.</summary>
    private static IPropagator? StiffChoice(RateMatrix rates, Spectrum spectrum, double? horizon)
    {
        if (spectrum.Extended is { } extended)
        {
            return new ExtendedEigenPropagator(rates, extended, spectrum.ZeroTolerance)
            {
                Reason = $"symmetric eigen-decomposition in double-double: {spectrum.PathReason}",
            };
        }

        string why;
        // Modes lost below the solver's accuracy N eps rho are treated as null modes: harmless while they cannot move over the run.
        if (spectrum.LostModes && (horizon is not { } end || end * spectrum.AbsoluteAccuracy > HorizonTolerance))
        {
            why = $"the eigen paths are not trusted: {spectrum.Unresolved}";
        }
        else if (!rates.IsSparse && horizon is { } t && t * Precision.MachineEpsilon * spectrum.SpectralRadius > HorizonTolerance)
        {
            why = $"the eigen paths are not trusted to t_end = {Text.Format.Time(t, rates.TimeUnit)}: their eigenvalues carry absolute errors of eps rho = {Text.Format.Rate(Precision.MachineEpsilon * spectrum.SpectralRadius, rates.TimeUnit)} or more, and t_end eps rho = {Text.Format.Number(t * Precision.MachineEpsilon * spectrum.SpectralRadius)} > {Text.Format.Number(HorizonTolerance)}";
        }
        else
        {
            return null;
        }

        if (rates.Count > ImplicitStateLimit)
        {
            throw new DenseStorageException(Format($"no exact path fits: {why}, and the implicit integrator factors N x N matrices, refused above {ImplicitStateLimit} states"));
        }

        var extendedLimit = spectrum.ExtendedFailure is { } failure
            ? $"the double-double eigen path failed too ({failure}): the rates span more than it resolves"
            : rates.Origin == BalanceOrigin.CompletedByDetailedBalance
                ? Format($"the double-double eigen path serves decks completed by detailed balance up to {Spectrum.ExtendedPrecisionStateLimit} states")
                : "the double-double eigen path needs a matrix completed by detailed balance";
        var implicitPropagator = new ImplicitSdirkPropagator(rates);
        implicitPropagator.Reason = $"{implicitPropagator.Reason}: {why}; {extendedLimit}";
        return implicitPropagator;
    }

    private static string Format(FormattableString text) => text.ToString(CultureInfo.InvariantCulture);
}

/// <summary>An exact path asked for by the user instead of the automatic choice, or kept by a caller for many trials.</summary>
public enum ExactPathRequest
{
    /// <summary>The implicit integrator (<see cref="ImplicitSdirkPropagator"/>).</summary>
    Implicit,

    /// <summary>The double-double eigen path (<see cref="ExtendedEigenPropagator"/>).</summary>
    Extended,

    /// <summary>The symmetric eigen-decomposition (<see cref="SymmetricEigenPropagator"/>).</summary>
    SymmetricEigen,

    /// <summary>The general eigen-decomposition (<see cref="GeneralEigenPropagator"/>).</summary>
    GeneralEigen,

    /// <summary>The Pade matrix exponential (<see cref="PadeExponentialPropagator"/>).</summary>
    Pade,

    /// <summary>The sparse contour exponential (<see cref="ContourExponentialPropagator"/>).</summary>
    Contour,
}
