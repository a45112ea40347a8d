using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>What kind of steady state <see cref="SteadyState.Compute"/> found.</summary>
public enum SteadyStateKind
{
    /// <summary>No pumping: the projection of P(0) onto the null space.</summary>
    Undriven,

    /// <summary>Pumping balanced by losses: P = -K^(-1) s on the leaking states (plus any conserved mass of P(0)).</summary>
    Driven,

    /// <summary>No steady state exists (or none can be resolved in double precision); see the message.</summary>
    None,
}

/// <summary>The mass that P(0) carries, in the long run, into one closed class.</summary>
/// <param name="Class">The closed class.</param>
/// <param name="Mass">P(0) summed over the class plus what its transient states are absorbed into it. A class with loss receives it and then loses it.</param>
public sealed record ClassMass(ClosedClass Class, double Mass);

/// <summary>The steady state and how it was reached.</summary>
/// <param name="Kind">Which case applied.</param>
/// <param name="Populations">The steady populations; null when none exists.</param>
/// <param name="Residual">|K P + s| in the infinity norm; null when none exists.</param>
/// <param name="ApproachTime">1 / slowest decay rate: the time scale of the approach (+infinity when no mode decays).</param>
/// <param name="ClassMasses">Mass carried into each closed class, in the order of the closed classes.</param>
/// <param name="TransientLabels">Labels of the transient states, the rows of <paramref name="AbsorptionProbabilities"/>.</param>
/// <param name="AbsorptionProbabilities">[t][c]: probability that mass starting in transient state t ends in closed class c (rows sum to 1 less what sinks take).</param>
/// <param name="LostMass">Mass of P(0) that sinks remove, for an undriven matrix; null when driven or when none exists.</param>
/// <param name="Message">One plain line saying what was found.</param>
public sealed record SteadyStateResult(
    SteadyStateKind Kind,
    double[]? Populations,
    double? Residual,
    double ApproachTime,
    IReadOnlyList<ClassMass> ClassMasses,
    string[] TransientLabels,
    double[][] AbsorptionProbabilities,
    double? LostMass,
    string Message)
{
    /// <summary>True when a steady state exists.</summary>
    public bool Exists => Populations is not null;
}

/// <summary>
/// Steady states of dP/dt = K P + s (SPEC 2). Pumping s is an injection (taken non-negative).
/// <list type="bullet">
/// <item>Mass of P(0) on transient states T flows into the closed classes: with K_TT the transient
/// block, the absorption probabilities B (|T| x classes) solve K_TT^T B = -R, where R[t, c] is the
/// rate from t straight into class c (the time integral of exp(K_TT t) is -K_TT^(-1)).</item>
/// <item>Each closed class without loss keeps the mass carried into it, spread as its stationary
/// law: pi restricted to the class on the symmetric path (detailed balance), else the solution of
/// K_CC p = 0 with sum p = 1 by the Grassmann-Taksar-Heyman elimination. Classes with loss,
/// and sinks on transient states, remove mass.</item>
/// <item>Pumping that can reach a closed class without loss feeds it for ever: no steady state, the
/// class population grows linearly. Otherwise the leaking states U (all states outside the
/// loss-free classes) settle at x = -K_UU^(-1) s_U; with no loss-free class that is P = -K^(-1) s.</item>
/// </list>
/// </summary>
public static class SteadyState
{
    /// <summary>The steady state reached from <paramref name="initial"/> (its length must be N).</summary>
    public static SteadyStateResult Compute(RateMatrix rates, Spectrum spectrum, double[] initial, ILinearAlgebra algebra)
    {
        if (initial.Length != rates.Count)
        {
            throw new ArgumentException($"the initial populations have {initial.Length} entries for {rates.Count} states", nameof(initial));
        }

        var classes = TransitionGraph.Classify(rates);
        var approach = spectrum.SlowestRate is { } slowest ? 1 / slowest : double.PositiveInfinity;
        var unit = rates.TimeUnit;
        var approachText = (spectrum.SlowestRate, spectrum.IsResolved) switch
        {
            (not null, true) => Format.Time(approach, unit),
            (not null, false) => $"{Format.Time(approach, unit)} (1 / the slowest rate from inverse subspace iteration on the M-matrix factors; the double spectrum does not resolve it)",
            (null, true) => "none (no mode decays)",
            (null, false) => "unknown (the slowest rate is not resolved; see the spectrum line)",
        };
        SteadyStateResult Fail(string message, IReadOnlyList<ClassMass> masses, double[][] absorption) =>
            new(SteadyStateKind.None, null, null, approach, masses, classes.TransientLabels, absorption, null, message);

        double[][] absorption;
        try
        {
            absorption = Absorption(rates, classes, algebra);
        }
        catch (SingularMatrixException e)
        {
            return Fail($"no steady state can be resolved: the block of transient states is singular to working precision ({e.Message}); their way out is too slow against the other rates", [], []);
        }

        var masses = classes.Closed.Select((c, ci) => new ClassMass(c, CarriedMass(initial, c, classes.Transient, absorption, ci))).ToList();
        if (rates.IsDriven)
        {
            var reached = TransitionGraph.ReachableFrom(rates, Enumerable.Range(0, rates.Count).Where(i => rates.Pumping[i] != 0));
            var fed = classes.Closed.Select((c, ci) => (Class: c, Index: ci)).Where(x => !x.Class.HasLoss && x.Class.States.Any(s => reached[s])).ToList();
            if (fed.Count > 0)
            {
                var first = fed[0];
                var feed = CarriedMass(rates.Pumping, first.Class, classes.Transient, absorption, first.Index);
                return Fail($"no steady state: the pumping reaches the closed class {Format.Labels(first.Class.Labels)}, which has no loss, at {Format.Rate(feed, unit)}, so its population grows linearly{(fed.Count > 1 ? $" ({fed.Count} such classes)" : "")}", masses, absorption);
            }
        }

        var populations = new double[rates.Count];
        var lossFree = masses.Where(m => !m.Class.HasLoss).ToList();
        try
        {
            foreach (var kept in lossFree)
            {
                var law = StationaryLaw(rates, spectrum, kept.Class);
                for (var k = 0; k < law.Length; k++)
                {
                    populations[kept.Class.States[k]] = kept.Mass * law[k];
                }
            }

            if (rates.IsDriven)
            {
                SolveLeakingStates(rates, lossFree.SelectMany(m => m.Class.States).ToHashSet(), populations, algebra);
            }
        }
        catch (SingularMatrixException e)
        {
            return Fail($"no steady state can be resolved: {e.Message}; the losses are too small against the rates to fix the populations", masses, absorption);
        }

        var residual = Residual(rates, populations);
        var keptMass = lossFree.Sum(m => m.Mass);
        if (rates.IsDriven)
        {
            var conserved = lossFree.Count == 0 ? "" : $", plus the mass of P(0) kept by {Format.Count(lossFree.Count, "closed class", "closed classes")} without loss";
            return new SteadyStateResult(SteadyStateKind.Driven, populations, residual, approach, masses, classes.TransientLabels, absorption, null,
                $"driven steady state P = -K^-1 s on the leaking states{conserved}; residual |K P + s| = {Format.Rate(residual, unit)}; approach time {approachText}");
        }

        var lost = initial.Sum() - keptMass;
        return new SteadyStateResult(SteadyStateKind.Undriven, populations, residual, approach, masses, classes.TransientLabels, absorption, lost,
            $"P(0) settles in {Format.Count(lossFree.Count, "closed class", "closed classes")} without loss (mass {Format.Number(keptMass)}, {Format.Number(lost)} lost to sinks); residual |K P| = {Format.Rate(residual, unit)}; approach time {approachText}");
    }

    /// <summary>B[t][c] from K_TT^T B = -R.</summary>
    private static double[][] Absorption(RateMatrix rates, StateClasses classes, ILinearAlgebra algebra)
    {
        var transient = classes.Transient;
        if (transient.Length == 0)
        {
            return [];
        }

        var k = rates.Generator;
        var blockTransposed = DenseMatrix.Create(transient.Length, transient.Length, (a, b) => k[transient[b], transient[a]]);
        var intoClass = DenseMatrix.Create(transient.Length, classes.Closed.Count, (a, c) => -classes.Closed[c].States.Sum(i => k[i, transient[a]]));
        var solution = algebra.Solve(blockTransposed, intoClass);
        return [.. Enumerable.Range(0, transient.Length).Select(a => solution.Row(a).ToArray())];
    }

    /// <summary>Amount of <paramref name="amounts"/> that ends in class <paramref name="classIndex"/>: its own entries plus what its transient states are absorbed into it.</summary>
    private static double CarriedMass(double[] amounts, ClosedClass closedClass, int[] transient, double[][] absorption, int classIndex) =>
        closedClass.States.Sum(s => amounts[s]) + transient.Select((t, a) => amounts[t] * absorption[a][classIndex]).Sum();

    /// <summary>
    /// The stationary law of a loss-free closed class: pi restricted to the class on the symmetric
    /// path (detailed balance, exact in log space), else the subtraction-free elimination of
    /// <see cref="Diagnostics.StationaryLaw"/>.
    /// </summary>
    private static double[] StationaryLaw(RateMatrix rates, Spectrum spectrum, ClosedClass closedClass) =>
        spectrum.Path == SpectrumPath.Symmetrized
            ? LogSpace.NormalizedOn(rates.States.LogEquilibrium, closedClass.States)
            : Diagnostics.StationaryLaw.OfClass(rates, closedClass.States);

    /// <summary>
    /// Writes x = -K_UU^(-1) s_U into <paramref name="populations"/> for the states U outside
    /// <paramref name="conserving"/>. -K_UU is a column diagonally dominant M-matrix whose column
    /// excess is each state's loss plus its rates into the conserving classes, so the dense solve
    /// takes the diagonal from those sums (<see cref="MMatrixFactorization"/>), not from the stored
    /// K_jj, and with s &gt;= 0 every population comes out relatively accurate at any stiffness.
    /// A matrix with a negative off-diagonal rate (a deck that fails its check) is solved by the
    /// provider's LU instead.
    /// </summary>
    private static void SolveLeakingStates(RateMatrix rates, HashSet<int> conserving, double[] populations, ILinearAlgebra algebra)
    {
        var leaking = Enumerable.Range(0, rates.Count).Where(i => !conserving.Contains(i)).ToArray();
        if (rates.IsSparse && rates.Origin == BalanceOrigin.CompletedByDetailedBalance)
        {
            SolveLeakingStatesBanded(rates, leaking, populations);
            return;
        }

        double[] solution;
        var k = rates.Generator;
        if (GeneratorBlock.HasNegativeOffDiagonal(rates))
        {
            var block = leaking.Length == rates.Count
                ? k
                : DenseMatrix.Create(leaking.Length, leaking.Length, (a, b) => k[leaking[a], leaking[b]]);
            solution = algebra.Solve(block, DenseMatrix.Create(leaking.Length, 1, (a, _) => -rates.Pumping[leaking[a]])).Column(0).ToArray();
        }
        else
        {
            solution = [.. leaking.Select(i => rates.Pumping[i])];
            GeneratorBlock.Factor(rates, leaking).Solve(solution);
        }

        for (var a = 0; a < leaking.Length; a++)
        {
            populations[leaking[a]] = solution[a];
        }
    }

    /// <summary>
    /// x = -K_UU^(-1) s_U for a sparse K under detailed balance, without a dense matrix: in the
    /// symmetrized variables y = D^(-1/2) x (scaled as in <see cref="EquilibriumScaling"/>)
    /// the system is S_UU y = -D^(-1/2) s_U, a symmetric band system solved by partially pivoted
    /// elimination in O(N b^2).
    /// </summary>
    private static void SolveLeakingStatesBanded(RateMatrix rates, int[] leaking, double[] populations)
    {
        var band = SymmetrizedGenerator.BuildBand(rates);
        var b = band.Bandwidth;
        var local = new double[leaking.Length * (b + 1)];
        for (var a = 0; a < leaking.Length; a++)
        {
            for (var c = a; c < Math.Min(leaking.Length, a + b + 1); c++)
            {
                local[(a * (b + 1)) + c - a] = band[leaking[c], leaking[a]];
            }
        }

        var scaling = new EquilibriumScaling(rates.States.LogEquilibrium);
        var source = new double[rates.Count];
        foreach (var i in leaking)
        {
            source[i] = -rates.Pumping[i];
        }

        var (scaled, logScale) = scaling.Scale(source);
        var solver = new ComplexBandSolver(new SymmetricBand(leaking.Length, b, local), 1);
        try
        {
            // The solver forms z I - t S: z = 0 and t = -1 give S_UU itself.
            var y = solver.Solve(System.Numerics.Complex.Zero, -1.0, [[.. leaking.Select(i => scaled[i])]]);
            for (var a = 0; a < leaking.Length; a++)
            {
                populations[leaking[a]] = scaling.Unscale(y[a].Real, leaking[a], logScale);
            }
        }
        catch (ArithmeticException e)
        {
            throw new SingularMatrixException($"the block of leaking states is singular ({e.Message})");
        }
    }

    private static double Residual(RateMatrix rates, double[] populations)
    {
        var product = (double[])rates.Pumping.Clone();
        rates.MultiplyAdd(populations, product);
        return product.Select(Math.Abs).DefaultIfEmpty(0).Max();
    }
}
