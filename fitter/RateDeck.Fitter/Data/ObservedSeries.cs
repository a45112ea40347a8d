namespace RateDeck.Fitting.Data;

/// <summary>
/// One observed column of a data set: the values at the times of the rows where it is given, and
/// the standard deviation of each value when the file gives one (null: unweighted).
/// </summary>
/// <param name="Name">The column name: a state label or an observable name.</param>
/// <param name="Times">The times of the given values, in file order.</param>
/// <param name="Values">The observed values.</param>
/// <param name="StandardDeviations">The standard deviation of each value, or null.</param>
public sealed record ObservedSeries(string Name, double[] Times, double[] Values, double[]? StandardDeviations);

/// <summary>A data file read: its observed columns.</summary>
/// <param name="Path">The file.</param>
/// <param name="Series">The observed columns, in file order.</param>
public sealed record DataTable(string Path, IReadOnlyList<ObservedSeries> Series)
{
    /// <summary>Number of observed values over all columns.</summary>
    public int Count => Series.Sum(s => s.Values.Length);
}
