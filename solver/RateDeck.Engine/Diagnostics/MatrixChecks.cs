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

    /// <summary>Runs every check; computes the spectrum once with <paramref name="algebra"/>.</summary>
    public static CheckReport Check(RateMatrix rates, ILinearAlgebra algebra)
    {
        var balance = DetailedBalance.Analyze(rates);
        var nonFinite = CountNonFinite(rates);
        var spectrum = nonFinite == 0 ? Spectrum.Compute(rates, algebra, rates.Origin == BalanceOrigin.TakenAsGiven ? balance : null) : null;
        return Check(rates, spectrum, balance, nonFinite);
    }

    /// <summary>Runs every check against a spectrum computed before (it must belong to <paramref name="rates"/>).</summary>
    public static CheckReport Check(RateMatrix rates, Spectrum spectrum) =>
        Check(rates, spectrum, DetailedBalance.Analyze(rates), CountNonFinite(rates));

    private static CheckReport Check(RateMatrix rates, Spectrum? spectrum, BalanceReport balance, int nonFinite)
    {
        var labels = rates.States.Labels;
        var n = rates.Count;
        var checks = new List<CheckOutcome>
        {
            new("finite entries", nonFinite == 0, nonFinite == 0 ? "every rate, loss and pumping entry is finite" : $"{Format.Count(nonFinite, "entry", "entries")} of K, the losses or the pumping NaN or infinite"),
        };

        var (conservation, worstColumn) = ConservationError(rates);
        var conservationTolerance = ConservationToleranceFactor * n * Spectrum.MachineEpsilon;
        checks.Add(new("conservation", conservation <= conservationTolerance, $"max over columns of |sum_i K_ij + loss_j| is {Format.Number(conservation)} of max|K_jj|{(worstColumn is null ? "" : $" (column of {labels[worstColumn.Value]})")}; tolerance {Format.Number(conservationTolerance)}"));

        var (negativeCount, worstNegative) = NegativeOffDiagonals(rates);
        checks.Add(new("non-negative rates", negativeCount == 0, negativeCount == 0
            ? "every off-diagonal rate is >= 0"
            : $"{Format.Count(negativeCount, "negative off-diagonal rate", "negative off-diagonal rates")}; the worst is {Format.Number(worstNegative!.Value)} from {worstNegative.From} to {worstNegative.To}"));
        checks.Add(new("detailed balance", balance.Holds, BalanceDetail(balance)));

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
            checks.Add(NullSpaceOutcome(spectrum, classes, expectedNull));
            checks.Add(new("decaying modes", spectrum.NonDecayingCount == 0, spectrum.NonDecayingCount == 0
                ? "every non-zero mode decays"
                : $"{Format.Count(spectrum.NonDecayingCount, "non-zero eigenvalue has", "non-zero eigenvalues have")} real part >= -{Format.Number(spectrum.ZeroTolerance)}: those modes oscillate or grow"));
            if (spectrum.SlowestRate is { } slowest)
            {
                equilibriumTolerance = Math.Max(EquilibriumToleranceFloor, spectrum.ZeroTolerance / slowest);
            }

            agreement.AddRange(classes.Closed.Select(c => new ClassAgreement(c, EquilibriumDifference(rates, spectrum, c))));
            checks.Add(EquilibriumOutcome(agreement, equilibriumTolerance));
        }

        return new CheckReport(nonFinite, conservation, worstColumn is null ? null : labels[worstColumn.Value], negativeCount, worstNegative,
            balance, classes, spectrum, expectedNull, agreement, equilibriumTolerance, checks);
    }

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

    private static string BalanceDetail(BalanceReport balance)
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

        var pair = balance.WorstPair is null ? "no resolvable pair" : $"{Format.Number(balance.PairViolation)} between {balance.WorstPair.From} and {balance.WorstPair.To}";
        parts.Add($"worst pairwise violation against the deck's pi {pair} (tolerance {Format.Number(DetailedBalance.PairTolerance)})");
        return string.Join("; ", parts);
    }

    /// <summary>
    /// The null-space dimension is a fact of the structure: one zero eigenvalue per closed class
    /// without loss. The check fails when the spectrum counts fewer zeros, or more while it claims
    /// to resolve its slow modes; when the double solver counts more because slow modes fell below
    /// its accuracy, that is said plainly and the check passes on the structural count (the slow
    /// modes then go to an accurate path, <see cref="Spectrum.Unresolved"/>).
    /// </summary>
    private static CheckOutcome NullSpaceOutcome(Spectrum spectrum, StateClasses classes, int expectedNull)
    {
        var counts = $"{Format.Count(spectrum.NullDimension, "zero eigenvalue", "zero eigenvalues")} (|lambda| <= {Format.Number(spectrum.ZeroTolerance)}) for {Format.Count(expectedNull, "closed class", "closed classes")} without loss ({Format.Count(classes.Closed.Count, "closed class", "closed classes")}, {Format.Count(classes.Transient.Length, "transient state", "transient states")})";
        if (spectrum.NullDimension > expectedNull && spectrum.Unresolved is { } unresolved)
        {
            return new("null space", true, $"{expectedNull} from the structure; {unresolved} (they are not null modes: an accurate path takes them)");
        }

        return new("null space", spectrum.NullDimension == expectedNull, counts);
    }

    /// <summary>
    /// max |pi - law| on a loss-free closed class, the law by the subtraction-free elimination of
    /// <see cref="StationaryLaw"/> for a dense K (accurate at any stiffness, independent of the
    /// eigen-solver), else the null vector of the spectrum; null for a class with loss.
    /// </summary>
    private static double? EquilibriumDifference(RateMatrix rates, Spectrum spectrum, ClosedClass closedClass)
    {
        if (closedClass.HasLoss)
        {
            return null;
        }

        var pi = LogSpace.NormalizedOn(rates.States.LogEquilibrium, closedClass.States);
        if (!rates.IsSparse && TryStationaryLaw(rates, closedClass) is { } law)
        {
            return pi.Zip(law, (p, v) => Math.Abs(p - v)).Max();
        }

        var nullVector = spectrum.NullVectorOn(closedClass.States);
        if (nullVector is null)
        {
            return null;
        }

        return pi.Zip(nullVector, (p, v) => Math.Abs(p - v)).Max();
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

    private static CheckOutcome EquilibriumOutcome(IReadOnlyList<ClassAgreement> agreement, double tolerance)
    {
        var problems = new List<string>();
        foreach (var entry in agreement.Where(a => !a.Class.HasLoss))
        {
            if (entry.MaxDifference is not { } difference)
            {
                problems.Add($"no null vector on the class {Format.Labels(entry.Class.Labels)}");
            }
            else if (difference > tolerance)
            {
                problems.Add($"pi differs from the null vector by up to {Format.Number(difference)} on the class {Format.Labels(entry.Class.Labels)}");
            }
        }

        var worst = agreement.Select(a => a.MaxDifference ?? 0).DefaultIfEmpty(0).Max();
        return problems.Count == 0
            ? new CheckOutcome("equilibrium", true, $"pi agrees with the null vector on every loss-free closed class to {Format.Number(worst)} (tolerance {Format.Number(tolerance)})")
            : new CheckOutcome("equilibrium", false, string.Join("; ", problems) + $" (tolerance {Format.Number(tolerance)})");
    }
}
