using MathNet.Numerics.LinearAlgebra;
using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.Fitting.Optimization;

/// <summary>How one Levenberg-Marquardt run ended.</summary>
public enum StopReason
{
    /// <summary>Every Jacobian column is orthogonal to the residuals within <see cref="LevenbergMarquardt.GradientTolerance"/>.</summary>
    GradientOrthogonal,
    /// <summary>An accepted near-Gauss-Newton step changed no variable by more than <see cref="LevenbergMarquardt.StepTolerance"/> relative.</summary>
    StepSmall,
    /// <summary>An accepted step changed the RSS, actual and predicted, by less than <see cref="LevenbergMarquardt.RssTolerance"/> relative.</summary>
    RssChangeSmall,
    /// <summary>The residuals are exactly zero.</summary>
    ZeroResiduals,
    /// <summary>
    /// No trial step reduced the RSS while the Gauss-Newton step predicted a reduction of at most
    /// <see cref="LevenbergMarquardt.RoundingTolerance"/> of it: the minimum within the model's rounding.
    /// </summary>
    RoundingLimited,
    /// <summary>Not converged: the iteration limit was reached.</summary>
    IterationLimit,
    /// <summary>Not converged: no step, however short, reduced the RSS (derivatives inaccurate, or every trial infeasible).</summary>
    NoDescent,
    /// <summary>Not converged: the Jacobian could not be evaluated at an accepted point.</summary>
    JacobianFailed,
}

/// <summary>The outcome of one run.</summary>
/// <param name="U">The final variables.</param>
/// <param name="Residuals">The residuals at <paramref name="U"/>.</param>
/// <param name="Jacobian">The Jacobian at <paramref name="U"/>.</param>
/// <param name="Rss">Sum of squared residuals.</param>
/// <param name="Iterations">Accepted steps plus the final test.</param>
/// <param name="ResidualEvaluations">Model evaluations for residuals (trials and differences).</param>
/// <param name="JacobianEvaluations">Jacobians formed.</param>
/// <param name="InfeasibleTrials">Trials rejected because the model could not be evaluated there.</param>
/// <param name="Stop">Why it stopped.</param>
public sealed record LeastSquaresResult(
    double[] U,
    double[] Residuals,
    double[,] Jacobian,
    double Rss,
    int Iterations,
    int ResidualEvaluations,
    int JacobianEvaluations,
    int InfeasibleTrials,
    StopReason Stop)
{
    /// <summary>True for the stop reasons that mean convergence.</summary>
    public bool Converged => Stop is StopReason.GradientOrthogonal or StopReason.StepSmall or StopReason.RssChangeSmall or StopReason.ZeroResiduals or StopReason.RoundingLimited;
}

/// <summary>
/// Levenberg-Marquardt for bounded least squares, our own implementation (docs/fitting.md says
/// why): Moré's column scaling (each scale the largest column norm seen), Nielsen's damping
/// update, bounds by projection with an active set (a variable at a bound whose gradient points
/// outward is held for the iteration), and each damped step solved through the SVD of the
/// scaled Jacobian's R factor (thin QR first), never through J^T J, whose condition is the square.
/// Infeasible trials are rejected like trials that raise the RSS.
/// <para>
/// Convergence rule: converged when (1) max_j |J_j . r| / (|J_j| |r|) &lt;= 1e-8 over the free
/// variables, or (2) an accepted step with damping at most the largest squared scaled singular
/// value changes every variable by at most 1e-10 (|u_j| + 1e-10), or (3) an accepted step
/// reduces the RSS by at most 1e-14 of itself, actual and predicted, or (4) the residuals are all
/// zero. Not converged: the iteration limit, or the damping exceeding 1e16 without a
/// reduction.
/// </para>
/// </summary>
public sealed class LevenbergMarquardt(int maxIterations)
{
    /// <summary>Tolerance of the cosine test (1).</summary>
    public const double GradientTolerance = 1e-8;

    /// <summary>Tolerance of the step test (2).</summary>
    public const double StepTolerance = 1e-10;

    /// <summary>Tolerance of the RSS-change test (3).</summary>
    public const double RssTolerance = 1e-14;

    /// <summary>Tolerance of the rounding test (5).</summary>
    public const double RoundingTolerance = 1e-10;

    private const double _initialDamping = 1e-3;
    private const double _maxDamping = 1e16;
    private const double _acceptRatio = 1e-4;

    /// <summary>Minimises from <paramref name="start"/> (clipped to the bounds); null when the start itself is infeasible.</summary>
    public LeastSquaresResult? Minimize(ILeastSquaresProblem problem, double[] start)
    {
        ArgumentNullException.ThrowIfNull(problem);
        var n = problem.ParameterCount;
        var m = problem.ResidualCount;
        var u = Clip(problem, start);
        var r = new double[m];
        var evaluations = 1;
        if (!problem.TryResiduals(u, r))
        {
            return null;
        }

        var cost = Dot(r, r);
        var jacobian = new double[m, n];
        if (!problem.TryJacobian(u, r, jacobian, out var spent))
        {
            return null;
        }

        evaluations += spent;
        var jacobians = 1;
        var scale = new double[n];
        UpdateScale(jacobian, scale);
        var damping = _initialDamping;
        var growth = 2.0;
        var infeasible = 0;
        var iterations = 0;
        var rTry = new double[m];
        while (true)
        {
            iterations++;
            if (cost == 0)
            {
                return Result(StopReason.ZeroResiduals);
            }

            var gradient = Gradient(jacobian, r);
            var free = FreeVariables(problem, u, gradient);
            if (GradientCosine(jacobian, gradient, free, Math.Sqrt(cost)) <= GradientTolerance)
            {
                return Result(StopReason.GradientOrthogonal);
            }

            if (iterations > maxIterations)
            {
                return Result(StopReason.IterationLimit);
            }

            var step = new DampedStep(jacobian, r, scale, free);
            while (true)
            {
                var uTry = Clip(problem, step.Solve(damping, u));
                var moved = Subtract(uTry, u);
                var predicted = cost - PredictedCost(jacobian, r, moved);
                var feasible = problem.TryResiduals(uTry, rTry);
                evaluations++;
                var costTry = feasible ? Dot(rTry, rTry) : double.PositiveInfinity;
                if (!feasible)
                {
                    infeasible++;
                }

                var ratio = predicted > 0 ? (cost - costTry) / predicted : double.NegativeInfinity;
                if (ratio > _acceptRatio)
                {
                    var stepSmall = damping <= step.LargestSquaredValue
                        && moved.Select((d, j) => Math.Abs(d) <= StepTolerance * (Math.Abs(u[j]) + StepTolerance)).All(x => x);
                    var rssSmall = cost - costTry <= RssTolerance * cost && predicted <= RssTolerance * cost;
                    u = uTry;
                    (r, rTry) = (rTry, r);
                    cost = costTry;
                    damping *= Math.Max(1.0 / 3.0, 1 - Math.Pow((2 * ratio) - 1, 3));
                    growth = 2;
                    if (!problem.TryJacobian(u, r, jacobian, out spent))
                    {
                        return Result(StopReason.JacobianFailed);
                    }

                    evaluations += spent;
                    jacobians++;
                    UpdateScale(jacobian, scale);
                    if (stepSmall)
                    {
                        return Result(StopReason.StepSmall);
                    }

                    if (rssSmall)
                    {
                        return Result(StopReason.RssChangeSmall);
                    }

                    break;
                }

                damping *= growth;
                growth *= 2;
                if (damping > _maxDamping)
                {
                    return Result(step.GaussNewtonReduction <= RoundingTolerance * cost || cost <= problem.RoundingRss ? StopReason.RoundingLimited : StopReason.NoDescent);
                }
            }
        }

        LeastSquaresResult Result(StopReason reason) =>
            new(u, r, (double[,])jacobian.Clone(), cost, iterations, evaluations, jacobians, infeasible, reason);
    }

    /// <summary>The projection of <paramref name="u"/> onto the bounds.</summary>
    public static double[] Clip(ILeastSquaresProblem problem, double[] u)
    {
        ArgumentNullException.ThrowIfNull(problem);
        ArgumentNullException.ThrowIfNull(u);
        return [.. u.Select((value, j) => Math.Clamp(value, problem.Lower[j], problem.Upper[j]))];
    }

    /// <summary>
    /// A variable is held for an iteration when it sits on a bound and the steepest-descent
    /// direction (-gradient) points out of the box there.
    /// </summary>
    private static bool[] FreeVariables(ILeastSquaresProblem problem, double[] u, double[] gradient) =>
        [.. u.Select((value, j) => !((value <= problem.Lower[j] && gradient[j] > 0) || (value >= problem.Upper[j] && gradient[j] < 0)))];

    private static void UpdateScale(double[,] jacobian, double[] scale)
    {
        for (var j = 0; j < scale.Length; j++)
        {
            scale[j] = Math.Max(scale[j], ColumnNorm(jacobian, j));
        }
    }

    private static double ColumnNorm(double[,] jacobian, int j)
    {
        var sum = 0.0;
        for (var i = 0; i < jacobian.GetLength(0); i++)
        {
            sum += jacobian[i, j] * jacobian[i, j];
        }

        return Math.Sqrt(sum);
    }

    private static double[] Gradient(double[,] jacobian, double[] r)
    {
        var g = new double[jacobian.GetLength(1)];
        for (var j = 0; j < g.Length; j++)
        {
            for (var i = 0; i < r.Length; i++)
            {
                g[j] += jacobian[i, j] * r[i];
            }
        }

        return g;
    }

    private static double GradientCosine(double[,] jacobian, double[] gradient, bool[] free, double residualNorm)
    {
        var worst = 0.0;
        for (var j = 0; j < gradient.Length; j++)
        {
            var norm = ColumnNorm(jacobian, j);
            if (free[j] && norm > 0)
            {
                worst = Math.Max(worst, Math.Abs(gradient[j]) / (norm * residualNorm));
            }
        }

        return worst;
    }

    /// <summary>|r + J step|^2, the cost the linear model predicts.</summary>
    private static double PredictedCost(double[,] jacobian, double[] r, double[] step)
    {
        var sum = 0.0;
        for (var i = 0; i < r.Length; i++)
        {
            var value = r[i];
            for (var j = 0; j < step.Length; j++)
            {
                value += jacobian[i, j] * step[j];
            }

            sum += value * value;
        }

        return sum;
    }

    private static double Dot(double[] a, double[] b)
    {
        var sum = 0.0;
        for (var i = 0; i < a.Length; i++)
        {
            sum += a[i] * b[i];
        }

        return sum;
    }

    private static double[] Subtract(double[] a, double[] b) => [.. a.Select((value, j) => value - b[j])];

    /// <summary>
    /// The damped Gauss-Newton step over the free variables in scaled variables v = D u:
    /// with J D^-1 = Q R and R = U S V^T, step(lambda) = -D^-1 V diag(s / (s^2 + lambda)) U^T Q^T r.
    /// One factorisation serves every damping tried in the iteration.
    /// </summary>
    private sealed class DampedStep
    {
        private readonly int[] _free;
        private readonly double[] _scale;
        private readonly double[] _singular;
        private readonly Matrix<double> _v;
        private readonly double[] _projected;

        public DampedStep(double[,] jacobian, double[] r, double[] scale, bool[] free)
        {
            _free = [.. Enumerable.Range(0, free.Length).Where(j => free[j])];
            _scale = scale;
            var m = r.Length;
            var scaled = DenseMatrix.Create(m, _free.Length, (i, k) => jacobian[i, _free[k]] / (scale[_free[k]] > 0 ? scale[_free[k]] : 1));
            if (_free.Length == 0)
            {
                _singular = [];
                _v = DenseMatrix.Create(0, 0, 0);
                _projected = [];
                return;
            }

            var qr = scaled.QR(MathNet.Numerics.LinearAlgebra.Factorization.QRMethod.Thin);
            var svd = qr.R.Svd(computeVectors: true);
            _singular = svd.S.ToArray();
            _v = svd.VT.Transpose();
            _projected = svd.U.TransposeThisAndMultiply(qr.Q.TransposeThisAndMultiply(DenseVector.OfArray(r))).ToArray();
        }

        /// <summary>The RSS reduction the undamped (Gauss-Newton) step predicts: |U^T Q^T r|^2 over the non-zero singular values.</summary>
        public double GaussNewtonReduction => _projected.Where((_, s) => _singular[s] > 0).Sum(z => z * z);

        /// <summary>The largest squared singular value of the scaled Jacobian (free columns).</summary>
        public double LargestSquaredValue => _singular.Length == 0 ? 0 : _singular[0] * _singular[0];

        /// <summary>u + step(lambda).</summary>
        public double[] Solve(double damping, double[] u)
        {
            var result = (double[])u.Clone();
            for (var k = 0; k < _free.Length; k++)
            {
                var sum = 0.0;
                for (var s = 0; s < _singular.Length; s++)
                {
                    sum += _v[k, s] * (_singular[s] / ((_singular[s] * _singular[s]) + damping)) * _projected[s];
                }

                var j = _free[k];
                result[j] -= sum / (_scale[j] > 0 ? _scale[j] : 1);
            }

            return result;
        }
    }
}
