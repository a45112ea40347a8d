namespace RateDeck.Decks;

/// <summary>
/// A validated deck: everything the later stages need, with the source span of each user-given
/// item so that a problem found downstream can still be reported at the right place.
/// Produced by the deck reader; nothing in it has been evaluated beyond what validation needs.
/// </summary>
public sealed record Deck
{
    /// <summary>The deck file as given on the command line.</summary>
    public required string SourcePath { get; init; }

    /// <summary>Lower-case hex SHA-256 of the deck file's bytes (before overrides).</summary>
    public required string Sha256 { get; init; }

    /// <summary>The deck's title.</summary>
    public required string Title { get; init; }

    /// <summary>The deck format version (1).</summary>
    public required int FormatVersion { get; init; }

    /// <summary>The unit of every energy in the deck, kT included.</summary>
    public required EnergyUnit EnergyUnit { get; init; }

    /// <summary>
    /// The unit of time of every result: the run's times (<see cref="Run"/>, already converted), the
    /// rates of the assembled matrix (per this unit), summaries, files and plots. It is
    /// <c>[units] output_time</c> when the deck gives one, else the unit the deck's numbers are in.
    /// </summary>
    public required string TimeUnit { get; init; }

    /// <summary>
    /// The unit the deck's own numbers are in when it differs from <see cref="TimeUnit"/>: the rates
    /// of the rate file, kernel, losses and pumping are per this unit, and mechanics.planck is in it;
    /// null when the deck's numbers are in <see cref="TimeUnit"/> already.
    /// </summary>
    public string? GivenTimeUnit { get; init; }

    /// <summary>Turns a rate per <see cref="GivenTimeUnit"/> into one per <see cref="TimeUnit"/> (the assembler applies it).</summary>
    public RateConversion RateConversion { get; init; } = RateConversion.None;

    /// <summary>kT in <see cref="EnergyUnit"/> (a temperature in kelvin is already converted).</summary>
    public required double KT { get; init; }

    /// <summary>Where kT was set.</summary>
    public required SourceSpan KTSpan { get; init; }

    /// <summary>The states.</summary>
    public required GridSpec Grid { get; init; }

    /// <summary>Energy (or action) of each state, in <see cref="EnergyUnit"/>.</summary>
    public required PerStateSource Energies { get; init; }

    /// <summary>Statistical weights (degeneracy or density of states times cell width).</summary>
    public required WeightSpec Weights { get; init; }

    /// <summary>
    /// Which parts of the equilibrium pi the deck states: a full measured matrix may come without
    /// energies (then all 0) or weights (then all 1), and a pi made of defaults is no claim to check.
    /// </summary>
    public EquilibriumGiven EquilibriumGiven { get; init; } = EquilibriumGiven.EnergiesAndWeights;

    /// <summary>Where the off-diagonal rates come from.</summary>
    public required CouplingSpec Coupling { get; init; }

    /// <summary>Sink rate of each state (per time unit); null when the deck has none.</summary>
    public PerStateSource? Losses { get; init; }

    /// <summary>Injection rate into each state (population per time unit); null when none.</summary>
    public PerStateSource? Pumping { get; init; }

    /// <summary>The populations at t = 0.</summary>
    public required InitialSpec Initial { get; init; }

    /// <summary>Time span, output grid and explicit step.</summary>
    public required RunSpec Run { get; init; }

    /// <summary>What the plots call the state coordinate, and how their axes are scaled.</summary>
    public PlotSpec Plot { get; init; } = PlotSpec.Default;

    /// <summary>A one-degree-of-freedom Lagrangian, when weights are derived from mechanics.</summary>
    public MechanicsSpec? Mechanics { get; init; }

    /// <summary>Named values usable in every expression, after overrides.</summary>
    public required IReadOnlyDictionary<string, DeckParameter> Parameters { get; init; }

    /// <summary>The overrides applied, in order, each as the <c>--set</c> text that repeats it (provenance).</summary>
    public required IReadOnlyList<string> Overrides { get; init; }

    /// <summary>The overrides applied, in order (replayed on the deck file's values by <see cref="With"/>).</summary>
    internal IReadOnlyList<DeckOverride> AppliedOverrides { get; init; } = [];

    /// <summary>The deck file's values and syntax tree before any override; null for a deck built in code.</summary>
    internal DeckSource? Source { get; init; }

    /// <summary>What the stages keep for decks derived from the same file (compiled expressions, rate rows, mechanics).</summary>
    internal DeckMemo Memo { get; init; } = new();

    /// <summary>
    /// This deck with <paramref name="overrides"/> applied after the ones it has, validated exactly
    /// as a deck file saying so would be, and recorded in <see cref="Overrides"/>. Cheap: the TOML is
    /// not parsed and no rate file is read again, and the stages reuse what they compiled or derived
    /// for this deck where its inputs are unchanged (see <see cref="Pipeline.DeckPipeline"/>). A fit
    /// calls this once per trial, with <see cref="DeckOverride.KT"/>, <see cref="DeckOverride.Parameter"/>
    /// and <see cref="DeckOverride.Set(string, double)"/> for rates (<c>losses.by_state.k1</c>) and
    /// initial populations (<c>initial.values</c>); trials may run in parallel.
    /// </summary>
    /// <exception cref="DeckException">An override is invalid, or the deck it makes is (at the override).</exception>
    /// <exception cref="InvalidOperationException">The deck was built in code, not read from a deck file.</exception>
    public Deck With(params IEnumerable<DeckOverride> overrides)
    {
        var source = Source ?? throw new InvalidOperationException("this deck was built in code, not read from a deck file, so there is no file to apply overrides to");
        return DeckReader.Derive(source, [.. AppliedOverrides, .. overrides], Memo);
    }

    /// <summary>
    /// Checks that an override may set <paramref name="key"/> (a deck key such as
    /// <c>temperature.kT</c>, or a parameter the deck defines) without applying any value: a sweep
    /// refuses an unknown key before it runs a point. Errors are reported at <paramref name="origin"/>.
    /// </summary>
    /// <exception cref="DeckException">The key is unknown, or names a table.</exception>
    /// <exception cref="InvalidOperationException">The deck was built in code, not read from a deck file.</exception>
    public void CheckOverrideKey(string key, SourceSpan origin)
    {
        var source = Source ?? throw new InvalidOperationException("this deck was built in code, not read from a deck file, so it has no keys to override");
        Decks.Overrides.CheckKey(source.Root, key, origin);
    }
}

/// <summary>A deck file as read: its values (schema-checked, before overrides), Tomlyn's syntax tree of the text, where it is and its hash.</summary>
internal sealed record DeckSource(TomlTableNode Root, Tomlyn.Syntax.DocumentSyntax Syntax, string Path, string BaseDirectory, string Sha256);

/// <summary>Which of the quantities that make pi_i = g_i exp(-E_i / kT) / Z a deck gives.</summary>
[Flags]
public enum EquilibriumGiven
{
    /// <summary>Neither: energies all 0 and weights all 1 by default (a full measured matrix only).</summary>
    None = 0,
    /// <summary>The deck gives energies.</summary>
    Energies = 1,
    /// <summary>The deck gives weights.</summary>
    Weights = 2,
    /// <summary>The deck gives both.</summary>
    EnergiesAndWeights = Energies | Weights,
}

/// <summary>A named deck parameter.</summary>
public sealed record DeckParameter(string Name, double Value, SourceSpan Span);

/// <summary>
/// The resolved state grid. <see cref="CellWidths"/> is the width dx of each state's cell, used by
/// the isotropic measure: uniform for a linear grid, x * d(ln x) for a logarithmic one, and half the
/// distance between neighbours (the end cells mirrored) for an explicit list.
/// </summary>
public sealed record GridSpec(double[] Coordinates, string[] Labels, double[] CellWidths, SourceSpan Span)
{
    /// <summary>Number of states.</summary>
    public int Count => Coordinates.Length;

    /// <summary>How a generated grid is spaced; null for coordinates listed by the deck.</summary>
    public GridSpacing? Spacing { get; init; }
}

/// <summary>How the points of a grid (states, output times) or a plot axis are spaced.</summary>
public enum GridSpacing
{
    /// <summary>Evenly in x: a linear axis.</summary>
    Linear,
    /// <summary>Evenly in ln x: a logarithmic axis.</summary>
    Logarithmic,
}

/// <summary>
/// The plot keys: the name and unit of the state coordinate (<c>states.coordinate_name</c>,
/// <c>states.coordinate_unit</c>) and the axis scales (<c>plot.time_axis</c>,
/// <c>plot.state_axis</c>; null: follow the grid's spacing).
/// </summary>
/// <param name="CoordinateName">What the state coordinate is, e.g. "wave number k"; null: "state coordinate".</param>
/// <param name="CoordinateUnit">The coordinate's unit, e.g. "1/nm"; null when it has none.</param>
/// <param name="TimeAxis">The time axes' scale, or null to follow the output grid.</param>
/// <param name="StateAxis">The state-coordinate axes' scale, or null to follow the state grid.</param>
public sealed record PlotSpec(string? CoordinateName, string? CoordinateUnit, GridSpacing? TimeAxis, GridSpacing? StateAxis)
{
    /// <summary>No name or unit given, both axes following their grids.</summary>
    public static PlotSpec Default { get; } = new(null, null, null, null);
}

/// <summary>A per-state quantity: explicit values or an expression of the state.</summary>
public abstract record PerStateSource(SourceSpan Span);

/// <summary>One value per state, in grid order.</summary>
public sealed record PerStateValues(double[] Values, SourceSpan Span) : PerStateSource(Span);

/// <summary>
/// An expression evaluated for each state with variables <c>x</c> (coordinate), <c>i</c>
/// (the one-based state number, i = 1..N as in SPEC 2), <c>kT</c> and the deck parameters.
/// <see cref="PerStateSource.Span"/> points at the first character of the expression text inside
/// the deck.
/// </summary>
public sealed record PerStateExpression(string Text, SourceSpan Span) : PerStateSource(Span);

/// <summary>How the statistical weights are given.</summary>
public abstract record WeightSpec(SourceSpan Span);

/// <summary>Weights given per state (values or expression).</summary>
public sealed record GivenWeights(PerStateSource Source) : WeightSpec(Source.Span);

/// <summary>
/// The isotropic d-dimensional measure S_{d-1} x^(d-1) dx with S_{d-1} = 2 pi^(d/2) / Gamma(d/2).
/// </summary>
public sealed record IsotropicWeights(int Dimension, SourceSpan Span) : WeightSpec(Span);

/// <summary>Weights g(E) = T(E) / h from the deck's Lagrangian (see <see cref="MechanicsSpec"/>).</summary>
public sealed record MechanicsWeights(SourceSpan Span) : WeightSpec(Span);

/// <summary>Which way a measured or modelled one-directional transfer goes.</summary>
public enum TransferDirection
{
    /// <summary>From a state to states of smaller coordinate.</summary>
    TowardSmaller,
    /// <summary>From a state to states of larger coordinate.</summary>
    TowardLarger,
}

/// <summary>
/// One off-diagonal coefficient: the rate from state <see cref="From"/> to <see cref="To"/>, both
/// zero-based indices into the grid. <see cref="Span"/> is the rate's cell in the CSV file.
/// </summary>
public sealed record RateEntry(int From, int To, double Rate, SourceSpan Span);

/// <summary>Where the off-diagonal rates come from.</summary>
public abstract record CouplingSpec(SourceSpan Span);

/// <summary>Measured rates for one direction, completed by detailed balance.</summary>
public sealed record MeasuredOneWay(TransferDirection Direction, IReadOnlyList<RateEntry> Entries, SourceSpan Span)
    : CouplingSpec(Span);

/// <summary>A full measured rate matrix, taken as is (detailed balance is checked, not imposed).</summary>
public sealed record MeasuredFull(IReadOnlyList<RateEntry> Entries, SourceSpan Span) : CouplingSpec(Span);

/// <summary>
/// A model kernel W(x -> y) for <see cref="Direction"/>, completed by detailed balance.
/// Variables: <c>x</c>, <c>y</c> (source and target coordinates), <c>i</c>, <c>j</c> (their
/// one-based state numbers), <c>kT</c> and the deck parameters. <see cref="Band"/> keeps only
/// pairs with |i - j| &lt;= band (1 = nearest neighbours); null keeps all pairs.
/// </summary>
public sealed record KernelModel(string Text, TransferDirection Direction, int? Band, SourceSpan Span)
    : CouplingSpec(Span);

/// <summary>The populations at t = 0.</summary>
public abstract record InitialSpec(SourceSpan Span);

/// <summary>All population (1) in one state, a zero-based index into the grid.</summary>
public sealed record InitialInState(int State, SourceSpan Span) : InitialSpec(Span);

/// <summary>Populations given per state (values or expression).</summary>
public sealed record InitialGiven(PerStateSource Source) : InitialSpec(Source.Span);

/// <summary>The normalised equilibrium distribution pi.</summary>
public sealed record InitialEquilibrium(SourceSpan Span) : InitialSpec(Span);

/// <summary>Spacing of the output times.</summary>
public enum OutputSpacing
{
    /// <summary>Evenly spaced from 0 to t_end.</summary>
    Linear,
    /// <summary>t = 0, then logarithmically spaced from t_first to t_end.</summary>
    Logarithmic,
}

/// <summary>The explicit integrator run beside the exact propagator.</summary>
public enum ExplicitMethod
{
    /// <summary>Forward Euler, first order.</summary>
    Euler,
    /// <summary>Classical fourth-order Runge-Kutta.</summary>
    RungeKutta4,
}

/// <summary>
/// Time span, output grid and explicit step. <see cref="Dt"/> null means automatic:
/// <see cref="SafetyFactor"/> times the explicit method's stability limit.
/// <see cref="OutputCount"/> is the number of output times after t = 0 (t = 0 is always
/// written too); <see cref="FirstTime"/> is the first of them on a logarithmic grid and null on a
/// linear one. <see cref="PlotStates"/> are zero-based indices into the grid (empty: the plotting
/// stage chooses).
/// </summary>
public sealed record RunSpec(
    double EndTime,
    int OutputCount,
    OutputSpacing Spacing,
    double? FirstTime,
    ExplicitMethod Method,
    double? Dt,
    double SafetyFactor,
    IReadOnlyList<int> PlotStates,
    SourceSpan Span)
{
    /// <summary>
    /// run.accuracy: the largest |explicit - exact| over the total population an automatic step
    /// is chosen to meet, and above which a run says the explicit result misses (default 1e-3).
    /// </summary>
    public double Accuracy { get; init; } = DefaultAccuracy;

    /// <summary>
    /// run.times: output times listed by the deck (ascending, in (0, t_end]); null when the
    /// outputs are a grid. t = 0 and t_end are always written as well.
    /// </summary>
    public IReadOnlyList<double>? ListedTimes { get; init; }

    /// <summary>The default of <see cref="Accuracy"/>: 1e-3 of the total population, a plot's resolution.</summary>
    public const double DefaultAccuracy = 1e-3;
}

/// <summary>
/// A one-degree-of-freedom Lagrangian L(q, v) (variables <c>q</c>, <c>v</c>, <c>kT</c> and the
/// deck parameters) and Planck's constant h in the deck's units, for weights g(E) = T(E) / h.
/// </summary>
public sealed record MechanicsSpec(string Lagrangian, double Planck, SourceSpan Span);
