using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>
/// Sanity checks of a rate matrix (SPEC 2): finiteness, conservation, positivity of the rates,
/// detailed balance, closed classes against the null space, and the deck's equilibrium against
/// the null vectors. Tolerances are stated on each constant.
/// </summary>
public static class MatrixChecks
{
    /// <summary>
    /// Conservation passes when max_j |sum_i K_ij + loss_j| &lt;= this factor * N * eps * max_j |K_jj|.
    /// Recursive summation of a column errs by at most (N - 1) eps sum_i |K_ij| (Higham, Accuracy
    /// and Stability of Numerical Algorithms, 2nd ed., sec. 4.2), and sum_i |K_ij| &lt;= 2 |K_jj| when
    /// the off-diagonal rates are non-negative; the factor 10 leaves a margin over that 2.
    /// </summary>
    public const double ConservationToleranceFactor = 10;

    /// <summary>
    /// Floor of the equilibrium tolerance. The tolerance itself is the larger of this and
    /// <see cref="Spectrum.ZeroTolerance"/> / <see cref="Spectrum.SlowestRate"/>: a perturbation of
    /// size ||E|| turns an eigenvector by at most ||E|| / gap (Davis and Kahan, SIAM J. Numer. Anal.
    /// 7 (1970) 1), the gap to the null space being the slowest rate.
    /// </summary>
    public const double EquilibriumToleranceFloor = 1e-9;

    /// <summary>Runs every check; measures the balance and computes the spectrum once with <paramref name="algebra"/>.</summary>
    public static CheckReport Check(RateMatrix rates, ILinearAlgebra algebra)
    {
        var balance = DetailedBalance.Analyze(rates);
        return Check(rates, balance, HasNonFiniteEntries(rates) ? null : Spectrum.Compute(rates, algebra, balance));
    }

    /// <summary>
    /// Runs every check with the balance and the spectrum of <paramref name="rates"/> measured
    /// before; <paramref name="spectrum"/> is null exactly when K has non-finite entries (no
    /// eigen-solver can use it; see <see cref="HasNonFiniteEntries"/>).
    /// </summary>
    public static CheckReport Check(RateMatrix rates, BalanceReport balance, Spectrum? spectrum)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(balance);
        var nonFinite = CountNonFinite(rates);
        if ((spectrum is null) != (nonFinite > 0))
        {
            throw new ArgumentException("a spectrum is required exactly when every entry of K is finite", nameof(spectrum));
        }

        var labels = rates.States.Labels;
        var n = rates.Count;
        var checks = new List<CheckOutcome>
        {
            new("finite entries", nonFinite == 0, nonFinite == 0 ? "every rate, loss and pumping entry is finite" : $"{Format.Count(nonFinite, "entry", "entries")} of K, the losses or the pumping NaN or infinite"),
        };

        var (conservation, worstColumn) = ConservationError(rates);
        var conservationTolerance = ConservationToleranceFactor * n * Precision.MachineEpsilon;
        checks.Add(new("conservation", conservation <= conservationTolerance, $"max over columns of |sum_i K_ij + loss_j| is {Format.Number(conservation)} of max|K_jj|{(worstColumn is null ? "" : $" (column of {labels[worstColumn.Value]})")}; tolerance {Format.Number(conservationTolerance)}"));

        var (negativeCount, worstNegative) = NegativeOffDiagonals(rates);
        checks.Add(new("non-negative rates", negativeCount == 0, negativeCount == 0
            ? "every off-diagonal rate is >= 0"
            : $"{Format.Count(negativeCount, "negative off-diagonal rate", "negative off-diagonal rates")}; the worst is {Format.Rate(worstNegative!.Value, rates.TimeUnit)} from {worstNegative.From} to {worstNegative.To}"));
        var claim = ClaimedEquilibrium(rates);
        checks.Add(new("detailed balance", balance.Holds, BalanceDetail(balance, claim)));

        var classes = TransitionGraph.Classify(rates);
        var expectedNull = classes.LossFreeCount;
        var agreement = new List<ClassAgreement>();
        var equilibriumTolerance = EquilibriumToleranceFloor;
        if (spectrum is null)
        {
            const string notComputed = "not computed: K has non-finite entries";
            checks.Add(new("null space", false, notComputed));
            checks.Add(new("decaying modes", false, notComputed));
            checks.Add(new("equilibrium", false, notComputed));
        }
        else
        {
            checks.Add(NullSpaceOutcome(spectrum, classes, expectedNull, rates.TimeUnit));
            checks.Add(new("decaying modes", spectrum.NonDecayingCount == 0, spectrum.NonDecayingCount == 0
                ? "every non-zero mode decays"
                : $"{Format.Count(spectrum.NonDecayingCount, "non-zero eigenvalue has", "non-zero eigenvalues have")} real part >= -{Format.Rate(spectrum.ZeroTolerance, rates.TimeUnit)}: those modes oscillate or grow"));
            if (spectrum.SolverSlowestRate is { } slowest)
            {
                equilibriumTolerance = Math.Max(EquilibriumToleranceFloor, spectrum.ZeroTolerance / slowest);
            }

            agreement.AddRange(classes.Closed.Select(c => Agreement(rates, spectrum, c, claim is not null)));
            checks.Add(EquilibriumOutcome(agreement, equilibriumTolerance, claim));
        }

        return new CheckReport(nonFinite, conservation, worstColumn is null ? null : labels[worstColumn.Value], negativeCount, worstNegative,
            balance, classes, spectrum, expectedNull, agreement, equilibriumTolerance, checks);
    }

    /// <summary>True when an entry of K, the losses or the pumping is NaN or infinite.</summary>
    public static bool HasNonFiniteEntries(RateMatrix rates) => CountNonFinite(rates) > 0;

    private static int CountNonFinite(RateMatrix rates) =>
        (rates.Sparse?.Values ?? rates.Generator.Values).Count(v => !double.IsFinite(v)) + rates.Loss.Count(v => !double.IsFinite(v)) + rates.Pumping.Count(v => !double.IsFinite(v));

    private static (double Error, int? Column) ConservationError(RateMatrix rates)
    {
        var n = rates.Count;
        var scale = 0.0;
        for (var j = 0; j < n; j++)
        {
            scale = Math.Max(scale, Math.Abs(rates.Diagonal(j)));
        }

        var worst = 0.0;
        int? column = null;
        for (var j = 0; j < n; j++)
        {
            var sum = rates.Loss[j] + ColumnSum(rates, j);

            // Relative to max|K_jj|; an all-zero diagonal leaves the absolute error.
            var error = Math.Abs(sum) / (scale > 0 ? scale : 1);
            if (error > worst || double.IsNaN(error))
            {
                worst = error;
                column = j;
            }
        }

        return (worst, column);
    }

    /// <summary>sum_i K_ij by recursive summation over the stored entries of column j.</summary>
    private static double ColumnSum(RateMatrix rates, int j)
    {
        var sum = 0.0;
        if (rates.Sparse is { } sparse)
        {
            for (var p = sparse.ColumnStarts[j]; p < sparse.ColumnStarts[j + 1]; p++)
            {
                sum += sparse.Values[p];
            }

            return sum;
        }

        var n = rates.Count;
        var k = rates.Generator.Values;
        for (var i = 0; i < n; i++)
        {
            sum += k[(j * n) + i];
        }

        return sum;
    }

    private static (int Count, RateEntry? Worst) NegativeOffDiagonals(RateMatrix rates)
    {
        var labels = rates.States.Labels;
        var count = 0;
        RateEntry? worst = null;
        rates.ForEachOffDiagonal((i, j, rate) =>
        {
            if (rate < 0)
            {
                count++;
                if (worst is null || rate < worst.Value)
                {
                    worst = new RateEntry(labels[j], labels[i], rate);
                }
            }
        });

        return (count, worst);
    }

    /// <summary>
    /// What the deck's pi is made of, for messages ("its energies and weights"); null when the deck
    /// gives a full measured matrix with neither, so that pi is defaults and no claim to check.
    /// </summary>
    public static string? ClaimedEquilibrium(RateMatrix rates) => rates.States.EquilibriumGiven switch
    {
        Decks.EquilibriumGiven.EnergiesAndWeights => "its energies and weights",
        Decks.EquilibriumGiven.Energies => "its energies, weights all 1",
        Decks.EquilibriumGiven.Weights => "its weights, energies all 0",
        _ when rates.Origin == BalanceOrigin.CompletedByDetailedBalance => "the defaults, energies 0 and weights 1",
        _ => null,
    };

    private static string BalanceDetail(BalanceReport balance, string? claim)
    {
        var parts = new List<string>();
        if (balance.OneWayCount > 0)
        {
            var edges = string.Join(", ", balance.OneWayEdges.Select(e => $"{e.From} -> {e.To}"));
            parts.Add($"{Format.Count(balance.OneWayCount, "one-way edge", "one-way edges")} (rate one way, none back): {edges}{(balance.OneWayCount > balance.OneWayEdges.Count ? ", ..." : "")}");
        }

        if (balance.Origin == BalanceOrigin.TakenAsGiven)
        {
            parts.Add(balance.CycleViolation is { } cycle
                ? $"worst Kolmogorov cycle violation |ln(forward/backward)| = {Format.Number(cycle)} around {Format.Labels(balance.WorstCycle)} ({Format.Count(balance.CycleCount, "fundamental cycle", "fundamental cycles")}; tolerance {Format.Number(DetailedBalance.CycleTolerance)})"
                : "the two-way support has no cycle");
        }

        if (claim is not null)
        {
            var pair = balance.WorstPair is null ? "no resolvable pair" : $"{Format.Number(balance.PairViolation)} between {balance.WorstPair.From} and {balance.WorstPair.To}";
            parts.Add($"worst pairwise violation against the deck's pi (from {claim}) {pair} (tolerance {Format.Number(DetailedBalance.PairTolerance)})");
        }

        return string.Join("; ", parts);
    }

    /// <summary>
    /// The null-space dimension is a fact of the structure: one zero eigenvalue per closed class
    /// without loss. The check fails when the spectrum counts fewer zeros, or more while it claims
    /// to resolve its slow modes; when the double solver counts more because slow modes fell below
    /// its accuracy, that is said plainly and the check passes on the structural count (the slow
    /// modes then go to an accurate path, <see cref="Spectrum.Unresolved"/>).
    /// </summary>
    private static CheckOutcome NullSpaceOutcome(Spectrum spectrum, StateClasses classes, int expectedNull, string timeUnit)
    {
        var counts = $"{Format.Count(spectrum.NullDimension, "zero eigenvalue", "zero eigenvalues")} (|lambda| <= {Format.Rate(spectrum.ZeroTolerance, timeUnit)}) for {Format.Count(expectedNull, "closed class", "closed classes")} without loss ({Format.Count(classes.Closed.Count, "closed class", "closed classes")}, {Format.Count(classes.Transient.Length, "transient state", "transient states")})";
        if (spectrum.NullDimension > expectedNull && spectrum.Unresolved is { } unresolved)
        {
            return new("null space", true, $"{expectedNull} from the structure; {unresolved} (they are not null modes: an accurate path takes them)");
        }

        return new("null space", spectrum.NullDimension == expectedNull, counts);
    }

    /// <summary>
    /// The class's stationary law and, when the deck claims a pi, their largest difference. For a
    /// loss-free class of a dense K the law comes from the subtraction-free elimination of
    /// <see cref="StationaryLaw"/> (accurate at any stiffness, independent of the eigen-solver);
    /// otherwise it is the class's null vector.
    /// </summary>
    private static ClassAgreement Agreement(RateMatrix rates, Spectrum spectrum, ClosedClass closedClass, bool compare)
    {
        var nullVector = !closedClass.HasLoss && !rates.IsSparse && TryStationaryLaw(rates, closedClass) is { } law
            ? law
            : spectrum.NullVectorOn(closedClass.States);
        if (nullVector is null || !compare)
        {
            return new ClassAgreement(closedClass, null, nullVector);
        }

        var pi = LogSpace.NormalizedOn(rates.States.LogEquilibrium, closedClass.States);
        return new ClassAgreement(closedClass, pi.Zip(nullVector, (p, v) => Math.Abs(p - v)).Max(), nullVector);
    }

    /// <summary>The class's law by elimination, or null when a completed rate that underflowed leaves a state with no rate to the states kept (the null vector then serves).</summary>
    private static double[]? TryStationaryLaw(RateMatrix rates, ClosedClass closedClass)
    {
        try
        {
            return StationaryLaw.OfClass(rates, closedClass.States);
        }
        catch (ArgumentException)
        {
            return null;
        }
    }

    /// <summary>
    /// pi against the null vector on every closed class without loss (a class with loss has no
    /// stationary law to compare); with no claimed pi, only that each such class has a null vector.
    /// </summary>
    private static CheckOutcome EquilibriumOutcome(IReadOnlyList<ClassAgreement> agreement, double tolerance, string? claim)
    {
        var problems = new List<string>();
        var lossFree = agreement.Where(a => !a.Class.HasLoss).ToList();
        foreach (var entry in lossFree)
        {
            if (entry.StationaryLaw is null)
            {
                problems.Add($"no null vector on the class {Format.Labels(entry.Class.Labels)}");
            }
            else if (entry.MaxDifference is { } difference && difference > tolerance)
            {
                problems.Add($"the deck's pi (from {claim}) differs from the null vector by up to {Format.Number(difference)} on the class {Format.Labels(entry.Class.Labels)}");
            }
        }

        var lossy = agreement.Count - lossFree.Count;
        var skipped = lossy == 0 ? "" : $"; {Format.Count(lossy, "class with loss has", "classes with loss have")} no stationary law and {(lossy == 1 ? "is" : "are")} not compared";
        if (problems.Count > 0)
        {
            return new CheckOutcome("equilibrium", false, string.Join("; ", problems) + $" (tolerance {Format.Number(tolerance)}){skipped}");
        }

        if (lossFree.Count == 0)
        {
            return new CheckOutcome("equilibrium", true, "every closed class has a loss, so there is no stationary law to compare");
        }

        if (claim is null)
        {
            return new CheckOutcome("equilibrium", true, $"the deck gives no energies or weights, so there is no pi to compare: the matrix's own stationary law (its null vector) is reported per class{skipped}");
        }

        var worst = lossFree.Select(a => a.MaxDifference ?? 0).DefaultIfEmpty(0).Max();
        return new CheckOutcome("equilibrium", true, $"the deck's pi (from {claim}) agrees with the null vector on every loss-free closed class to {Format.Number(worst)} (tolerance {Format.Number(tolerance)}){skipped}");
    }
}
