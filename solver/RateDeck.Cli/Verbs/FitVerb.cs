using System.CommandLine;
using System.Globalization;
using RateDeck.Cli.CommandLine;
using RateDeck.Fitting;
using RateDeck.Fitting.Outputs;
using RateDeck.LinearAlgebra;
using RateDeck.Outputs;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck fit DECK</c>: fits the free parameters of the deck's [fit] table to its data sets
/// (docs/fitting.md) and writes the residuals, the correlation matrix, a plot and the fitted deck.
/// Exit 0 when the fit converged, 6 when it did not (the report is still printed).
/// </summary>
public sealed class FitVerb : IVerb
{
    // The options of fit, declared once here.
    private readonly Option<string?> _out = VerbOptions.Folder("output folder (default: ratedeck-out/<deck name>)");
    private readonly Option<int?> _starts = VerbOptions.WholeNumber("--starts", "N", "number of starting points: the deck's values, then seeded random ones (default: fit.starts or 1)", minimum: 1);
    private readonly Option<int?> _seed = VerbOptions.WholeNumber("--seed", "N", "seed of the random starting points (default: fit.seed or 1)", minimum: 0);
    private readonly Option<bool> _noPlots = VerbOptions.Switch("--no-plots", "write no PNG plot");
    private readonly Option<string?> _statusFile = VerbOptions.Single<string?>("--status-file", "FILE", "also write FILE, one CSV row: the exit code and the diagnostics of this fit, whatever the outcome (the job lines of sweep --fit --emit-jobs use it)", text => text);

    /// <summary>Declares the verb and its options.</summary>
    public FitVerb() => Command = DeckOptions.Command("fit", "fit kT, parameters, rates or initial populations to measured time series; estimates with errors", _out, _starts, _seed, _noPlots, _statusFile);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var settings = new FitSettings(args.Value(_out), args.Value(_starts), args.Value(_seed), !args.Has(_noPlots), args.Json, args.Quiet);
        return args.Value(_statusFile) is { } statusFile
            ? RunVerb.WithStatus("fit", statusFile, context, recorded => Execute(args.DeckPath, args.Overrides, VerbSupport.Algebra(args), settings, recorded))
            : Execute(args.DeckPath, args.Overrides, VerbSupport.Algebra(args), settings, context);
    }

    /// <summary>Fits the deck at <paramref name="deckPath"/> with <paramref name="overrides"/>: the work of the verb after its command line is read (a sweep point runs it too).</summary>
    internal static int Execute(string deckPath, IReadOnlyList<string> overrides, ILinearAlgebra algebra, FitSettings settings, VerbContext context)
    {
        var outcome = Fitter.Fit(deckPath, overrides, algebra, new FitOptions(settings.Starts, settings.Seed));
        var folder = VerbSupport.OutputFolder(settings.Out, outcome.Deck);
        var notWrittenBack = new List<string>();
        string? fittedDeck = null;
        IReadOnlyList<string> files;
        // The files enter the folder all together or not at all, as a run's do; the fitted deck
        // goes with them when --out names the folder, else beside the deck.
        using (var staging = StagedOutputFolder.Begin(folder))
        {
            FitFiles.WriteResiduals(staging.PathOf("residuals.csv"), outcome);
            FitFiles.WriteCorrelation(staging.PathOf("correlation.csv"), outcome);
            FitFiles.WriteResults(staging.PathOf(FitFiles.ResultsName), outcome);
            if (settings.Plots)
            {
                FitPlot.Write(staging.PathOf("fit.png"), outcome);
            }

            // The summary lists these files and names the fitted deck on a line of its own.
            files = [.. staging.Written];
            if (outcome.Report.Converged)
            {
                var name = Path.GetFileNameWithoutExtension(deckPath) + ".fitted.toml";
                fittedDeck = settings.Out is null ? Path.Combine(Path.GetDirectoryName(deckPath) ?? "", name) : Path.Combine(folder, name);
                notWrittenBack.AddRange(FittedDeckWriter.Write(deckPath, settings.Out is null ? fittedDeck : staging.PathOf(name), outcome.Problem.Parameters, outcome.Values, outcome.Deck.EnergyUnit));
            }

            staging.Commit();
        }

        var report = outcome.Report;
        if (settings.Json)
        {
            var json = Json(outcome, algebra, folder, files);
            json["fitted_deck"] = fittedDeck;
            json["not_written_back"] = notWrittenBack;
            JsonSummary.Write(context.Out, json);
        }
        else if (settings.Quiet)
        {
            var estimates = report.Parameters.Select(p => $"{p.Name} = {Format.Number(p.Value)} +- {(double.IsNaN(p.StandardError) ? "?" : Format.Number(p.StandardError))}");
            context.Out.WriteLine($"fit {outcome.Deck.SourcePath}: {(report.Converged ? "converged" : "NOT CONVERGED")}, {string.Join(", ", estimates)}, RSS {Format.Number(report.Rss)}; wrote {files.Count + (fittedDeck is null ? 0 : 1)} files");
        }
        else
        {
            WriteSummary(context.Out, outcome, algebra, folder, files);
            context.Out.WriteLine(fittedDeck is null
                ? "fitted deck not written: the fit did not converge"
                : $"wrote the fitted deck {fittedDeck} (only the fitted values changed)");
            foreach (var note in notWrittenBack)
            {
                context.Out.WriteLine($"  not written back: {note}");
            }
        }

        return report.Converged ? ExitCodes.Success : ExitCodes.NotConverged;
    }

    private static Dictionary<string, object?> Json(FitOutcome outcome, ILinearAlgebra algebra, string folder, IReadOnlyList<string> files)
    {
        var report = outcome.Report;
        var deck = outcome.Deck;
        return new Dictionary<string, object?>(VerbSupport.JsonFields(deck, algebra))
        {
            ["converged"] = report.Converged,
            ["stop_reason"] = StopText(report),
            ["parameters"] = report.Parameters.ToDictionary(p => p.Name, p => new Dictionary<string, object?>
            {
                ["value"] = p.Value,
                ["std_error"] = p.StandardError,
                ["start"] = p.Start,
                ["at_bound"] = p.Bound,
                ["profile_lower"] = p.ProfileLower,
                ["profile_upper"] = p.ProfileUpper,
                ["profile_open"] = p.ProfileOpen,
            }),
            ["rss"] = report.Rss,
            ["residual_sd"] = report.ResidualSd,
            ["dof"] = report.Dof,
            ["observations"] = report.Observations,
            ["iterations"] = report.Best.Iterations,
            ["function_evaluations"] = report.Best.ResidualEvaluations,
            ["jacobian_evaluations"] = report.Best.JacobianEvaluations,
            ["trajectory_evaluations"] = report.TrajectoryEvaluations,
            ["derivatives"] = report.Derivatives,
            ["profile_rule"] = report.ProfileRule,
            ["infeasible_trials"] = report.Best.InfeasibleTrials,
            ["starts"] = report.Starts.Run,
            ["starts_converged"] = report.Starts.Converged,
            ["errors_from"] = report.ErrorSource,
            ["correlation"] = Enumerable.Range(0, report.Parameters.Count).Select(a => Enumerable.Range(0, report.Parameters.Count).Select(b => report.Correlation[a, b]).ToArray()).ToArray(),
            ["scaled_singular_values"] = report.ScaledSingularValues,
            ["warnings"] = report.Warnings,
            ["data_sets"] = outcome.Problem.DataSets.Select(d => new Dictionary<string, object?>
            {
                ["name"] = d.Spec.Name,
                ["csv"] = d.Spec.CsvPath,
                ["observations"] = d.Data.Count,
                ["propagator"] = d.PropagatorPath,
            }).ToArray(),
            ["output_folder"] = folder,
            ["files"] = files,
        };
    }

    private static string StopText(Fitting.Report.FitReport report) => report.Best.Stop switch
    {
        Fitting.Optimization.StopReason.GradientOrthogonal => "gradient: every Jacobian column orthogonal to the residuals within 1e-8",
        Fitting.Optimization.StopReason.StepSmall => "step: the last step changed no parameter by more than 1e-10 relative",
        Fitting.Optimization.StopReason.RssChangeSmall => "rss: the last step changed the RSS by less than 1e-14 relative",
        Fitting.Optimization.StopReason.ZeroResiduals => "zero residuals",
        Fitting.Optimization.StopReason.RoundingLimited => "rounding: no step reduces the RSS and the Gauss-Newton step predicts less than 1e-10 of it",
        Fitting.Optimization.StopReason.IterationLimit => "not converged: iteration limit (fit.max_iterations)",
        Fitting.Optimization.StopReason.NoDescent => "not converged: no step reduces the RSS (inaccurate derivatives, or every trial infeasible)",
        _ => "not converged: the Jacobian could not be evaluated at an accepted point",
    };

    private static void WriteSummary(TextWriter output, FitOutcome outcome, ILinearAlgebra algebra, string folder, IReadOnlyList<string> files)
    {
        var report = outcome.Report;
        var deck = outcome.Deck;
        output.WriteLine($"deck         {deck.SourcePath}  \"{deck.Title}\"  sha256 {deck.Sha256[..12]}");
        if (deck.Overrides.Count > 0)
        {
            output.WriteLine($"overrides    {string.Join(" ", deck.Overrides)}");
        }

        foreach (var set in outcome.Problem.DataSets)
        {
            output.WriteLine($"data         {set.Spec.Name}: {set.Data.Count} values in {set.Data.Series.Count} column(s) of {set.Spec.CsvPath}; exact path {set.PropagatorPath} (kept for every trial), linear algebra {algebra.Name}");
        }

        output.WriteLine($"result       {(report.Converged ? "converged" : "NOT CONVERGED")}: {StopText(report)}");
        output.WriteLine($"             {report.Best.Iterations} iterations, {report.Best.ResidualEvaluations} model evaluations, {report.Best.JacobianEvaluations} Jacobians; starts {report.Starts.Run} ({report.Starts.Converged} converged); {report.TrajectoryEvaluations} trajectories in all");
        foreach (var group in report.Derivatives.GroupBy(d => d.Value))
        {
            output.WriteLine($"derivatives  {string.Join(", ", group.Select(d => d.Key))}: {group.Key}");
        }
        output.WriteLine();
        var width = Math.Max(10, report.Parameters.Max(p => p.Name.Length));
        output.WriteLine($"  {"parameter".PadRight(width)}  {"estimate",-22} {"std error",-12} {"start",-12}{(report.Parameters.Any(p => p.ProfileLower is not null) ? " profile interval" : "")}");
        foreach (var p in report.Parameters)
        {
            var interval = p.ProfileLower is { } lo && p.ProfileUpper is { } hi ? string.Create(CultureInfo.InvariantCulture, $" [{lo:G8}, {hi:G8}]") : "";
            var bound = p.Bound is null ? "" : $" (at {p.Bound} bound)";
            output.WriteLine($"  {p.Name.PadRight(width)}  {p.Value.ToString("R", CultureInfo.InvariantCulture),-22} {(double.IsNaN(p.StandardError) ? "not determined" : Format.Number(p.StandardError)),-12} {Format.Number(p.Start),-12}{interval}{bound}");
        }

        output.WriteLine();
        output.WriteLine($"  RSS {Format.Number(report.Rss)}, residual sd {Format.Number(report.ResidualSd)}, dof {report.Dof} ({report.Observations} values - {report.Parameters.Count} parameters)");
        output.WriteLine($"  standard errors from {report.ErrorSource}");
        if (report.ProfileRule is { } profileRule)
        {
            output.WriteLine($"  profile intervals at {profileRule}");
        }
        output.WriteLine($"  scaled singular values of the Jacobian: {string.Join(", ", report.ScaledSingularValues.Select(Format.Number))}");
        foreach (var warning in report.Warnings)
        {
            output.WriteLine($"warning      {warning}");
        }

        output.WriteLine();
        output.WriteLine($"wrote {files.Count} files to {folder}: {string.Join(", ", files)}");
    }
}

/// <summary>The options of a fit after its command line is read.</summary>
internal sealed record FitSettings(string? Out, int? Starts, int? Seed, bool Plots, bool Json, bool Quiet);
