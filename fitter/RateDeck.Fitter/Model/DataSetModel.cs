using System.Text.RegularExpressions;
using RateDeck.Decks;
using RateDeck.Fitting.Data;
using RateDeck.Fitting.Setup;
using RateDeck.LinearAlgebra;
using RateDeck.Mechanics;
using RateDeck.Pipeline;
using RateDeck.Propagation;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Fitting.Model;

/// <summary>
/// One data set with its deck (the deck plus the data set's overrides) and the model that predicts
/// its columns from the free parameters: apply the values to the deck in memory, assemble the
/// states and the rate matrix, propagate exactly to the data times and evaluate each column.
/// The exact propagator's path is chosen once, at the start values, and kept for every trial.
/// When the Lagrangian reads no free parameter the mechanics stage runs once, not per trial.
/// </summary>
public sealed partial class DataSetModel
{
    /// <summary>Up to this many states a banded deck is fitted on the dense symmetric eigen path instead of the contour path.</summary>
    public const int DenseEigenLimit = 1000;

    private readonly ILinearAlgebra _algebra;
    private readonly Observable[] _observables;
    private readonly int[][] _timeIndex;
    private readonly MechanicsDeriver _mechanics;

    private DataSetModel(DataSetSpec spec, Deck deck, DataTable data, Observable[] observables, double[] times, int[][] timeIndex, bool mechanicsPerTrial, ILinearAlgebra algebra)
    {
        Spec = spec;
        Deck = deck;
        Data = data;
        _observables = observables;
        Times = times;
        _timeIndex = timeIndex;
        _mechanics = mechanicsPerTrial ? DeriveEveryTime() : DeriveOnce();
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

    /// <summary>How many times the mechanics stage derived the weights (1 when cached).</summary>
    public int MechanicsDerivations { get; private set; }

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
        var model = new DataSetModel(spec, deck, data, observables, times, timeIndex, LagrangianReadsFreeValues(deck, targets), algebra);
        model.ChoosePath(model.Apply(targets, start));
        return model;
    }

    /// <summary>The deck with the free values applied.</summary>
    public Deck Apply(IReadOnlyList<ParameterTarget> targets, IReadOnlyList<double> values)
    {
        var deck = Deck;
        for (var k = 0; k < targets.Count; k++)
        {
            deck = targets[k].Apply(deck, values[k]);
        }

        return deck;
    }

    /// <summary>
    /// The model's value for every observed value, series after series in file order.
    /// </summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    public double[] Predict(Deck deck)
    {
        var trajectory = Propagate(deck, Times);
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
    public double[][] Curves(Deck deck, double[] times)
    {
        var trajectory = Propagate(deck, times);
        return [.. _observables.Select(o => trajectory.Populations.Select(p => o.Evaluate(p, deck)).ToArray())];
    }

    /// <summary>The populations at <paramref name="times"/> on the fixed path.</summary>
    /// <exception cref="InfeasibleTrialException">The deck cannot be assembled or propagated at these values.</exception>
    public Trajectory Propagate(Deck deck, double[] times)
    {
        try
        {
            var (rates, initial) = Assemble(deck);
            return CreatePropagator(rates).Propagate(initial, times);
        }
        catch (Exception e) when (e is DeckException or ArgumentException or InvalidOperationException or MechanicsException or ArithmeticException)
        {
            throw new InfeasibleTrialException(e is DeckException deckError ? deckError.Problem : e.Message, e);
        }
    }

    /// <summary>The rate matrix and P(0) of <paramref name="deck"/> (mechanics from the cache when it applies).</summary>
    public (RateMatrix Rates, double[] Initial) Assemble(Deck deck)
    {
        var states = StateSpaceBuilder.Build(deck, _mechanics);
        var rates = RateMatrixAssembler.Assemble(deck, states);
        return (rates, RunSetup.InitialPopulations(deck, states));
    }

    private void ChoosePath(Deck deck)
    {
        var (rates, initial) = Assemble(deck);
        var chosen = ExactPropagatorChoice.Choose(rates, _algebra, initial: initial);
        PropagatorPath = chosen.Name;
        PropagatorReason = chosen.Reason;
        if (chosen is ContourExponentialPropagator && rates.Count <= DenseEigenLimit)
        {
            // The contour path saves memory on large banded decks; below this size one dense
            // decomposition per trial is faster and as accurate when its rounding estimate allows.
            var symmetric = new SymmetricEigenPropagator(rates, _algebra);
            if (symmetric.RelativeErrorEstimate(initial) <= SymmetricEigenPropagator.RelativeErrorLimit)
            {
                PropagatorPath = symmetric.Name;
                PropagatorReason = $"symmetric eigen-decomposition: {rates.Count} states are few enough for a dense decomposition per trial ({chosen.Reason[..chosen.Reason.IndexOf(';', StringComparison.Ordinal)]} otherwise)";
            }
        }
    }

    private IPropagator CreatePropagator(RateMatrix rates) => PropagatorPath switch
    {
        "symmetric-eigen" => new SymmetricEigenPropagator(rates, _algebra),
        "contour-exponential" => new ContourExponentialPropagator(rates),
        "general-eigen" => new GeneralEigenPropagator(rates, _algebra),
        _ => new PadeExponentialPropagator(rates, _algebra),
    };

    /// <summary>True when the deck's Lagrangian names kT or a free [parameters] entry, so that each trial must derive the weights again.</summary>
    private static bool LagrangianReadsFreeValues(Deck deck, IReadOnlyList<ParameterTarget> targets)
    {
        if (deck.Mechanics is not { } mechanics)
        {
            return false;
        }

        var names = Identifier().Matches(mechanics.Lagrangian).Select(m => m.Value).ToHashSet(StringComparer.Ordinal);
        return targets.Any(t => t is TemperatureTarget ? names.Contains("kT") : t is DeckParameterTarget && names.Contains(t.Key));
    }

    private MechanicsDeriver DeriveEveryTime() => (lagrangian, energies, planck) =>
    {
        MechanicsDerivations++;
        return LagrangianMechanics.Derive(lagrangian, energies, planck);
    };

    /// <summary>Derives once and reuses the weights while the energies and h are the same (they are when no free value reaches them).</summary>
    private MechanicsDeriver DeriveOnce()
    {
        double[]? energiesSeen = null;
        var planckSeen = double.NaN;
        MechanicsResult? result = null;
        return (lagrangian, energies, planck) =>
        {
            if (result is null || planck != planckSeen || !energies.SequenceEqual(energiesSeen!))
            {
                MechanicsDerivations++;
                result = LagrangianMechanics.Derive(lagrangian, energies, planck);
                energiesSeen = (double[])energies.Clone();
                planckSeen = planck;
            }

            return result;
        };
    }

    [GeneratedRegex("[A-Za-z_][A-Za-z0-9_]*")]
    private static partial Regex Identifier();
}
