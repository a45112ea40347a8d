using RateDeck.Decks;
using RateDeck.Fitting.Optimization;
using RateDeck.Fitting.Setup;

namespace RateDeck.Fitting.Model;

/// <summary>
/// The least-squares problem of a fit: the free parameters shared by every data set, the
/// residuals (model - observed) / sd of all data sets one after another (sd = 1 without standard
/// deviations), and the Jacobian: analytic sensitivities for each parameter where they apply
/// (<see cref="DataSetModel.Sensitivities"/>, decided at the first Jacobian and kept), central
/// differences in the optimizer's variables for the others.
/// </summary>
public sealed class FitProblem : ILeastSquaresProblem
{
    /// <summary>
    /// Relative step of the central differences: h_j = eps^(1/3) |u_j| (eps^(1/3) when u_j = 0),
    /// which balances the truncation error (h^2) against rounding (eps / h); one-sided at a bound
    /// or beside an infeasible point.
    /// </summary>
    public static readonly double DifferenceStep = Math.Cbrt(2.220446049250313e-16);

    private readonly double[] _observed;
    private readonly double[] _weights;
    private string?[]? _differenced;

    /// <summary>Builds the problem over <paramref name="dataSets"/>.</summary>
    /// <exception cref="DeckException">Some columns give standard deviations and others do not.</exception>
    public FitProblem(IReadOnlyList<FreeParameter> parameters, IReadOnlyList<DataSetModel> dataSets, DerivativeMode derivatives = DerivativeMode.Auto)
    {
        Parameters = parameters;
        Derivatives = derivatives;
        DataSets = dataSets;
        var series = dataSets.SelectMany(d => d.Data.Series.Select(s => (d, s))).ToList();
        var weighted = series.Count(x => x.s.StandardDeviations is not null);
        if (weighted != 0 && weighted != series.Count)
        {
            var (set, column) = series.First(x => x.s.StandardDeviations is null);
            throw new DeckException(set.Spec.Span, $"column `{column.Name}` of {set.Data.Path} has no standard deviations while other columns have; give NAME_sd for every column or for none (weights must share one scale)");
        }

        HasStandardDeviations = weighted > 0;
        _observed = [.. series.SelectMany(x => x.s.Values)];
        _weights = [.. series.SelectMany(x => x.s.StandardDeviations?.Select(sd => 1 / sd) ?? x.s.Values.Select(_ => 1.0))];
        Lower = [.. parameters.Select(p => p.LowerVariable)];
        Upper = [.. parameters.Select(p => p.UpperVariable)];
    }

    /// <summary>The free parameters.</summary>
    public IReadOnlyList<FreeParameter> Parameters { get; }

    /// <summary>How the Jacobian is formed.</summary>
    public DerivativeMode Derivatives { get; }

    /// <summary>
    /// Per parameter, null when its Jacobian column is analytic, else why it is formed by central
    /// differences; null before the first Jacobian.
    /// </summary>
    public IReadOnlyList<string?>? DifferencedBecause => _differenced;

    /// <summary>The data sets.</summary>
    public IReadOnlyList<DataSetModel> DataSets { get; }

    /// <summary>Exact trajectories computed so far over every data set (each trial, each difference, each curve).</summary>
    public int TrajectoryEvaluations => DataSets.Sum(d => d.TrajectoryEvaluations);

    /// <summary>True when the data give standard deviations (the residuals are weighted).</summary>
    public bool HasStandardDeviations { get; }

    /// <summary>The observed values, data set after data set.</summary>
    public IReadOnlyList<double> Observed => _observed;

    /// <summary>The weight 1/sd of each observed value (1 without standard deviations).</summary>
    public IReadOnlyList<double> Weights => _weights;

    /// <summary>
    /// (1e-10)^2 sum (w_i y_i)^2: residuals of 1e-10 of the weighted data are within the exact
    /// propagation's rounding (measured: 3e-12 of the populations on a six-state triangle whose pi
    /// spans one decade; the symmetric path admits up to 1e-9), so an exact fit ends there.
    /// </summary>
    public double RoundingRss => 1e-20 * _observed.Select((y, i) => y * y * _weights[i] * _weights[i]).Sum();

    /// <inheritdoc />
    public int ParameterCount => Parameters.Count;

    /// <inheritdoc />
    public int ResidualCount => _observed.Length;

    /// <inheritdoc />
    public IReadOnlyList<double> Lower { get; }

    /// <inheritdoc />
    public IReadOnlyList<double> Upper { get; }

    /// <summary>The parameter values of the optimizer's variables.</summary>
    public double[] Values(double[] u) => [.. Parameters.Select((p, j) => p.FromVariable(u[j]))];

    /// <summary>The optimizer's variables of parameter values.</summary>
    public double[] Variables(IReadOnlyList<double> values) => [.. Parameters.Select((p, j) => p.ToVariable(values[j]))];

    /// <summary>The model's value for every observed value at <paramref name="values"/>.</summary>
    /// <exception cref="InfeasibleTrialException">The model cannot be evaluated there.</exception>
    public double[] Predict(IReadOnlyList<double> values)
    {
        var targets = Parameters.Select(p => p.Target).ToList();
        return [.. DataSets.SelectMany(d => d.Predict(targets, values))];
    }

    /// <inheritdoc />
    public bool TryResiduals(double[] u, double[] residuals)
    {
        double[] predicted;
        try
        {
            predicted = Predict(Values(u));
        }
        catch (InfeasibleTrialException)
        {
            return false;
        }

        for (var i = 0; i < residuals.Length; i++)
        {
            residuals[i] = (predicted[i] - _observed[i]) * _weights[i];
            if (!double.IsFinite(residuals[i]))
            {
                return false;
            }
        }

        return true;
    }

    /// <inheritdoc />
    public bool TryJacobian(double[] u, double[] residuals, double[,] jacobian, out int residualEvaluations)
    {
        residualEvaluations = 0;
        var m = ResidualCount;
        var plus = new double[m];
        var minus = new double[m];
        foreach (var j in AnalyticColumns(u, jacobian))
        {
            var h = DifferenceStep * (u[j] != 0 ? Math.Abs(u[j]) : 1);
            var up = (double[])u.Clone();
            var down = (double[])u.Clone();
            up[j] += h;
            down[j] -= h;
            var upOk = up[j] <= Upper[j] && TryResiduals(up, plus);
            var downOk = down[j] >= Lower[j] && TryResiduals(down, minus);
            residualEvaluations += (upOk ? 1 : 0) + (downOk ? 1 : 0);
            if (!upOk && !downOk)
            {
                return false;
            }

            for (var i = 0; i < m; i++)
            {
                jacobian[i, j] = upOk && downOk ? (plus[i] - minus[i]) / (2 * h)
                    : upOk ? (plus[i] - residuals[i]) / h
                    : (residuals[i] - minus[i]) / h;
            }
        }

        return true;
    }

    /// <summary>
    /// Fills the analytic columns of <paramref name="jacobian"/> at <paramref name="u"/> and returns
    /// the columns left to differences. At the first call every column is tried and those that
    /// cannot be analytic in some data set are kept to differences for the whole fit.
    /// </summary>
    private List<int> AnalyticColumns(double[] u, double[,] jacobian)
    {
        var all = Enumerable.Range(0, ParameterCount).ToList();
        if (Derivatives == DerivativeMode.Differences)
        {
            _differenced ??= [.. all.Select(_ => "central differences asked for (fit.derivatives)")];
            return all;
        }

        var first = _differenced is null;
        var reasons = _differenced is null ? new string?[ParameterCount] : (string?[])_differenced.Clone();
        var columns = all.Where(j => reasons[j] is null).ToList();
        var values = Values(u);
        var targets = Parameters.Select(p => p.Target).ToList();
        var blocks = new List<double[]?[]>();
        try
        {
            blocks.AddRange(DataSets.Select(d => d.Sensitivities(targets, values, columns, reasons)));
        }
        catch (InfeasibleTrialException e)
        {
            // Not expected at a point whose residuals were evaluated; this Jacobian falls back to differences.
            reasons = [.. all.Select(_ => "the analytic sensitivities could not be evaluated: " + e.Message)];
        }

        if (first)
        {
            _differenced = reasons;
        }

        for (var slot = 0; slot < columns.Count; slot++)
        {
            var j = columns[slot];
            if (reasons[j] is not null)
            {
                continue;
            }

            var scale = Parameters[j].Derivative(values[j]);
            var row = 0;
            foreach (var block in blocks)
            {
                foreach (var value in block[slot]!)
                {
                    jacobian[row, j] = value * scale * _weights[row];
                    row++;
                }
            }
        }

        return [.. all.Where(j => reasons[j] is not null)];
    }
}
