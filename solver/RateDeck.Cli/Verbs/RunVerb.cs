using RateDeck.Cli.CommandLine;
using RateDeck.Decks;
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
    /// <inheritdoc />
    public VerbSyntax Syntax { get; } = new("run", "integrate explicitly and exactly side by side; write populations, differences, spectrum, steady state, plots",
    [
        new("--dt", "X|auto", "explicit time step (default: the deck's run.dt; auto = run.safety x the stability limit)"),
        new("--method", "euler|rk4", "explicit method (default: the deck's run.explicit)"),
        new("--out", "DIR", "output folder (default: ratedeck-out/<deck name>)"),
        new("--exact-only", null, "skip the explicit method"),
        new("--exact", "auto|implicit|extended", "exact path: auto (default: chosen from the spectrum, reason printed), the implicit integrator, or the double-double eigen path"),
        new("--implicit", null, "also run the implicit integrator beside explicit and exact, and compare it with exact"),
        new("--allow-unstable", null, "run an explicit step above the stability limit anyway, to see it fail"),
        new("--no-plots", null, "write no PNG plots"),
    ]);

    /// <inheritdoc />
    public int Execute(ParsedArguments args, VerbContext context)
    {
        var method = VerbSupport.Method(args) ?? default(ExplicitMethod?);
        var loaded = VerbSupport.Load(args);
        var deck = loaded.Deck;
        var chosenMethod = method ?? deck.Run.Method;
        var balance = loaded.Rates.Origin == Rates.BalanceOrigin.TakenAsGiven ? DetailedBalance.Analyze(loaded.Rates) : null;
        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra, balance);
        var limits = StepLimits.Analyze(spectrum, loaded.Rates, deck.Run.EndTime, null);
        var stabilityLimit = chosenMethod == ExplicitMethod.Euler ? limits.EulerStable.MaxStep : limits.Rk4Stable.MaxStep;
        var dt = ExplicitStep(args, deck.Run, stabilityLimit);
        var explicitWanted = !args.Has("--exact-only");
        if (explicitWanted && dt > stabilityLimit && !args.Has("--allow-unstable"))
        {
            context.Error.WriteLine($"ratedeck run: dt = {Format.Number(dt)} is above the {VerbSupport.MethodName(chosenMethod)} stability limit {Format.Number(stabilityLimit)} for this deck; "
                + "choose a smaller --dt (or --dt auto), use --exact-only, or pass --allow-unstable to watch it diverge");
            return ExitCodes.UnsafeTimeStep;
        }

        var initial = RunSetup.InitialPopulations(deck, loaded.States);
        var times = RunSetup.OutputTimes(deck.Run);
        var explicitSteps = Math.Ceiling(deck.Run.EndTime / dt);
        string? explicitDeclined = null;
        if (explicitWanted && explicitSteps > StepLimits.ExplicitStepBudget)
        {
            var budget = $"{VerbSupport.MethodName(chosenMethod)} at dt = {Format.Number(dt)} needs {Format.Count(explicitSteps)} steps to t_end = {Format.Number(deck.Run.EndTime)} {deck.TimeUnit}, above the budget of {Format.Number(StepLimits.ExplicitStepBudget)} explicit steps";
            if (args.Has("--dt") || args.Has("--method"))
            {
                context.Error.WriteLine($"ratedeck run: {budget}; drop --dt/--method to let run decline the explicit method, or use --exact-only");
                return ExitCodes.UnsafeTimeStep;
            }

            explicitDeclined = $"declined: {budget}; the exact path below does not step";
            explicitWanted = false;
        }

        var violation = balance is null ? 0 : balance.CycleViolation ?? balance.PairViolation;
        var exactPropagator = ExactPath(args, loaded, balance is { OneWayCount: > 0 } ? double.NaN : violation, initial, spectrum);
        var exact = Propagate(exactPropagator, initial, times, "exact", context);
        Trajectory? explicitResult = null;
        FixedStepPropagator? explicitPropagator = null;
        if (explicitWanted)
        {
            explicitPropagator = ExplicitPropagatorChoice.Create(loaded.Rates, chosenMethod, dt);
            explicitResult = Propagate(explicitPropagator, initial, times, VerbSupport.MethodName(chosenMethod), context);
        }

        ImplicitSdirkPropagator? implicitPropagator = null;
        TrajectoryDifference? implicitDifference = null;
        if (args.Has("--implicit"))
        {
            implicitPropagator = exactPropagator as ImplicitSdirkPropagator ?? new ImplicitSdirkPropagator(loaded.Rates);
            var implicitResult = ReferenceEquals(implicitPropagator, exactPropagator) ? exact : Propagate(implicitPropagator, initial, times, "implicit", context);
            implicitDifference = TrajectoryComparison.Compare(exact, implicitResult);
        }

        var difference = explicitResult is null ? null : TrajectoryComparison.Compare(exact, explicitResult);
        var steady = SteadyState.Compute(loaded.Rates, spectrum, initial, loaded.Algebra);
        var distance = SteadyDistance(exact.Populations[^1], steady.Populations);

        var outputFolder = VerbSupport.OutputFolder(args, deck);
        var written = new RunOutputs(loaded, outputFolder).Write(exact, explicitResult, spectrum, limits, steady, dt, chosenMethod, !args.Has("--no-plots"));

        var explicitMethod = explicitWanted ? VerbSupport.MethodName(chosenMethod) : null;
        if (args.Has("--json"))
        {
            var fields = VerbSupport.JsonFields(loaded);
            fields["propagator"] = exactPropagator.Name;
            fields["propagator_reason"] = exactPropagator.Reason;
            fields["explicit_method"] = explicitMethod;
            fields["explicit_declined"] = explicitDeclined;
            fields["implicit_steps"] = implicitPropagator?.Statistics;
            fields["implicit_vs_exact_max_abs_difference"] = implicitDifference?.MaxAbsolute;
            fields["implicit_vs_exact_max_rel_difference"] = implicitDifference?.MaxRelative;
            fields["dt"] = explicitWanted ? dt : null;
            fields["dt_stability_limit"] = stabilityLimit;
            fields["max_abs_difference"] = difference?.MaxAbsolute;
            fields["max_rel_difference"] = difference?.MaxRelative;
            fields["max_difference_relative_to_total"] = difference?.MaxRelativeToTotal;
            fields["steady_state"] = steady.Kind.ToString().ToLowerInvariant();
            fields["steady_state_distance"] = distance;
            fields["final_total_population"] = exact.Populations[^1].Sum();
            fields["output_times"] = times.Length;
            fields["output_folder"] = outputFolder;
            fields["files"] = written;
            JsonSummary.Write(context.Out, fields);
            context.Out.WriteLine();
        }
        else
        {
            VerbSupport.WriteDeckLine(context.Out, loaded);
            context.Out.WriteLine($"exact        {exactPropagator.Reason}");
            if (exactPropagator is ImplicitSdirkPropagator steps)
            {
                context.Out.WriteLine($"             {steps.Statistics}");
            }

            if (explicitPropagator is not null)
            {
                context.Out.WriteLine($"explicit     {explicitMethod}, dt = {Format.Number(dt)} (stability limit {Format.Number(stabilityLimit)}); {explicitPropagator.Reason}");
            }
            else if (explicitDeclined is not null)
            {
                context.Out.WriteLine($"explicit     {explicitDeclined}");
            }

            if (implicitPropagator is not null && !ReferenceEquals(implicitPropagator, exactPropagator))
            {
                context.Out.WriteLine($"implicit     {implicitPropagator.Reason}; {implicitPropagator.Statistics}");
            }

            context.Out.WriteLine($"outputs      {times.Length} times to t = {Format.Number(deck.Run.EndTime)} {deck.TimeUnit}");
            WriteResults(context.Out, loaded, exact, steady, difference, distance);
            if (implicitDifference is { } versus)
            {
                context.Out.WriteLine($"  implicit vs exact: max |difference| {Format.Number(versus.MaxAbsolute)}, max relative {Format.Number(versus.MaxRelative)}, relative to the total {Format.Number(versus.MaxRelativeToTotal)} (at t = {Format.Number(versus.WorstTime)}, state {loaded.States.Labels[versus.WorstState]})");
            }

            context.Out.WriteLine();
            context.Out.WriteLine($"wrote {written.Count} files to {outputFolder}: {string.Join(", ", written)}");
        }

        return ExitCodes.Success;
    }

    /// <summary>The exact propagator: chosen from the spectrum and the horizon, or the path asked for with --exact.</summary>
    private static IPropagator ExactPath(ParsedArguments args, LoadedDeck loaded, double violation, double[] initial, Spectrum spectrum)
    {
        var path = args.Value("--exact") switch
        {
            null or "auto" => (ExactPathRequest?)null,
            "implicit" => ExactPathRequest.Implicit,
            "extended" => ExactPathRequest.Extended,
            var other => throw new UsageException($"--exact takes auto, implicit or extended, not '{other}'"),
        };
        if (path is not { } requested)
        {
            return ExactPropagatorChoice.Choose(loaded.Rates, loaded.Algebra, violation, initial, spectrum, loaded.Deck.Run.EndTime);
        }

        try
        {
            return ExactPropagatorChoice.Requested(loaded.Rates, spectrum, requested);
        }
        catch (ArgumentException e)
        {
            throw new UsageException($"--exact {args.Value("--exact")}: {e.Message}");
        }
    }

    /// <summary>The explicit step: --dt, else the deck's run.dt, else (or for "auto") safety x the stability limit.</summary>
    private static double ExplicitStep(ParsedArguments args, RunSpec run, double stabilityLimit)
    {
        var text = args.Value("--dt");
        if (text == "auto" || (text is null && run.Dt is null))
        {
            return run.SafetyFactor * stabilityLimit;
        }

        return args.PositiveNumber("--dt") ?? run.Dt!.Value;
    }

    private static Trajectory Propagate(IPropagator propagator, double[] initial, double[] times, string label, VerbContext context)
    {
        using var progress = new TerminalProgress($"{label,-8}", enabled: context.Error == Console.Error);
        var trajectory = propagator.Propagate(initial, times, progress);
        progress.Finish();
        return trajectory;
    }

    /// <summary>max_i |P_i(t_end) - P_i(steady)| relative to the steady state's total population; null when there is no steady state.</summary>
    private static double? SteadyDistance(double[] last, double[]? steady)
    {
        if (steady is null)
        {
            return null;
        }

        var scale = Math.Max(steady.Sum(Math.Abs), double.Epsilon);
        return last.Zip(steady, (a, b) => Math.Abs(a - b)).Max() / scale;
    }

    private static void WriteResults(TextWriter output, LoadedDeck loaded, Trajectory exact, SteadyStateResult steady, TrajectoryDifference? difference, double? distance)
    {
        output.WriteLine();
        if (difference is not null)
        {
            output.WriteLine($"  explicit vs exact: max |difference| {Format.Number(difference.MaxAbsolute)}, max relative {Format.Number(difference.MaxRelative)}, relative to the total {Format.Number(difference.MaxRelativeToTotal)} (at t = {Format.Number(difference.WorstTime)}, state {loaded.States.Labels[difference.WorstState]})");
        }

        output.WriteLine($"  total population at t_end: {Format.Number(exact.Populations[^1].Sum())}");
        output.WriteLine($"  steady state: {steady.Message}");
        if (distance is { } d)
        {
            output.WriteLine($"  distance of the last output from the steady state: {Format.Number(d)} (max |difference| / steady total)");
        }
    }
}
