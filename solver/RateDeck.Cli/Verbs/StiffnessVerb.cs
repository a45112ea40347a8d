using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck stiffness DECK [--dt X]</c>: the spectral radius, the stiffness ratio and every
/// explicit step limit, with a plain recommendation. With a step it says whether the step is safe
/// for each explicit method and exits 3 when it is not safe for the deck's method.
/// </summary>
public sealed class StiffnessVerb : IVerb
{
    // The options of stiffness, declared once here.
    private readonly Option<double?> _dt = VerbOptions.PositiveNumber("--dt", "X", "judge this explicit time step (exit 3 when unsafe for the method)");
    private readonly Option<double?> _tEnd = VerbOptions.PositiveNumber("--t-end", "T", "count steps to this time (default: the deck's run.t_end)");
    private readonly Option<Decks.ExplicitMethod?> _method = VerbOptions.Method("the explicit method the step is judged for (default: the deck's run.explicit)");
    private readonly Option<bool> _fullSpectrum = VerbOptions.FullSpectrum();

    /// <summary>Declares the verb and its options.</summary>
    public StiffnessVerb() => Command = DeckOptions.Command("stiffness", "spectral radius, stiffness ratio and explicit time-step limits, with a recommendation", _dt, _tEnd, _method, _fullSpectrum);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var loaded = VerbSupport.Load(args);
        var run = new DeckRun(loaded, new RunOptions
        {
            Method = args.Value(_method),
            Dt = args.Value(_dt),
            EndTime = args.Value(_tEnd),
            FullSpectrum = args.Has(_fullSpectrum),
        });
        var spectrum = run.Spectrum;
        var report = run.StepLimits;
        var chosen = run.Method;
        var dt = run.Options.Dt;
        var safe = dt is null || run.StepVerdict.Safe;

        if (args.Json)
        {
            var fields = VerbSupport.JsonFields(loaded);
            fields["spectral_radius"] = report.SpectralRadius;
            fields["slowest_rate"] = report.SlowestRate;
            fields["slow_modes_resolved"] = spectrum.IsResolved || spectrum.SlowModes?.Converged == true;
            fields["slow_modes_unresolved_reason"] = spectrum.Unresolved;
            fields["slow_modes_path"] = spectrum.SlowModes?.Description;
            fields["slow_modes_failure"] = spectrum.SlowModes?.Failure;
            fields["slow_rates"] = spectrum.SlowModes?.Modes.Select(m => m.Rate.Real).ToArray();
            fields["slow_rate_error_bounds"] = spectrum.SlowModes?.Modes.Select(m => m.ErrorBound).ToArray();
            fields["eigenvalue_absolute_accuracy"] = spectrum.AbsoluteAccuracy;
            fields["spectrum_coverage"] = spectrum.Coverage;
            fields["stiffness_ratio"] = report.StiffnessRatio;
            fields["max_diagonal_rate"] = report.MaxDiagonalRate;
            fields["dt_euler_stable"] = report.EulerStable.MaxStep;
            fields["dt_positive"] = report.Positivity.MaxStep;
            fields["dt_rule_of_thumb"] = report.RuleOfThumb.MaxStep;
            fields["dt_rk4_stable"] = report.Rk4Stable.MaxStep;
            fields["horizon"] = report.Horizon;
            fields["steps"] = report.Limits.ToDictionary(l => l.Name.Replace('-', '_'), l => l.Steps);
            fields["dt"] = report.Dt;
            fields["method"] = VerbSupport.MethodName(chosen);
            fields["euler_safe"] = report.EulerSafe;
            fields["rk4_safe"] = report.Rk4Safe;
            fields["positivity_preserving"] = report.PositivityPreserving;
            fields["dt_safe"] = dt is null ? (bool?)null : safe;
            fields["explicit_steps_at_dt"] = report.StepsAtDt;
            fields["explicit_step_budget"] = StepLimits.ExplicitStepBudget;
            fields["within_step_budget"] = report.WithinBudget;
            fields["recommendation"] = report.Recommendation;
            JsonSummary.Write(context.Out, fields);
            context.Out.WriteLine();
        }
        else if (args.Quiet)
        {
            var unit = loaded.Deck.TimeUnit;
            var verdict = dt is { } step ? $"; dt = {Format.Number(step)} {unit} {(safe ? "safe" : "UNSAFE")} for {VerbSupport.MethodName(chosen)}" : "";
            context.Out.WriteLine($"stiffness {loaded.Deck.SourcePath}: spectral radius {Format.Number(report.SpectralRadius)} per {unit}, stiffness ratio {Optional(report.StiffnessRatio)}, stable dt: euler {Format.Number(report.EulerStable.MaxStep)} {unit}, rk4 {Format.Number(report.Rk4Stable.MaxStep)} {unit}{verdict}");
        }
        else
        {
            WriteSummary(context.Out, loaded, spectrum, report, run);
        }

        return safe ? ExitCodes.Success : ExitCodes.UnsafeTimeStep;
    }

    private static void WriteSummary(TextWriter output, LoadedDeck loaded, Spectrum spectrum, StiffnessReport report, DeckRun run)
    {
        var unit = loaded.Deck.TimeUnit;
        VerbSupport.WriteDeckLine(output, loaded);
        output.WriteLine($"spectrum     {spectrum.PathReason}");
        output.WriteLine();
        output.WriteLine($"  spectral radius rho      {Format.Rate(report.SpectralRadius, unit)}");
        output.WriteLine($"  slowest non-zero rate    {(spectrum.IsResolved || report.SlowestRate is not null ? OptionalRate(report.SlowestRate, unit) : "not resolved")}");
        output.WriteLine($"  stiffness ratio          {Optional(report.StiffnessRatio)}");
        output.WriteLine($"  max |K_ii|               {Format.Rate(report.MaxDiagonalRate, unit)}");
        if (spectrum.SlowModeLine is { } slowModes)
        {
            output.WriteLine($"  slow modes               {slowModes}");
        }

        if (spectrum.SlowModes is { Converged: false })
        {
            output.WriteLine($"  NOT RESOLVED             {spectrum.Unresolved}; the slowest rate is not given (run takes an accurate path and names it on its exact line)");
        }
        output.WriteLine();
        var horizon = report.Horizon is { } h ? $"steps to t = {Format.Time(h, unit)}{(report.HorizonIsEndTime ? "" : " (1/slowest rate)")}" : "steps";
        var heading = $"largest dt ({unit})";
        output.WriteLine($"  {"limit",-16} {heading,-16} {horizon}");
        foreach (var limit in report.Limits)
        {
            output.WriteLine($"  {limit.Name,-16} {Format.Number(limit.MaxStep),-16} {Optional(limit.Steps),-12} {limit.Basis}");
        }

        if (report.Dt is { } dt)
        {
            output.WriteLine();
            output.WriteLine($"  dt = {Format.Time(dt, unit)}: euler {Verdict(report.EulerSafe)}, rk4 {Verdict(report.Rk4Safe)}, positivity {(report.PositivityPreserving == true ? "kept" : "NOT kept")} (forward Euler)");
            var verdict = run.StepVerdict.Safe ? "safe" : $"UNSAFE: {run.StepVerdict.Problem}";
            var whose = run.MethodFromOptions ? "for the method asked for" : "for the deck's method";
            output.WriteLine($"  {whose} ({VerbSupport.MethodName(run.Method)}) the step is {verdict}");
            if (report.StepsAtDt is { } steps)
            {
                var within = report.WithinBudget == true
                    ? $"within the budget of {Format.Number(StepLimits.ExplicitStepBudget)} explicit steps"
                    : $"ABOVE the budget of {Format.Number(StepLimits.ExplicitStepBudget)} explicit steps: refused; run the deck with exact propagation (ratedeck run declines the explicit method)";
                output.WriteLine($"  explicit stepping at dt = {Format.Time(dt, unit)} needs {Format.Count(steps)} steps to t = {Format.Time(report.Horizon!.Value, unit)}: {within}");
            }
        }

        output.WriteLine();
        output.WriteLine($"recommendation: {report.Recommendation}");
    }

    private static string OptionalRate(double? value, string unit) => value is { } v ? Format.Rate(v, unit) : "-";

    private static string Optional(double? value) => value is { } v ? Format.Number(v) : "-";

    private static string Verdict(bool? safe) => safe == true ? "stable" : "UNSTABLE";
}
