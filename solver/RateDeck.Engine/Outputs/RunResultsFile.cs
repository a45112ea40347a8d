using RateDeck.Pipeline;

namespace RateDeck.Outputs;

/// <summary>
/// <c>results.csv</c>: the scalar results of one run in one row, so that a sweep's table is these
/// rows one under another, whether the points ran inside one <c>sweep</c> or as separate
/// <c>run</c> commands on a batch system (<c>ratedeck collect</c> reads them). Columns, an empty
/// cell where a value does not exist: <c>exact_path</c>; <c>spectral_radius</c> and
/// <c>slowest_rate</c> (1/time unit); the explicit step limits <c>dt_euler_stable</c>,
/// <c>dt_positive</c>, <c>dt_rk4_stable</c>; <c>explicit_method</c> and <c>dt</c> of the explicit
/// run; <c>max_abs_difference</c> and <c>max_difference_relative_to_total</c> of explicit against
/// exact; <c>final_total_population</c>; <c>steady_state</c> (undriven, driven or none),
/// <c>steady_state_distance</c> of the last output from it, and one <c>steady_fraction_LABEL</c>
/// per state: its share of the steady total.
/// </summary>
public static class RunResultsFile
{
    /// <summary>The file name in a run's output folder.</summary>
    public const string Name = "results.csv";

    /// <summary>The column name of state <paramref name="label"/>'s steady-state fraction.</summary>
    public static string SteadyFractionColumn(string label) => "steady_fraction_" + label;

    /// <summary>Writes the row of <paramref name="run"/>, whose trajectories the caller has computed.</summary>
    public static void Write(string path, OutputHeader header, DeckRun run)
    {
        ArgumentNullException.ThrowIfNull(run);
        var cells = Cells(run);
        var unit = run.Loaded.Deck.TimeUnit;
        KeyValuePair<string, string>[] notes =
        [
            new("units", $"spectral_radius=1/{unit}, slowest_rate=1/{unit}, dt_euler_stable={unit}, dt_positive={unit}, dt_rk4_stable={unit}, dt={unit}"),
        ];
        ResultCsv.WriteRecords(path, header, notes, [.. cells.Select(c => c.Name)], [[.. cells.Select(c => c.Text)]]);
    }

    private static List<(string Name, string Text)> Cells(DeckRun run)
    {
        var limits = run.StepLimits;
        var explicitRun = run.ExplicitPropagator is not null;
        var difference = run.Difference;
        var steady = run.Steady;
        var cells = new List<(string Name, string Text)>
        {
            ("exact_path", run.ExactPropagator.Name),
            ("spectral_radius", Number(limits.SpectralRadius)),
            ("slowest_rate", Number(limits.SlowestRate)),
            ("dt_euler_stable", Number(limits.EulerStable.MaxStep)),
            ("dt_positive", Number(limits.Positivity.MaxStep)),
            ("dt_rk4_stable", Number(limits.Rk4Stable.MaxStep)),
            ("explicit_method", explicitRun ? Propagation.ExplicitPropagatorChoice.MethodName(run.Method) : ""),
            ("dt", explicitRun ? Number(run.ExplicitStep) : ""),
            ("max_abs_difference", Number(difference?.MaxAbsolute)),
            ("max_difference_relative_to_total", Number(difference?.MaxRelativeToTotal)),
            ("final_total_population", Number(run.Exact.Populations[^1].Sum())),
            ("steady_state", steady.Kind.ToString().ToLowerInvariant()),
            ("steady_state_distance", Number(run.SteadyDistance)),
        };
        var total = steady.Populations?.Sum();
        var labels = run.Loaded.States.Labels;
        for (var i = 0; i < labels.Length; i++)
        {
            cells.Add((SteadyFractionColumn(labels[i]), total is > 0 ? Number(steady.Populations![i] / total) : ""));
        }

        return cells;
    }

    private static string Number(double? value) => value is { } v ? CsvNumber.Format(v) : "";
}
