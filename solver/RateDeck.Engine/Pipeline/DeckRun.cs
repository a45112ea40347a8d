using RateDeck.Decks;
using RateDeck.Diagnostics;
using RateDeck.Propagation;
using RateDeck.Text;

namespace RateDeck.Pipeline;

/// <summary>
/// The engine's pipeline after assembly, for one loaded deck and one set of <see cref="RunOptions"/>:
/// balance report, spectrum, check report, step limits, the explicit and exact trajectories and
/// the steady state. Every stage is computed on first use and kept, so a caller pays only for
/// what it reads (the fitter reads <see cref="Exact"/> alone; <c>check</c> reads
/// <see cref="Check"/>), and stages share their work: one balance report feeds the spectrum, the
/// checks and the exact propagator's choice; one spectrum feeds the checks, the limits, the
/// propagator (its decomposition is reused) and the steady state. No console, no files: verbs
/// print and write what they read here. Not thread-safe: one instance per trial.
/// </summary>
public sealed class DeckRun
{
    private BalanceReport? _balance;
    private Spectrum? _spectrum;
    private CheckReport? _check;
    private StiffnessReport? _limits;
    private double[]? _initial;
    private double[]? _times;
    private IPropagator? _exactPropagator;
    private Trajectory? _exact;
    private FixedStepPropagator? _explicitPropagator;
    private Trajectory? _explicit;
    private SteadyStateResult? _steady;
    private ImplicitSdirkPropagator? _implicitPropagator;
    private Trajectory? _implicit;
    private string? _implicitNotDone;
    private AccurateStep? _accurate;
    private bool _accurateChosen;
    private double? _exactConservationDrift;
    private bool _exactConservationDriftMeasured;

    /// <summary>Prepares the stages of <paramref name="loaded"/>; nothing is computed yet.</summary>
    public DeckRun(LoadedDeck loaded, RunOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(loaded);
        Loaded = loaded;
        Options = options ?? new RunOptions();
        Method = Options.Method ?? loaded.Deck.Run.Method;
    }

    /// <summary>The deck as loaded: validated, its states and rate matrix assembled, its provider.</summary>
    public LoadedDeck Loaded { get; }

    /// <summary>The caller's choices.</summary>
    public RunOptions Options { get; }

    /// <summary>The explicit method: the option's, else the deck's.</summary>
    public ExplicitMethod Method { get; }

    /// <summary>True when <see cref="Method"/> was given by option rather than by the deck.</summary>
    public bool MethodFromOptions => Options.Method is not null;

    /// <summary>Detailed-balance measures of K; the policy for the symmetric paths travels with it.</summary>
    public BalanceReport Balance => _balance ??= DetailedBalance.Analyze(Loaded.Rates);

    /// <summary>The spectrum of K (path decided by <see cref="Balance"/>, all of it or its extremes by <see cref="RunOptions.FullSpectrum"/>); throws <see cref="ArgumentException"/> when K has non-finite entries.</summary>
    public Spectrum Spectrum => _spectrum ??= Spectrum.Compute(Loaded.Rates, Loaded.Algebra, Balance, Options.FullSpectrum ? SpectrumExtent.Full : SpectrumExtent.Automatic);

    /// <summary>Every check of the matrix (its spectrum is left out when K has non-finite entries).</summary>
    public CheckReport Check => _check ??= MatrixChecks.Check(Loaded.Rates, Balance, MatrixChecks.HasNonFiniteEntries(Loaded.Rates) ? null : Spectrum);

    /// <summary>Explicit step limits, step counts to <see cref="RunOptions.EndTime"/> (else t_end), and a verdict on <see cref="RunOptions.Dt"/> when given.</summary>
    public StiffnessReport StepLimits => _limits ??= Diagnostics.StepLimits.Analyze(Spectrum, Loaded.Rates, Options.EndTime ?? Loaded.Deck.Run.EndTime, Options.Dt);

    /// <summary>The stability limit of <see cref="Method"/>.</summary>
    public double StabilityLimit => Method == ExplicitMethod.Euler ? StepLimits.EulerStable.MaxStep : StepLimits.Rk4Stable.MaxStep;

    /// <summary>True when the step is automatic: no <see cref="RunOptions.Dt"/>, and <see cref="RunOptions.AutomaticDt"/> or no run.dt in the deck.</summary>
    public bool StepIsAutomatic => Options.Dt is null && (Options.AutomaticDt || Loaded.Deck.Run.Dt is null);

    /// <summary>
    /// The hard cap of an automatic step: run.safety times the stability limit, and for Euler also
    /// the positivity limit. Without any rate there is no limit, and the cap is the whole run.
    /// </summary>
    public double StepCap => FiniteOrEnd(Method == ExplicitMethod.Euler
        ? Math.Min(Loaded.Deck.Run.SafetyFactor * StepLimits.EulerStable.MaxStep, StepLimits.Positivity.MaxStep)
        : Loaded.Deck.Run.SafetyFactor * StepLimits.Rk4Stable.MaxStep);

    /// <summary>
    /// The automatic step chosen by step doubling for the deck's run.accuracy, at most
    /// <see cref="StepCap"/>; null when the step is given or there is no explicit run.
    /// </summary>
    public AccurateStep? AccurateStep
    {
        get
        {
            if (!_accurateChosen)
            {
                // An exact trajectory that overflows is refused (see Exact) before a step is sought to follow it.
                _accurate = StepIsAutomatic && !Options.ExactOnly && Exact is not null
                    ? AccurateStepChoice.Choose(Loaded.Rates, Method, Initial, Times, StepCap, Loaded.Deck.Run.Accuracy)
                    : null;
                _accurateChosen = true;
            }

            return _accurate;
        }
    }

    /// <summary>The explicit step: <see cref="RunOptions.Dt"/>, else the deck's run.dt (unless <see cref="RunOptions.AutomaticDt"/>), else the step chosen for accuracy (<see cref="AccurateStep"/>), else <see cref="StepCap"/>.</summary>
    public double ExplicitStep => FiniteOrEnd(Options.Dt ?? (Options.AutomaticDt ? null : Loaded.Deck.Run.Dt) ?? AccurateStep?.Dt ?? StepCap);

    /// <summary>Why <see cref="ExplicitStep"/> needs more steps between two outputs than can be run, or null.</summary>
    private string? StepCountProblem()
    {
        var dt = ExplicitStep;
        var widest = Times.Select((t, k) => k == 0 ? t : t - Times[k - 1]).Max();
        return widest / dt <= FixedStepPropagator.MaxStepsPerOutput
            ? null
            : $"dt = {Format.Number(dt)} {Loaded.Deck.TimeUnit} needs more than {Format.Number(FixedStepPropagator.MaxStepsPerOutput)} explicit steps to cross an output interval of {Format.Number(widest)} {Loaded.Deck.TimeUnit}";
    }

    private double FiniteOrEnd(double step) => double.IsFinite(step) ? step : Times[^1];

    /// <summary>Whether explicit and exact agree within the deck's run.accuracy (of the total); null with <see cref="RunOptions.ExactOnly"/>.</summary>
    public bool? AccuracyMet => Difference is { } difference ? difference.MaxRelativeToTotal <= Loaded.Deck.Run.Accuracy : null;

    /// <summary>
    /// Whether <see cref="ExplicitStep"/> can be trusted with <see cref="Method"/>: within the
    /// stability limit, for forward Euler within the positivity limit, and, when the caller chose the method or the step, within
    /// <see cref="Diagnostics.StepLimits.ExplicitStepBudget"/> steps to <see cref="RunOptions.EndTime"/> (else the last output time)
    /// (a step the deck chose is declined instead, <see cref="ExplicitDeclined"/>).
    /// </summary>
    public StepVerdict StepVerdict
    {
        get
        {
            if (StepCountProblem() is { } tooMany)
            {
                return new StepVerdict(false, tooMany);
            }

            var dt = ExplicitStep;
            var limit = StabilityLimit;
            var unit = Loaded.Deck.TimeUnit;
            if (dt > limit)
            {
                return new StepVerdict(false, $"dt = {Format.Number(dt)} {unit} is above the {ExplicitPropagatorChoice.MethodName(Method)} stability limit {Format.Number(limit)} {unit} for this deck");
            }

            // A probability must stay non-negative: forward Euler past 1/max|K_ii| has a negative entry in I + dt K.
            if (Method == ExplicitMethod.Euler && dt > StepLimits.Positivity.MaxStep)
            {
                return new StepVerdict(false, $"dt = {Format.Number(dt)} {unit} is above the forward-Euler positivity limit {Format.Number(StepLimits.Positivity.MaxStep)} {unit} for this deck (populations can go negative)");
            }

            return OverBudget is { } budget && (Options.Dt is not null || MethodFromOptions)
                ? new StepVerdict(false, budget)
                : new StepVerdict(true, null);
        }
    }

    /// <summary>
    /// Why the explicit method is declined: its step count to the last output time exceeds
    /// <see cref="Diagnostics.StepLimits.ExplicitStepBudget"/> and neither the method nor the step
    /// was chosen by the caller (a stiff deck at the deck's own step would run for hours); null
    /// when it runs, or with <see cref="RunOptions.ExactOnly"/>.
    /// </summary>
    public string? ExplicitDeclined => Options.ExactOnly || Options.Dt is not null || MethodFromOptions || OverBudget is not { } budget
        ? null
        : $"declined: {budget}; the exact path does not step";

    /// <summary>The step-budget problem of <see cref="ExplicitStep"/>, or null within budget.</summary>
    private string? OverBudget
    {
        get
        {
            var end = Options.EndTime ?? Times[^1];
            var steps = Math.Ceiling(end / ExplicitStep);
            return steps <= Diagnostics.StepLimits.ExplicitStepBudget
                ? null
                : $"{ExplicitPropagatorChoice.MethodName(Method)} at dt = {Format.Number(ExplicitStep)} {Loaded.Deck.TimeUnit} needs {Format.Count(steps)} steps to t = {Format.Number(end)} {Loaded.Deck.TimeUnit}, above the budget of {Format.Number(Diagnostics.StepLimits.ExplicitStepBudget)} explicit steps";
        }
    }

    /// <summary>P(0) from the deck's [initial] table.</summary>
    public double[] Initial => _initial ??= RunSetup.InitialPopulations(Loaded.Deck, Loaded.States);

    /// <summary>The output times: <see cref="RunOptions.Times"/>, else the deck's grid.</summary>
    public double[] Times => _times ??= Options.Times is { } given ? [.. given] : RunSetup.OutputTimes(Loaded.Deck.Run);

    /// <summary>
    /// The exact propagator: the path of <see cref="RunOptions.ExactPath"/> when given, else chosen
    /// from <see cref="Balance"/>, <see cref="Initial"/> and the spectrum's resolution over the last
    /// output time, reusing <see cref="Spectrum"/>'s decomposition.
    /// </summary>
    public IPropagator ExactPropagator => _exactPropagator ??= Options.ExactPath is { } path
        ? ExactPropagatorChoice.Requested(Loaded.Rates, Loaded.Algebra, path, () => Spectrum)
        : ExactPropagatorChoice.Choose(Loaded.Rates, Loaded.Algebra, Balance, Initial, Spectrum, Times[^1]);

    /// <summary>P at <see cref="Times"/> by exact propagation.</summary>
    /// <exception cref="IntegrationGaveUpException">The exact path is the implicit integrator and it gave up before the last output time.</exception>
    /// <exception cref="DeckException">A population overflows the largest double (pumping near 1e308, say): no number of it could be trusted.</exception>
    public Trajectory Exact => _exact ??= Finite(Propagate(ExactPropagator, "exact"));

    /// <summary>How far <see cref="Exact"/> lets a conserved total move (<see cref="ConservationDrift"/>); null when the deck does not conserve it.</summary>
    public double? ExactConservationDrift
    {
        get
        {
            // Null is a result here (a deck that does not conserve its total), so a flag marks it measured.
            if (!_exactConservationDriftMeasured)
            {
                _exactConservationDrift = ConservationDrift.Of(Loaded.Rates, Exact);
                _exactConservationDriftMeasured = true;
            }

            return _exactConservationDrift;
        }
    }

    /// <summary>The explicit propagator at <see cref="ExplicitStep"/>; null with <see cref="RunOptions.ExactOnly"/> or when <see cref="ExplicitDeclined"/>.</summary>
    public FixedStepPropagator? ExplicitPropagator => Options.ExactOnly || ExplicitDeclined is not null ? null : _explicitPropagator ??= ExplicitPropagatorChoice.Create(Loaded.Rates, Method, ExplicitStep);

    /// <summary>The implicit integrator beside explicit and exact (<see cref="RunOptions.WithImplicit"/>): the exact one when that is already implicit; else null.</summary>
    public ImplicitSdirkPropagator? ImplicitPropagator => !Options.WithImplicit ? null
        : _implicitPropagator ??= ExactPropagator as ImplicitSdirkPropagator ?? new ImplicitSdirkPropagator(Loaded.Rates);

    /// <summary>
    /// P at <see cref="Times"/> by the implicit integrator; null without <see cref="RunOptions.WithImplicit"/>,
    /// or when it gave up beside another exact path (<see cref="ImplicitNotDone"/>). When the implicit
    /// integrator is the exact path, its give-up is the exact path's (<see cref="Exact"/> throws).
    /// </summary>
    public Trajectory? Implicit
    {
        get
        {
            if (ImplicitPropagator is not { } propagator || _implicitNotDone is not null)
            {
                return null;
            }

            if (ReferenceEquals(propagator, ExactPropagator))
            {
                return _implicit ??= Exact;
            }

            try
            {
                return _implicit ??= Propagate(propagator, "implicit");
            }
            catch (IntegrationGaveUpException e)
            {
                // The exact path has the answer; a cross-check that cannot finish is reported as not done, not failed.
                _implicitNotDone = e.Message;
                return null;
            }
        }
    }

    /// <summary>Why the implicit cross-check beside another exact path was not done (it gave up); null when it was done or not asked for.</summary>
    public string? ImplicitNotDone
    {
        get
        {
            _ = Implicit;
            return _implicitNotDone;
        }
    }

    /// <summary>The largest differences of <see cref="Implicit"/> from <see cref="Exact"/>; null without <see cref="RunOptions.WithImplicit"/>.</summary>
    public TrajectoryDifference? ImplicitDifference => Implicit is { } implicitResult ? TrajectoryComparison.Compare(Exact, implicitResult) : null;

    /// <summary>
    /// P at <see cref="Times"/> by the explicit method; null with <see cref="RunOptions.ExactOnly"/>.
    /// Throws <see cref="UnsafeStepException"/> when <see cref="StepVerdict"/> is unsafe and
    /// <see cref="RunOptions.AllowUnsafeStep"/> is not set: a wrong trajectory is never handed out
    /// by default.
    /// </summary>
    public Trajectory? Explicit
    {
        get
        {
            if (ExplicitPropagator is not { } propagator)
            {
                return null;
            }

            if (_explicit is null && !Options.AllowUnsafeStep && StepVerdict is { Safe: false, Problem: var problem })
            {
                throw new UnsafeStepException(problem!);
            }

            // Too many steps cannot be run even to watch them fail.
            if (StepCountProblem() is { } tooMany)
            {
                throw new UnsafeStepException(tooMany);
            }

            _explicit ??= Propagate(propagator, ExplicitPropagatorChoice.MethodName(Method));
            if (!Options.AllowUnsafeStep && !_explicit.Populations.All(p => p.All(double.IsFinite)))
            {
                throw new UnsafeStepException($"the {ExplicitPropagatorChoice.MethodName(Method)} trajectory overflows the largest double (about 1.8e308) inside its steps although the exact one does not: the pumping or the rates are too large for explicit steps; rescale the units");
            }

            return _explicit;
        }
    }

    /// <summary>The largest differences of <see cref="Explicit"/> from <see cref="Exact"/>; null with <see cref="RunOptions.ExactOnly"/>.</summary>
    public TrajectoryDifference? Difference => Explicit is { } explicitResult ? TrajectoryComparison.Compare(Exact, explicitResult) : null;

    /// <summary>The steady state reached from <see cref="Initial"/>.</summary>
    public SteadyStateResult Steady => _steady ??= SteadyState.Compute(Loaded.Rates, Spectrum, Initial, Loaded.Algebra);

    /// <summary>max_i |P_i(last time) - P_i(steady)| relative to the steady state's total population; null when there is no steady state.</summary>
    public double? SteadyDistance
    {
        get
        {
            if (Steady.Populations is not { } steady)
            {
                return null;
            }

            var last = Exact.Populations[^1];
            var scale = Math.Max(steady.Sum(Math.Abs), double.Epsilon);
            return last.Zip(steady, (a, b) => Math.Abs(a - b)).Max() / scale;
        }
    }

    private Trajectory Finite(Trajectory exact)
    {
        for (var k = 0; k < exact.Times.Length; k++)
        {
            if (!exact.Populations[k].All(double.IsFinite))
            {
                var deck = Loaded.Deck;
                var source = deck.Pumping is null ? "the rates are" : "the pumping is";
                throw new DeckException(deck.Pumping?.Span ?? deck.Run.Span,
                    $"the populations overflow the largest number a double holds (about 1.8e308) by t = {Format.Number(exact.Times[k])} {deck.TimeUnit}: {source} too large for these times; rescale the units or shorten t_end");
            }
        }

        return exact;
    }

    private Trajectory Propagate(IPropagator propagator, string label)
    {
        var progress = Options.Progress?.Invoke(label);
        try
        {
            return propagator.Propagate(Initial, Times, progress);
        }
        finally
        {
            (progress as IDisposable)?.Dispose();
        }
    }
}
