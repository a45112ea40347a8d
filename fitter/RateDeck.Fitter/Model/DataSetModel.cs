using RateDeck.Decks;
using RateDeck.Fitting.Data;
using RateDeck.Fitting.Setup;
using RateDeck.LinearAlgebra;
using RateDeck.Mechanics;
using RateDeck.Pipeline;
using RateDeck.Propagation;
using RateDeck.Sensitivities;
using RateDeck.States;

namespace RateDeck.Fitting.Model;

/// <summary>
/// One data set with its deck (the deck plus the data set's overrides) and the model that predicts
/// its columns from the free parameters, on the engine's pipeline: the free values become typed
/// overrides of the deck (<see cref="TrialDeck"/>, <see cref="Deck.With(IEnumerable{DeckOverride})"/>),
/// <see cref="DeckPipeline.Assemble"/> builds the states and the rate matrix (compiled expressions,
/// rate files and the mechanics reused from the deck's memo), and <see cref="DeckRun.Exact"/>
/// propagates to the data times on the path chosen once, at the start values, and kept for every
/// trial (<see cref="RunOptions.ExactPath"/>). The mechanics of a Lagrangian is derived again only
/// when a value it reads changes.
/// </summary>
public sealed class DataSetModel
{
    /// <summary>Up to this many states a banded deck is fitted on the dense symmetric eigen path instead of the contour path.</summary>
    public const int DenseEigenLimit = 1000;

    private readonly ILinearAlgebra _algebra;
    private readonly Observable[] _observables;
    private readonly int[][] _timeIndex;
    private RunOptions _options = new() { ExactOnly = true };
    private double[]? _lastValues;
    private DeckRun? _lastRun;

    private DataSetModel(DataSetSpec spec, Deck deck, DataTable data, Observable[] observables, double[] times, int[][] timeIndex, ILinearAlgebra algebra)
    {
        Spec = spec;
        Deck = deck;
        Data = data;
        _observables = observables;
        Times = times;
        _timeIndex = timeIndex;
        _algebra = algebra;
        PropagatorPath = "";
        PropagatorReason = "";
    }

    /// <summary>The data set as written in [fit.data].</summary>
    public DataSetSpec Spec { get; }

    /// <summary>The deck with the data set's overrides, before the free values are applied.</summary>
    public Deck Deck { get; }

    /// <summary>The observed columns.</summary>
    public DataTable Data { get; }

    /// <summary>The distinct data times, ascending.</summary>
    public double[] Times { get; }

    /// <summary>The exact propagator kept for the whole fit (its <see cref="IPropagator.Name"/>).</summary>
    public string PropagatorPath { get; private set; }

    /// <summary>Why that propagator was chosen.</summary>
    public string PropagatorReason { get; private set; }

    /// <summary>How many exact trajectories this data set's model has computed (trials, differences and curves).</summary>
    public int TrajectoryEvaluations { get; private set; }

    /// <summary>How many times the mechanics stage derived the weights for this data set's deck (1 when kept for every trial).</summary>
    public int MechanicsDerivations => Deck.Memo.GetOrAdd(typeof(MechanicsMemo), () => new MechanicsMemo()).Derivations;

    /// <summary>
    /// Reads the data set's deck and data and fixes the propagator path at the start values
    /// <paramref name="start"/> of <paramref name="targets"/>.
    /// </summary>
    /// <exception cref="DeckException">Bad deck, data or observable.</exception>
    public static DataSetModel Create(
        DataSetSpec spec, string deckPath, IReadOnlyList<string> overrides, IReadOnlyList<ObservableSpec> observableSpecs,
        IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> start, ILinearAlgebra algebra)
    {
        var deck = DeckReader.Read(deckPath, [.. overrides, .. spec.Overrides]);
        var compiled = observableSpecs.ToDictionary(o => o.Name, o => (Func<Observable>)(() => Observable.Compile(o, deck)));
        foreach (var (label, state) in deck.Grid.Labels.Select((label, state) => (label, state)))
        {
            compiled.TryAdd(label, () => Observable.Population(label, state));
        }

        var data = DataCsvReader.Read(spec.CsvPath, spec.TimeColumn, compiled.Keys, spec.Span);
        var observables = data.Series.Select(s => compiled[s.Name]()).ToArray();
        var times = data.Series.SelectMany(s => s.Times).Distinct().Order().ToArray();
        var timeIndex = data.Series.Select(s => s.Times.Select(t => Array.BinarySearch(times, t)).ToArray()).ToArray();
        var model = new DataSetModel(spec, deck, data, observables, times, timeIndex, algebra);
        model.ChoosePath(Build(deck, targets, start));
        return model;
    }

    /// <summary>The deck with the free values applied.</summary>
    /// <exception cref="InfeasibleTrialException">The values make the deck invalid.</exception>
    public Deck Apply(IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> values)
    {
        try
        {
            return Build(Deck, targets, values);
        }
        catch (DeckException e)
        {
            throw new InfeasibleTrialException(e.Problem, e);
        }
    }

    /// <summary>
    /// The model's value for every observed value, series after series in file order, at the free
    /// values <paramref name="values"/>; the trial is kept for <see cref="Sensitivities"/> at the same values.
    /// </summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    public double[] Predict(IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> values)
    {
        var run = Evaluate(Apply(targets, values), Times);
        (_lastValues, _lastRun) = ([.. values], run);
        return Observe(run.Exact, run.Loaded.Deck);
    }

    /// <summary>
    /// Analytic d(prediction)/d(value) for each of <paramref name="columns"/> (indices into
    /// <paramref name="targets"/>), rows as <see cref="Predict"/>, on the symmetric eigen path
    /// (<see cref="TrajectorySensitivity"/>, <see cref="GeneratorDerivatives"/>); a column is null
    /// where they do not apply, with the reason in <paramref name="reasons"/>. Reuses the trial
    /// <see cref="Predict"/> kept at the same values (no new trajectory), else evaluates one.
    /// </summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    public double[]?[] Sensitivities(IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> values, IReadOnlyList<int> columns, string?[] reasons)
    {
        var result = new double[]?[columns.Count];
        if (PropagatorPath != "symmetric-eigen")
        {
            foreach (var j in columns)
            {
                reasons[j] = $"the exact path is {PropagatorPath}, not the symmetric eigen path";
            }

            return result;
        }

        var run = _lastRun is { } last && _lastValues!.SequenceEqual(values) ? last : Evaluate(Apply(targets, values), Times);
        var trajectory = run.Exact;
        var deck = run.Loaded.Deck;
        var changes = new List<(int Slot, string? Input, GeneratorDerivative Change)>();
        for (var slot = 0; slot < columns.Count; slot++)
        {
            var input = targets[columns[slot]].Input;
            try
            {
                var change = GeneratorDerivatives.Of(run.Loaded, input);
                if (input.ExpressionName is { } name)
                {
                    // Compiles (and checks) the observables' own derivatives before the propagation work.
                    _ = _observables.Sum(o => o.InputDerivative(trajectory.Populations[0], deck, name));
                }

                changes.Add((slot, input.ExpressionName, change));
            }
            catch (NotSupportedException e)
            {
                reasons[columns[slot]] = e.Message;
            }
        }

        double[][][] populations;
        try
        {
            populations = TrajectorySensitivity.Compute((SymmetricEigenPropagator)run.ExactPropagator, run.Loaded.Rates, run.Initial, Times, [.. changes.Select(c => c.Change)], _algebra);
            foreach (var observable in _observables)
            {
                observable.PopulationGradient(trajectory.Populations[0], deck);
            }
        }
        catch (NotSupportedException e)
        {
            foreach (var (slot, _, _) in changes)
            {
                reasons[columns[slot]] = e.Message;
            }

            return result;
        }

        for (var c = 0; c < changes.Count; c++)
        {
            var (slot, name, _) = changes[c];
            var rows = new double[Data.Count];
            var k = 0;
            for (var s = 0; s < _observables.Length; s++)
            {
                var observable = _observables[s];
                foreach (var index in _timeIndex[s])
                {
                    var at = trajectory.Populations[index];
                    var gradient = observable.PopulationGradient(at, deck);
                    var value = name is null ? 0 : observable.InputDerivative(at, deck, name);
                    for (var q = 0; q < gradient.Length; q++)
                    {
                        value += gradient[q] * populations[c][index][observable.States[q]];
                    }

                    rows[k++] = value;
                }
            }

            result[slot] = rows;
        }

        return result;
    }

    private double[] Observe(Trajectory trajectory, Deck deck)
    {
        var result = new double[Data.Count];
        var k = 0;
        for (var s = 0; s < _observables.Length; s++)
        {
            foreach (var index in _timeIndex[s])
            {
                result[k++] = _observables[s].Evaluate(trajectory.Populations[index], deck);
            }
        }

        return result;
    }

    /// <summary>Each column's model curve at <paramref name="times"/> (for plots).</summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    /// <exception cref="IntegrationGaveUpException">The kept path is the implicit integrator and it gave up before the last of <paramref name="times"/>.</exception>
    public double[][] Curves(Deck deck, double[] times)
    {
        var trajectory = Propagate(deck, times);
        return [.. _observables.Select(o => trajectory.Populations.Select(p => o.Evaluate(p, deck)).ToArray())];
    }

    /// <summary>The populations at <paramref name="times"/> on the kept path.</summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    /// <exception cref="IntegrationGaveUpException">The kept path is the implicit integrator and it gave up before the last of <paramref name="times"/>.</exception>
    public Trajectory Propagate(Deck deck, double[] times) => Evaluate(deck, times, trial: false).Exact;

    /// <summary>
    /// A run of <paramref name="deck"/> on the kept path whose exact trajectory is computed. In a
    /// <paramref name="trial"/> of the optimizer an integrator that gives up makes the trial
    /// infeasible (the optimizer steps back); elsewhere its give-up is thrown as it is.
    /// </summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    /// <exception cref="IntegrationGaveUpException">Not a <paramref name="trial"/>, and the implicit integrator gave up.</exception>
    private DeckRun Evaluate(Deck deck, double[] times, bool trial = true)
    {
        TrajectoryEvaluations++;
        try
        {
            var run = new DeckRun(DeckPipeline.Assemble(deck, _algebra), _options with { Times = times });
            _ = run.Exact;
            return run;
        }
        catch (Exception e) when (e is DeckException or ArgumentException or InvalidOperationException or MechanicsException or ArithmeticException
            || (trial && e is IntegrationGaveUpException))
        {
            throw new InfeasibleTrialException(e is DeckException deckError ? deckError.Problem : e.Message, e);
        }
    }

    private static Deck Build(Deck deck, IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> values)
    {
        var trial = new TrialDeck(deck);
        for (var k = 0; k < targets.Count; k++)
        {
            targets[k].Apply(trial, values[k]);
        }

        return trial.Build();
    }

    /// <summary>
    /// Chooses the exact path as <c>ratedeck run</c> would for this deck, P(0) and the last data
    /// time, and keeps it (<see cref="ExactPropagatorChoice.RequestOf"/>) for every trial.
    /// </summary>
    private void ChoosePath(Deck deck)
    {
        var run = new DeckRun(DeckPipeline.Assemble(deck, _algebra), _options with { Times = Times });
        var chosen = run.ExactPropagator;
        PropagatorPath = chosen.Name;
        PropagatorReason = chosen.Reason;
        var request = ExactPropagatorChoice.RequestOf(chosen);
        var rates = run.Loaded.Rates;
        if (chosen is ContourExponentialPropagator && rates.Count <= DenseEigenLimit)
        {
            // The contour path saves memory on large banded decks; below this size one dense
            // decomposition per trial is faster and as accurate when its rounding estimate allows.
            var symmetric = new SymmetricEigenPropagator(rates, _algebra);
            if (symmetric.RelativeErrorEstimate(run.Initial) <= SymmetricEigenPropagator.RelativeErrorLimit)
            {
                PropagatorPath = symmetric.Name;
                PropagatorReason = $"symmetric eigen-decomposition: {rates.Count} states are few enough for a dense decomposition per trial ({chosen.Reason[..chosen.Reason.IndexOf(';', StringComparison.Ordinal)]} otherwise)";
                request = ExactPathRequest.SymmetricEigen;
            }
        }

        _options = _options with { ExactPath = request };
    }
}
