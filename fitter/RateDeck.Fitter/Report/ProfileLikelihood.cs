using System.Globalization;
using MathNet.Numerics.Distributions;
using RateDeck.Fitting.Model;
using RateDeck.Fitting.Optimization;

namespace RateDeck.Fitting.Report;

/// <summary>One end of a profile-likelihood interval.</summary>
/// <param name="Value">The parameter value at the end.</param>
/// <param name="AtBound">True when the profile RSS stays below the threshold up to the parameter's bound (the interval is open there).</param>
public sealed record ProfileEnd(double Value, bool AtBound);

/// <summary>
/// Profile-likelihood intervals (on request, <c>fit.profile = true</c>): for each parameter, the
/// values v whose profile RSS (the RSS re-minimised over the other parameters with this one held
/// at v) stays within a threshold of the minimum. With standard deviations in the data the RSS is
/// a chi-square: threshold RSS_min + chi2(level; 1) (the likelihood-ratio rule). Without them the
/// variance is estimated from the residuals and the rule is F-based:
/// RSS_min (1 + F(level; 1, dof) / dof). For a model linear in its parameters both give exactly
/// the covariance interval (estimate -+ z or t quantile times the standard error); for a nonlinear
/// one the interval is asymmetric where the model bends.
/// </summary>
/// <remarks>
/// Search. In the optimizer's variable u (ln v for a log parameter: profiles do not depend on the
/// parametrisation), each side starts at the linear prediction q se_u (q the z or t quantile) and
/// doubles the step until the profile RSS passes the threshold or the bound is reached (then the
/// end is the bound, open); the crossing is then found by the Illinois variant of regula falsi to
/// 1e-10 of max(|u|, se_u) in u or 1e-10 of the threshold in RSS. Each profile point is a
/// Levenberg-Marquardt run of the other parameters, warm-started from the previous point with
/// the covariance's prediction of how they follow (u_k += C_kj / C_jj du_j).
/// </remarks>
public static class ProfileLikelihood
{
    /// <summary>Doublings of the step before a side is given up (2^40 standard errors).</summary>
    public const int MaxDoublings = 40;

    /// <summary>Illinois iterations per end.</summary>
    public const int MaxRootIterations = 100;

    /// <summary>
    /// The RSS an interval's ends reach; the quantile q (z or t) whose q standard errors the
    /// linearised model predicts for the distance to it; and the rule in words.
    /// </summary>
    public static (double Threshold, double Quantile, string Rule) Threshold(FitProblem problem, double rss, int dof, double level)
    {
        ArgumentNullException.ThrowIfNull(problem);
        var tail = (1 + level) / 2;
        if (problem.HasStandardDeviations)
        {
            var z = Normal.InvCDF(0, 1, tail);
            return (rss + (z * z), z, string.Create(CultureInfo.InvariantCulture, $"profile RSS <= RSS_min + chi2({level:G4}; 1) = {rss:G6} + {z * z:G6} (standard deviations given)"));
        }

        var t = StudentT.InvCDF(0, 1, dof, tail);
        return (rss * (1 + (t * t / dof)), t, string.Create(CultureInfo.InvariantCulture, $"profile RSS <= RSS_min (1 + F({level:G4}; 1, {dof}) / {dof}) = {rss:G6} x {1 + (t * t / dof):G8} (variance from the residuals)"));
    }

    /// <summary>
    /// The interval of each parameter around the optimum <paramref name="best"/> with covariance
    /// <paramref name="covariance"/> (in parameter values); null for a parameter without a finite
    /// standard error or whose profile could not be followed.
    /// </summary>
    public static (ProfileEnd Lower, ProfileEnd Upper)?[] Intervals(FitProblem problem, LeastSquaresResult best, double[,] covariance, double threshold, double quantile, int maxIterations)
    {
        ArgumentNullException.ThrowIfNull(problem);
        ArgumentNullException.ThrowIfNull(best);
        ArgumentNullException.ThrowIfNull(covariance);
        var p = problem.ParameterCount;
        var values = problem.Values(best.U);
        // The covariance in the optimizer's variables: C_u = C / (dv/du_a dv/du_b).
        var scale = Enumerable.Range(0, p).Select(j => problem.Parameters[j].Derivative(values[j])).ToArray();
        var result = new (ProfileEnd, ProfileEnd)?[p];
        for (var j = 0; j < p; j++)
        {
            var se = Math.Sqrt(covariance[j, j]) / Math.Abs(scale[j]);
            if (!(se > 0 && double.IsFinite(se)))
            {
                continue;
            }

            var follow = Enumerable.Range(0, p).Select(k => covariance[k, j] / covariance[j, j] * scale[j] / scale[k]).ToArray();
            var lower = End(problem, best, j, -1, quantile * se, follow, threshold, maxIterations);
            var upper = End(problem, best, j, +1, quantile * se, follow, threshold, maxIterations);
            result[j] = lower is null || upper is null ? null : (lower, upper);
        }

        return result;
    }

    private static ProfileEnd? End(FitProblem problem, LeastSquaresResult best, int j, int side, double predicted, double[] follow, double threshold, int maxIterations)
    {
        var optimizer = new LevenbergMarquardt(maxIterations);
        var center = best.U[j];
        var limit = side < 0 ? problem.Lower[j] : problem.Upper[j];
        var warm = (double[])best.U.Clone();

        // The profile RSS minus the threshold at u_j = center + side * distance (null when it cannot be evaluated).
        double? Excess(double distance)
        {
            var fixedAt = center + (side * distance);
            var start = warm.Select((u, k) => k == j ? fixedAt : u + (follow[k] * (fixedAt - warm[j]))).ToArray();
            var held = new HeldParameterProblem(problem, j, fixedAt);
            double rss;
            if (held.ParameterCount == 0)
            {
                var residuals = new double[problem.ResidualCount];
                if (!problem.TryResiduals(start, residuals))
                {
                    return null;
                }

                rss = residuals.Sum(r => r * r);
            }
            else
            {
                var run = optimizer.Minimize(held, held.Free(start));
                if (run is null)
                {
                    return null;
                }

                warm = held.Full(run.U);
                rss = run.Rss;
            }

            return rss - threshold;
        }

        var reach = Math.Abs(limit - center);
        double inside = 0, insideExcess = -(threshold - best.Rss);
        var outside = Math.Min(predicted, reach);
        double? outsideExcess = null;
        for (var doubling = 0; doubling <= MaxDoublings; doubling++)
        {
            outsideExcess = Excess(outside);
            if (outsideExcess is null)
            {
                // Cannot be evaluated there (an infeasible value): look closer.
                outside = 0.5 * (inside + outside);
                continue;
            }

            if (outsideExcess >= 0)
            {
                break;
            }

            (inside, insideExcess) = (outside, outsideExcess.Value);
            if (outside >= reach)
            {
                return new ProfileEnd(problem.Parameters[j].FromVariable(limit), AtBound: true);
            }

            outside = Math.Min(2 * outside, reach);
        }

        if (outsideExcess is not { } excess || excess < 0)
        {
            return null;
        }

        // Illinois: regula falsi that halves the retained end's weight when one end stays put.
        var tolerance = 1e-10 * Math.Max(Math.Abs(center), predicted);
        var (a, fa, b, fb) = (inside, insideExcess, outside, excess);
        var lastSide = 0;
        for (var iteration = 0; iteration < MaxRootIterations && b - a > tolerance; iteration++)
        {
            var c = b - (fb * (b - a) / (fb - fa));
            if (!(c > a && c < b))
            {
                c = 0.5 * (a + b);
            }

            if (Excess(c) is not { } fc)
            {
                return null;
            }

            if (Math.Abs(fc) <= 1e-10 * threshold)
            {
                (a, b) = (c, c);
                break;
            }

            if (fc < 0)
            {
                (a, fa) = (c, fc);
                fb = lastSide == -1 ? fb / 2 : fb;
                lastSide = -1;
            }
            else
            {
                (b, fb) = (c, fc);
                fa = lastSide == 1 ? fa / 2 : fa;
                lastSide = 1;
            }
        }

        return new ProfileEnd(problem.Parameters[j].FromVariable(center + (side * 0.5 * (a + b))), AtBound: false);
    }

    /// <summary>The fit's problem with parameter <c>held</c> fixed: the optimizer sees the others.</summary>
    private sealed class HeldParameterProblem(FitProblem inner, int held, double value) : ILeastSquaresProblem
    {
        private readonly int[] _free = [.. Enumerable.Range(0, inner.ParameterCount).Where(k => k != held)];

        public int ParameterCount => _free.Length;

        public int ResidualCount => inner.ResidualCount;

        public IReadOnlyList<double> Lower => [.. _free.Select(k => inner.Lower[k])];

        public IReadOnlyList<double> Upper => [.. _free.Select(k => inner.Upper[k])];

        public double RoundingRss => inner.RoundingRss;

        public double[] Free(double[] full) => [.. _free.Select(k => full[k])];

        public double[] Full(double[] free)
        {
            var full = new double[inner.ParameterCount];
            full[held] = value;
            for (var k = 0; k < _free.Length; k++)
            {
                full[_free[k]] = free[k];
            }

            return full;
        }

        public bool TryResiduals(double[] u, double[] residuals) => inner.TryResiduals(Full(u), residuals);

        public bool TryJacobian(double[] u, double[] residuals, double[,] jacobian, out int residualEvaluations)
        {
            var full = new double[inner.ResidualCount, inner.ParameterCount];
            if (!inner.TryJacobian(Full(u), residuals, full, out residualEvaluations))
            {
                return false;
            }

            for (var i = 0; i < inner.ResidualCount; i++)
            {
                for (var k = 0; k < _free.Length; k++)
                {
                    jacobian[i, k] = full[i, _free[k]];
                }
            }

            return true;
        }
    }
}
