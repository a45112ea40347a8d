using System.Globalization;
using RateDeck.Decks;
using RateDeck.Fitting.Model;
using RateDeck.Fitting.Optimization;
using RateDeck.Fitting.Report;
using RateDeck.Fitting.Setup;
using RateDeck.LinearAlgebra;
using RateDeck.Propagation;
using RateDeck.Text;

namespace RateDeck.Fitting;

/// <summary>Command-line choices that override the deck's [fit] table.</summary>
/// <param name="Starts">Number of starts, or null for fit.starts.</param>
/// <param name="Seed">Seed of the random starts, or null for fit.seed.</param>
/// <param name="Profile">Profile-likelihood intervals, or null for fit.profile.</param>
public sealed record FitOptions(int? Starts = null, int? Seed = null, bool? Profile = null);

/// <summary>A finished fit: what was fitted, the problem, and the report.</summary>
/// <param name="Spec">The [fit] table.</param>
/// <param name="Deck">The deck with the command-line overrides (before any data set's own).</param>
/// <param name="Problem">The least-squares problem (data sets, parameters, weights).</param>
/// <param name="Report">Estimates, errors and diagnostics.</param>
public sealed record FitOutcome(FitSpec Spec, Deck Deck, FitProblem Problem, FitReport Report)
{
    /// <summary>The estimates in [fit.free] order.</summary>
    public double[] Values => [.. Report.Parameters.Select(p => p.Value)];
}

/// <summary>
/// Fits the free parameters of a deck's [fit] table to its data sets (SPEC 4): Levenberg-Marquardt
/// from the deck's values and, on request, from seeded random starts; the best converged run is
/// reported with its linearised standard errors, correlations and warnings.
/// </summary>
public static class Fitter
{
    /// <summary>A correlation above this in magnitude is warned about.</summary>
    public const double CorrelationWarning = 0.99;

    /// <summary>Two starts reached the same minimum when their RSS agree to this relative tolerance.</summary>
    public const double SameMinimumTolerance = 1e-6;

    /// <summary>Reads the deck and its data and sets up the problem without fitting.</summary>
    /// <exception cref="DeckException">Bad deck, [fit] table, data or start.</exception>
    public static (FitSpec Spec, Deck Deck, FitProblem Problem) Prepare(string deckPath, IReadOnlyList<string> overrides, ILinearAlgebra algebra)
    {
        ArgumentNullException.ThrowIfNull(overrides);
        var spec = FitSpecReader.Read(deckPath, overrides);
        var deck = DeckReader.Read(deckPath, overrides);
        var freeSpecs = spec.Free.ToList();
        if (spec.Triangle)
        {
            freeSpecs.AddRange(TriangleParameters(deck, spec));
        }

        var free = freeSpecs.Select(f =>
        {
            var target = ParameterTarget.Resolve(f.Key, deck, f.Span);
            var start = f.Start ?? target.Read(deck);
            if (start < f.Lower || start > f.Upper || (f.Log && !(start > 0)))
            {
                throw new DeckException(f.Span, $"the deck's value of `{f.Key}`, {DeckSection.Format(start)}, is outside its bounds{(f.Log ? " or not positive (log = true)" : "")}; give a start inside");
            }

            return new FreeParameter(f, target, start);
        }).ToList();
        var duplicate = free.GroupBy(p => p.Name).FirstOrDefault(g => g.Count() > 1);
        if (duplicate is not null)
        {
            throw new DeckException(duplicate.Last().Spec.Span, $"`{duplicate.Key}` is free twice; list it once");
        }

        var targets = free.Select(p => p.Target).ToList();
        var starts = free.Select(p => p.Start).ToArray();
        var dataSets = spec.DataSets.Select(d => DataSetModel.Create(d, deckPath, overrides, spec.Observables, targets, starts, algebra)).ToList();
        var problem = new FitProblem(free, dataSets, spec.Derivatives);
        if (problem.ResidualCount <= free.Count)
        {
            throw new DeckException(spec.DataSets[0].Span, $"the data hold {problem.ResidualCount} values for {free.Count} free parameters; a fit needs more values than parameters");
        }

        return (spec, deck, problem);
    }

    /// <summary>Prepares and fits.</summary>
    /// <exception cref="DeckException">Bad input, or a start at which the model cannot be evaluated.</exception>
    public static FitOutcome Fit(string deckPath, IReadOnlyList<string> overrides, ILinearAlgebra algebra, FitOptions options)
    {
        ArgumentNullException.ThrowIfNull(options);
        var (spec, deck, problem) = Prepare(deckPath, overrides, algebra);
        spec = spec with
        {
            Starts = options.Starts ?? spec.Starts,
            Seed = options.Seed ?? spec.Seed,
            Profile = options.Profile ?? spec.Profile,
        };
        var optimizer = new LevenbergMarquardt(spec.MaxIterations);
        var first = problem.Variables([.. problem.Parameters.Select(p => p.Start)]);
        var runs = new List<LeastSquaresResult>();
        var best = optimizer.Minimize(problem, first) ?? throw StartInfeasible(problem, first);
        runs.Add(best);
        var random = new Random(spec.Seed);
        for (var k = 1; k < spec.Starts; k++)
        {
            var run = optimizer.Minimize(problem, RandomStart(problem, first, random));
            if (run is not null)
            {
                runs.Add(run);
            }
        }

        best = runs.Where(r => r.Converged).OrderBy(r => r.Rss).FirstOrDefault() ?? runs.OrderBy(r => r.Rss).First();
        var report = Build(problem, best, runs, spec.Starts, out var covariance);
        if (spec.Profile && best.Converged)
        {
            report = WithProfiles(report, problem, best, covariance, spec);
        }
        else if (spec.Profile)
        {
            report = report with { Warnings = [.. report.Warnings, "no profile-likelihood intervals: the fit did not converge, so there is no minimum to profile from"] };
        }

        return new FitOutcome(spec, deck, problem, report);
    }

    /// <summary>
    /// A random start: uniform between finite bounds of the optimizer's variable, else the first
    /// start moved by up to a factor 3 either way (log parameters) or by up to 50 % of itself (1 when it is 0).
    /// </summary>
    private static double[] RandomStart(FitProblem problem, double[] first, Random random)
    {
        var u = new double[first.Length];
        for (var j = 0; j < u.Length; j++)
        {
            var (lower, upper) = (problem.Lower[j], problem.Upper[j]);
            var spread = problem.Parameters[j].Spec.Log ? Math.Log(3) : 0.5 * (first[j] != 0 ? Math.Abs(first[j]) : 1);
            var draw = (2 * random.NextDouble()) - 1;
            u[j] = double.IsFinite(lower) && double.IsFinite(upper)
                ? lower + ((upper - lower) * (draw + 1) / 2)
                : Math.Clamp(first[j] + (draw * spread), lower, upper);
        }

        return u;
    }

    private static DeckException StartInfeasible(FitProblem problem, double[] first)
    {
        var values = problem.Values(first);
        try
        {
            problem.Predict(values);
            return new DeckException(problem.DataSets[0].Spec.Span, "the model gives non-finite values at the start; check the start values and the observables");
        }
        catch (InfeasibleTrialException e) when (e.InnerException is IntegrationGaveUpException gaveUp)
        {
            // The integrator's refusal of these data times (exit 8), not a start the deck rejects (exit 2).
            throw gaveUp;
        }
        catch (InfeasibleTrialException e)
        {
            return new DeckException(problem.Parameters[0].Spec.Span, $"the model cannot be evaluated at the start values ({e.Message}); give starts the deck accepts");
        }
    }

    /// <summary>The report with each parameter's profile-likelihood interval at <see cref="FitSpec.ProfileLevel"/> (docs/fitting.md).</summary>
    private static FitReport WithProfiles(FitReport report, FitProblem problem, LeastSquaresResult best, Covariance covariance, FitSpec spec)
    {
        var (threshold, quantile, rule) = ProfileLikelihood.Threshold(problem, best.Rss, report.Dof, spec.ProfileLevel);
        var intervals = ProfileLikelihood.Intervals(problem, best, covariance.Matrix, threshold, quantile, spec.MaxIterations);
        var warnings = report.Warnings.ToList();
        var parameters = report.Parameters.Select((p, j) =>
        {
            if (intervals[j] is not var (lower, upper))
            {
                warnings.Add($"no profile-likelihood interval for {p.Name}: {(double.IsNaN(p.StandardError) ? "the data do not determine it" : "its profile could not be followed (a re-fit with it held failed)")}");
                return p;
            }

            var open = string.Join(",", new[] { lower.AtBound ? "lower" : null, upper.AtBound ? "upper" : null }.OfType<string>());
            if (open.Length > 0)
            {
                warnings.Add($"the profile interval of {p.Name} reaches its {open} bound: the data do not close it there");
            }

            return p with { ProfileLower = lower.Value, ProfileUpper = upper.Value, ProfileOpen = open.Length > 0 ? open : null };
        }).ToList();
        return report with { Parameters = parameters, ProfileRule = string.Create(CultureInfo.InvariantCulture, $"{spec.ProfileLevel:G4} level: {rule}"), Warnings = warnings, TrajectoryEvaluations = problem.TrajectoryEvaluations };
    }

    private static FitReport Build(FitProblem problem, LeastSquaresResult best, List<LeastSquaresResult> runs, int startsAsked, out Covariance covariance)
    {
        var parameters = problem.Parameters;
        var values = problem.Values(best.U);
        var m = problem.ResidualCount;
        var p = parameters.Count;
        var jacobian = new double[m, p];
        for (var j = 0; j < p; j++)
        {
            var derivative = parameters[j].Derivative(values[j]);
            for (var i = 0; i < m; i++)
            {
                jacobian[i, j] = best.Jacobian[i, j] / derivative;
            }
        }

        var dof = m - p;
        var variance = best.Rss / dof;
        covariance = new Covariance(jacobian, problem.HasStandardDeviations ? 1.0 : variance);
        var correlation = covariance.Correlation();
        var warnings = new List<string>();
        var estimates = new List<ParameterEstimate>();
        for (var j = 0; j < p; j++)
        {
            var spec = parameters[j].Spec;
            var bound = values[j] <= spec.Lower * (1 + 1e-12) && double.IsFinite(spec.Lower) ? "lower"
                : values[j] >= spec.Upper * (1 - 1e-12) && double.IsFinite(spec.Upper) ? "upper"
                : best.U[j] <= problem.Lower[j] ? "lower" : best.U[j] >= problem.Upper[j] ? "upper" : null;
            if (bound is not null)
            {
                warnings.Add($"{spec.Key} is at its {bound} bound ({Format.Number(bound == "lower" ? spec.Lower : spec.Upper)}): its standard error is one-sided, the data may want it beyond");
            }

            estimates.Add(new ParameterEstimate(spec.Key, values[j], covariance.StandardErrors[j], parameters[j].Start, bound));
        }

        for (var a = 0; a < p; a++)
        {
            for (var b = a + 1; b < p; b++)
            {
                if (Math.Abs(correlation[a, b]) > CorrelationWarning)
                {
                    warnings.Add(string.Create(CultureInfo.InvariantCulture, $"{parameters[a].Name} and {parameters[b].Name} are correlated {correlation[a, b]:F4}: the data determine mainly a combination of them"));
                }
            }
        }

        foreach (var direction in covariance.Undetermined)
        {
            var terms = direction.Select((c, j) => (c, j)).Where(x => Math.Abs(x.c) > Covariance.InvolvementThreshold).OrderByDescending(x => Math.Abs(x.c))
                .Select(x => string.Create(CultureInfo.InvariantCulture, $"{x.c:+0.00;-0.00} {parameters[x.j].Name}"));
            warnings.Add($"the data do not determine the direction {string.Join(" ", terms)} (scaled parameters; singular value below {Format.Number(Covariance.UndeterminedThreshold)}): those standard errors are not given");
        }

        if (best.InfeasibleTrials > 0)
        {
            warnings.Add($"{best.InfeasibleTrials} trial step(s) could not be evaluated (infeasible) and were rejected");
        }

        var converged = runs.Where(r => r.Converged).ToList();
        var elsewhere = converged.Count(r => Math.Abs(r.Rss - best.Rss) > SameMinimumTolerance * Math.Max(best.Rss, double.Epsilon));
        if (elsewhere > 0)
        {
            warnings.Add($"{elsewhere} of {converged.Count} converged starts ended at a different minimum (higher RSS): the problem has several");
        }

        return new FitReport
        {
            Parameters = estimates,
            Correlation = correlation,
            Rss = best.Rss,
            ResidualSd = Math.Sqrt(variance),
            Dof = dof,
            Observations = m,
            ErrorSource = problem.HasStandardDeviations
                ? "the data's standard deviations: C = (J^T W J)^-1"
                : "the residual variance: C = s^2 (J^T J)^-1, s^2 = RSS / dof",
            Best = best,
            TotalResidualEvaluations = runs.Sum(r => r.ResidualEvaluations),
            Starts = (startsAsked, converged.Count),
            ScaledSingularValues = covariance.SingularValues,
            Warnings = warnings,
            Derivatives = parameters.Select((parameter, j) => (parameter.Name, problem.DifferencedBecause?[j] is { } why ? $"central differences ({why})" : "analytic")).ToDictionary(x => x.Name, x => x.Item2),
            TrajectoryEvaluations = problem.TrajectoryEvaluations,
        };
    }

    private static IEnumerable<FreeParameterSpec> TriangleParameters(Deck deck, FitSpec spec)
    {
        if (deck.Coupling is not MeasuredOneWay oneWay)
        {
            throw new DeckException(deck.Coupling.Span, "`fit.triangle = true` fits the measured triangle, so [transfer] must be kind = \"one_way\" with a rate CSV");
        }

        foreach (var entry in oneWay.Entries.Where(e => e.Rate > 0))
        {
            var key = TriangleTarget.KeyOf(entry, deck);
            if (spec.Free.All(f => f.Key != key))
            {
                yield return new FreeParameterSpec(key, null, 0, double.PositiveInfinity, Log: true, entry.Span);
            }
        }
    }
}
