using RateDeck.Outputs;

namespace RateDeck.Fitting.Outputs;

/// <summary>The CSV files of a fit: residuals and correlation matrix, each with the provenance header.</summary>
public static class FitFiles
{
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
