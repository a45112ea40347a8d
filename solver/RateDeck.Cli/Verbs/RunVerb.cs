using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Propagation;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck run DECK</c>: integrates from the deck's initial state to t_end with the explicit
/// method and the exact propagator side by side, compares them, and writes populations,
/// differences, spectrum, steady state and plots. An explicit step above the method's stability
/// limit is refused with exit 3 unless <c>--allow-unstable</c> is given.
/// </summary>
public sealed class RunVerb : IVerb
{
    // The options of run, declared once here.
    private readonly Option<StepRequest?> _dt = VerbOptions.Single<StepRequest?>("--dt", "X|auto", "explicit time step (default: the deck's run.dt; auto = the step whose estimated error meets run.accuracy, at most run.safety x the stability limit)", StepRequest.Parse);
    private readonly Option<Decks.ExplicitMethod?> _method = VerbOptions.Method("explicit method (default: the deck's run.explicit)");
    private readonly Option<string?> _out = VerbOptions.Folder("output folder (default: ratedeck-out/<deck name>)");
    private readonly Option<bool> _exactOnly = VerbOptions.Switch("--exact-only", "skip the explicit method");
    private readonly Option<string?> _exact = VerbOptions.Word("--exact", "exact path: auto (default: chosen from the spectrum, reason printed), the implicit integrator, or the double-double eigen path", "auto", "implicit", "extended");
    private readonly Option<bool> _implicit = VerbOptions.Switch("--implicit", "also run the implicit integrator beside explicit and exact, and compare it with exact");
    private readonly Option<bool> _allowUnstable = VerbOptions.Switch("--allow-unstable", "run an explicit step above the stability limit anyway, to see it fail");
    private readonly Option<bool> _requireAccuracy = VerbOptions.Switch("--require-accuracy", "exit 4 when explicit and exact differ by more than run.accuracy of the total");
    private readonly Option<bool> _noPlots = VerbOptions.Switch("--no-plots", "write no PNG plots");
    private readonly Option<bool> _writeRates = VerbOptions.Switch("--write-rates", "also write the assembled rate matrix K as rate-matrix.csv (from, to, rate triplets)");
    private readonly Option<bool> _fullSpectrum = VerbOptions.FullSpectrum();
    private readonly Option<string?> _statusFile = VerbOptions.Single<string?>("--status-file", "FILE", "also write FILE, one CSV row: the exit code and the diagnostics of this run, whatever the outcome (the job lines of sweep --emit-jobs use it)", text => text);

    /// <summary>Declares the verb and its options.</summary>
    public RunVerb() => Command = DeckOptions.Command("run", "integrate explicitly and exactly side by side; write populations, differences, spectrum, steady state, results, plots",
        _dt, _method, _out, _exactOnly, _exact, _implicit, _allowUnstable, _requireAccuracy, _noPlots, _writeRates, _fullSpectrum, _statusFile);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var settings = new RunSettings(args.Value(_dt), args.Value(_method), args.Value(_out), args.Has(_exactOnly), args.Value(_exact), args.Has(_implicit),
            args.Has(_allowUnstable), args.Has(_requireAccuracy), !args.Has(_noPlots), args.Has(_writeRates), args.Json, args.Quiet, VerbSupport.ShowsProgress(args, context))
        {
            FullSpectrum = args.Has(_fullSpectrum),
        };
        return args.Value(_statusFile) is { } statusFile
            ? WithStatus("run", statusFile, context, recorded => Execute(VerbSupport.Load(args), settings, recorded))
            : Execute(VerbSupport.Load(args), settings, context);
    }

    /// <summary>
    /// Runs <paramref name="body"/> as the verb <paramref name="verb"/> (every failure turned into its
    /// exit code and message), then writes the exit code and what it printed on stderr to the status
    /// file <paramref name="statusFile"/>, whatever the outcome: a sweep point, in process or as a job.
    /// </summary>
    internal static int WithStatus(string verb, string statusFile, VerbContext context, Func<VerbContext, int> body)
    {
        using var diagnostics = new StringWriter();
        using var both = new TeeWriter(context.Error, diagnostics);
        var recorded = context with { Error = both };
        var code = Commands.Guard(verb, both, () => body(recorded));
        Sweeps.SweepFolder.WriteStatus(statusFile, code, diagnostics.ToString());
        return code;
    }

    /// <summary>
    /// Runs <paramref name="loaded"/> with <paramref name="settings"/>: the work of the verb after its
    /// command line is read. An exact path that gives up is refused with exit 8 before any file is written.
    /// </summary>
    internal static int Execute(LoadedDeck loaded, RunSettings settings, VerbContext context)
    {
        try
        {
            return Run(loaded, settings, context);
        }
        catch (IntegrationGaveUpException e)
        {
            // The implicit cross-check beside another exact path never reaches here (DeckRun.ImplicitNotDone).
            var remedies = new List<string> { "ask for fewer output times (run.outputs or run.times) or a shorter run.t_end" };
            if (loaded.Rates.Origin == Rates.BalanceOrigin.CompletedByDetailedBalance && loaded.Rates.Count <= Spectrum.ExtendedPrecisionStateLimit)
            {
                remedies.Add("take the double-double eigen path, which serves this deck (--exact extended)");
            }

            if (settings.ExactPath == "implicit")
            {
                remedies.Add("drop --exact implicit to let run choose the path");
            }

            context.Error.WriteLine($"ratedeck run: exact path: {e.Message}; nothing was written: {string.Join(", or ", remedies)}");
            return ExitCodes.IntegrationGaveUp;
        }
    }

    private static int Run(LoadedDeck loaded, RunSettings settings, VerbContext context)
    {
        var step = settings.Step;
        var run = new DeckRun(loaded, new RunOptions
        {
            Method = settings.Method,
            Dt = step?.Fixed,
            AutomaticDt = step is { Fixed: null },
            ExactOnly = settings.ExactOnly,
            AllowUnsafeStep = settings.AllowUnstable,
            ExactPath = settings.ExactPath switch
            {
                "implicit" => ExactPathRequest.Implicit,
                "extended" => ExactPathRequest.Extended,
                _ => null,
            },
            WithImplicit = settings.WithImplicit,
            FullSpectrum = settings.FullSpectrum,
            Progress = label => new TerminalProgress($"{label,-8}", enabled: settings.Progress),
        });
        var explicitWanted = !run.Options.ExactOnly && run.ExplicitDeclined is null;
        if (explicitWanted && !run.StepVerdict.Safe && !run.Options.AllowUnsafeStep)
        {
            var advice = run.ExplicitStep <= run.StabilityLimit
                ? "use --exact-only, or drop --dt and --method to let run decline the explicit method"
                : "choose a smaller --dt (or --dt auto), use --exact-only, or pass --allow-unstable to watch it diverge";
            context.Error.WriteLine($"ratedeck run: {run.StepVerdict.Problem}; {advice}");
            return ExitCodes.UnsafeTimeStep;
        }

        IPropagator exactPropagator;
        try
        {
            exactPropagator = run.ExactPropagator;
        }
        catch (ArgumentException e) when (run.Options.ExactPath is not null)
        {
            throw new UsageException($"--exact {settings.ExactPath}: {e.Message}");
        }

        var exact = run.Exact;
        _ = run.Implicit;
        var explicitResult = run.Explicit;
        var difference = run.Difference;
        var steady = run.Steady;
        var distance = run.SteadyDistance;
        var dt = run.ExplicitStep;
        var stabilityLimit = run.StabilityLimit;

        var outputFolder = VerbSupport.OutputFolder(settings.Out, loaded.Deck);
        var outputs = new RunOutputs(loaded, outputFolder, run);
        var written = outputs.Write(exact, explicitResult, run.Spectrum, steady, dt, run.Method, settings.Plots, settings.WriteRates);
        if (outputs.PlotsRefused is { } refused)
        {
            context.Error.WriteLine($"ratedeck run: {refused}");
        }

        if (run.ImplicitNotDone is { } gaveUp)
        {
            context.Error.WriteLine($"ratedeck run: the implicit cross-check (--implicit) was not done, the results are the exact path's: {gaveUp}");
        }


        var explicitMethod = explicitWanted ? VerbSupport.MethodName(run.Method) : null;
        if (settings.Json)
        {
            var fields = VerbSupport.JsonFields(loaded);
            fields["propagator"] = exactPropagator.Name;
            fields["propagator_reason"] = exactPropagator.Reason;
            fields["spectrum_coverage"] = run.Spectrum.Coverage;
            fields["explicit_method"] = explicitMethod;
            fields["explicit_declined"] = run.ExplicitDeclined;
            fields["implicit_steps"] = run.ImplicitNotDone is null ? run.ImplicitPropagator?.Statistics : null;
            fields["implicit_not_done"] = run.ImplicitNotDone;
            fields["implicit_vs_exact_max_abs_difference"] = run.ImplicitDifference?.MaxAbsolute;
            fields["implicit_vs_exact_max_rel_difference"] = run.ImplicitDifference?.MaxRelative;
            fields["dt"] = explicitWanted ? dt : null;
            fields["dt_stability_limit"] = stabilityLimit;
            fields["dt_chosen_for_accuracy"] = run.AccurateStep is not null;
            fields["dt_error_estimate"] = run.AccurateStep?.EstimatedError;
            fields["accuracy_target"] = loaded.Deck.Run.Accuracy;
            fields["accuracy_met"] = run.AccuracyMet;
            fields["max_abs_difference"] = difference?.MaxAbsolute;
            fields["max_rel_difference"] = difference?.MaxRelative;
            fields["max_difference_relative_to_total"] = difference?.MaxRelativeToTotal;
            fields["steady_state"] = steady.Kind.ToString().ToLowerInvariant();
            fields["steady_state_distance"] = distance;
            fields["final_total_population"] = exact.Populations[^1].Sum();
            fields["exact_conservation_drift"] = run.ExactConservationDrift;
            fields["output_times"] = run.Times.Length;
            fields["output_folder"] = outputFolder;
            fields["files"] = written;
            JsonSummary.Write(context.Out, fields);
            context.Out.WriteLine();
        }
        else if (settings.Quiet)
        {
            var explicitPart = explicitMethod is not null && difference is not null
                ? $"{explicitMethod} dt = {Format.Number(dt)} {loaded.Deck.TimeUnit} differs from exact by {Format.Number(difference.MaxRelativeToTotal)} of the total"
                : run.ExplicitDeclined is not null ? "explicit declined" : "exact only";
            var steadyPart = distance is { } d ? $", {Format.Number(d)} from the steady state at t_end" : "";
            context.Out.WriteLine($"run {loaded.Deck.SourcePath}: exact {exactPropagator.Name}, {explicitPart}{steadyPart}; wrote {written.Count} files to {outputFolder}");
        }
        else
        {
            VerbSupport.WriteDeckLine(context.Out, loaded);
            context.Out.WriteLine($"exact        {exactPropagator.Reason}");
            if (exactPropagator is ImplicitSdirkPropagator steps)
            {
                context.Out.WriteLine($"             {steps.Statistics}");
            }

            if (run.ExplicitPropagator is { } explicitPropagator)
            {
                context.Out.WriteLine($"explicit     {explicitMethod}, dt = {Format.Time(dt, loaded.Deck.TimeUnit)} (stability limit {Format.Time(stabilityLimit, loaded.Deck.TimeUnit)}); {explicitPropagator.Reason}");
                context.Out.WriteLine($"             {run.AccurateStep?.Reason ?? "dt as given, not chosen for accuracy"}");
            }
            else if (run.ExplicitDeclined is { } declined)
            {
                context.Out.WriteLine($"explicit     {declined}");
            }

            if (run.ImplicitNotDone is { } notDone)
            {
                context.Out.WriteLine($"implicit     not done: {notDone}");
            }
            else if (run.ImplicitPropagator is { } implicitPropagator && !ReferenceEquals(implicitPropagator, exactPropagator))
            {
                context.Out.WriteLine($"implicit     {implicitPropagator.Reason}; {implicitPropagator.Statistics}");
            }

            if (run.Spectrum.Coverage is { } coverage)
            {
                context.Out.WriteLine($"spectrum     {coverage}");
            }

            context.Out.WriteLine($"outputs      {run.Times.Length} times to t = {Format.Time(run.Times[^1], loaded.Deck.TimeUnit)}");
            WriteResults(context.Out, loaded, exact, steady, difference, distance, run.ExactConservationDrift);
            if (run.ImplicitDifference is { } versus)
            {
                context.Out.WriteLine($"  implicit vs exact: max |difference| {Format.Number(versus.MaxAbsolute)}, max relative {Format.Number(versus.MaxRelative)}, relative to the total {Format.Number(versus.MaxRelativeToTotal)} (at t = {Format.Time(versus.WorstTime, loaded.Deck.TimeUnit)}, state {loaded.States.Labels[versus.WorstState]})");
            }

            if (run.AccuracyMet == false)
            {
                context.Out.WriteLine($"  ACCURACY: explicit and exact differ by {Format.Number(difference!.MaxRelativeToTotal)} of the total, above the accuracy target {Format.Number(loaded.Deck.Run.Accuracy)} (run.accuracy); trust the exact result{(run.AccurateStep is null ? ", or let dt = auto choose the step" : "")}");
            }

            context.Out.WriteLine();
            context.Out.WriteLine($"wrote {written.Count} files to {outputFolder}: {string.Join(", ", written)}");
        }

        if (run.AccuracyMet == false && settings.RequireAccuracy)
        {
            context.Error.WriteLine($"ratedeck run: explicit and exact differ by {Format.Number(difference!.MaxRelativeToTotal)} of the total, above run.accuracy = {Format.Number(loaded.Deck.Run.Accuracy)} (--require-accuracy)");
            return ExitCodes.CheckFailed;
        }

        return ExitCodes.Success;
    }

    /// <summary>
    /// A note when the exact path kept a conserved total to worse than 1e-12 of it, a thousand times
    /// the double's resolution (<see cref="LinearAlgebra.Precision.PopulationResolution"/>), where rounding of an
    /// ordinary run never reaches: every population below the drift, relative to the total, is then
    /// noise (the plots leave it out at any drift). Null otherwise.
    /// </summary>
    private static string? ResolutionNote(double? drift) =>
        drift is { } d && d > 1e-12
            ? $"the exact path keeps the conserved total population only to {Format.Number(d)} of it (rounding in its solves on a stiff deck): populations below {Format.Number(d)} of the total are not resolved"
            : null;

    private static void WriteResults(TextWriter output, LoadedDeck loaded, Trajectory exact, SteadyStateResult steady, TrajectoryDifference? difference, double? distance, double? drift)
    {
        output.WriteLine();
        if (difference is not null)
        {
            output.WriteLine($"  explicit vs exact: max |difference| {Format.Number(difference.MaxAbsolute)}, max relative {Format.Number(difference.MaxRelative)}, relative to the total {Format.Number(difference.MaxRelativeToTotal)} (at t = {Format.Time(difference.WorstTime, loaded.Deck.TimeUnit)}, state {loaded.States.Labels[difference.WorstState]})");
        }

        if (LargeCompletedRates.Note(loaded.Rates, loaded.Deck.Coupling, loaded.Deck.TimeUnit) is { } note)
        {
            output.WriteLine($"  note: {note}");
        }

        output.WriteLine($"  total population at t_end: {Format.Number(exact.Populations[^1].Sum())}");
        if (ResolutionNote(drift) is { } resolution)
        {
            output.WriteLine($"  note: {resolution}");
        }

        output.WriteLine($"  steady state: {steady.Message}");
        if (distance is { } d)
        {
            output.WriteLine($"  distance of the last output from the steady state: {Format.Number(d)} (max |difference| / steady total)");
        }
    }
}

/// <summary>What <c>run</c> was asked for beyond the deck, as its options say (a sweep point fills it in code).</summary>
/// <param name="Step">--dt: a fixed step or auto; null: the deck's.</param>
/// <param name="Method">--method; null: the deck's.</param>
/// <param name="Out">--out; null: the default folder.</param>
/// <param name="ExactOnly">--exact-only.</param>
/// <param name="ExactPath">--exact: auto, implicit or extended; null: automatic.</param>
/// <param name="WithImplicit">--implicit.</param>
/// <param name="AllowUnstable">--allow-unstable.</param>
/// <param name="RequireAccuracy">--require-accuracy.</param>
/// <param name="Plots">Draw the PNG plots (not --no-plots).</param>
/// <param name="WriteRates">--write-rates.</param>
/// <param name="Json">--json.</param>
/// <param name="Quiet">--quiet: one summary line.</param>
/// <param name="Progress">Draw progress bars on the terminal.</param>
internal sealed record RunSettings(StepRequest? Step, Decks.ExplicitMethod? Method, string? Out, bool ExactOnly, string? ExactPath, bool WithImplicit,
    bool AllowUnstable, bool RequireAccuracy, bool Plots, bool WriteRates, bool Json, bool Quiet, bool Progress)
{
    /// <summary>--full-spectrum: every eigenvalue, whatever N.</summary>
    public bool FullSpectrum { get; init; }
}
