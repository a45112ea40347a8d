using RateDeck.Outputs;

namespace RateDeck.Fitting.Outputs;

/// <summary>The CSV files of a fit: residuals and correlation matrix, each with the provenance header.</summary>
public static class FitFiles
{
    /// <summary>The name of the one-row table of a fit's scalar results in its output folder (the same name as a run's).</summary>
    public const string ResultsName = RunResultsFile.Name;

    /// <summary>
    /// results.csv: the scalar results of the fit in one row, so that a sweep's table is these rows
    /// one under another: <c>converged</c> (true or false), <c>rss</c>, <c>residual_sd</c>,
    /// <c>dof</c>, <c>iterations</c>, then per free parameter, in [fit.free] order,
    /// <c>estimate_NAME</c> and <c>std_error_NAME</c> (empty when the data do not determine it).
    /// </summary>
    public static void WriteResults(string path, FitOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var report = outcome.Report;
        var cells = new List<(string Name, string Text)>
        {
            ("converged", report.Converged ? "true" : "false"),
            ("rss", CsvNumber.Format(report.Rss)),
            ("residual_sd", CsvNumber.Format(report.ResidualSd)),
            ("dof", report.Dof.ToString(System.Globalization.CultureInfo.InvariantCulture)),
            ("iterations", report.Best.Iterations.ToString(System.Globalization.CultureInfo.InvariantCulture)),
        };
        foreach (var parameter in report.Parameters)
        {
            cells.Add(("estimate_" + parameter.Name, CsvNumber.Format(parameter.Value)));
            cells.Add(("std_error_" + parameter.Name, double.IsNaN(parameter.StandardError) ? "" : CsvNumber.Format(parameter.StandardError)));
        }

        ResultCsv.WriteRecords(path, OutputHeader.For(outcome.Deck), [new("errors_from", report.ErrorSource)], [.. cells.Select(c => c.Name)], [[.. cells.Select(c => c.Text)]]);
    }

    /// <summary>
    /// residuals.csv: one row per observed value: data set, column, time, observed, its standard
    /// deviation (empty when none), fitted, residual = observed - fitted and the weighted residual
    /// (residual / sd, or the residual when unweighted).
    /// </summary>
    public static void WriteResiduals(string path, FitOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var problem = outcome.Problem;
        var fitted = problem.Predict(outcome.Values);
        AtomicFile.Write(path, writer =>
        {
            OutputHeader.For(outcome.Deck).WriteTo(writer, [new("residual", "observed - fitted; weighted_residual = residual / sd (the residual itself without standard deviations)")]);
            writer.WriteLine("data_set,column,t,observed,sd,fitted,residual,weighted_residual");
            var k = 0;
            foreach (var set in problem.DataSets)
            {
                foreach (var series in set.Data.Series)
                {
                    for (var row = 0; row < series.Values.Length; row++, k++)
                    {
                        var residual = series.Values[row] - fitted[k];
                        var sd = series.StandardDeviations?[row];
                        writer.WriteLine(string.Join(',',
                            set.Spec.Name,
                            series.Name,
                            CsvNumber.Format(series.Times[row]),
                            CsvNumber.Format(series.Values[row]),
                            sd is { } given ? CsvNumber.Format(given) : "",
                            CsvNumber.Format(fitted[k]),
                            CsvNumber.Format(residual),
                            CsvNumber.Format(residual * problem.Weights[k])));
                    }
                }
            }
        });
    }

    /// <summary>correlation.csv: the correlation matrix with the parameter names as header and first column.</summary>
    public static void WriteCorrelation(string path, FitOutcome outcome)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var names = outcome.Report.Parameters.Select(p => p.Name).ToArray();
        var correlation = outcome.Report.Correlation;
        AtomicFile.Write(path, writer =>
        {
            OutputHeader.For(outcome.Deck).WriteTo(writer, [new("correlation", "of the estimates, from the linearised covariance; nan where a standard error is not determined")]);
            writer.WriteLine("parameter," + string.Join(',', names));
            for (var a = 0; a < names.Length; a++)
            {
                writer.WriteLine(names[a] + "," + string.Join(',', Enumerable.Range(0, names.Length).Select(b => CsvNumber.Format(correlation[a, b]))));
            }
        });
    }
}
