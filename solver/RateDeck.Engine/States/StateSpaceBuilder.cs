using System.Globalization;
using MathNet.Numerics;
using RateDeck.Decks;
using RateDeck.Mechanics;

namespace RateDeck.States;

/// <summary>
/// Deck -> <see cref="StateSpace"/>: evaluates energies and weights and forms the normalised
/// equilibrium ln pi_i = ln g_i - E_i / kT - ln Z (SPEC 2), entirely in log space, with ln Z by a
/// max-shifted log-sum-exp summed with compensation. Per-state expressions see the variables
/// documented on <see cref="PerStateEvaluator"/>.
/// </summary>
public static class StateSpaceBuilder
{
    /// <summary>The variables of a Lagrangian before the inputs kT and the parameters.</summary>
    internal static readonly string[] LagrangianVariables = ["q", "v"];

    /// <summary>
    /// Builds the state space of <paramref name="deck"/> with the real mechanics stage
    /// (<see cref="LagrangianMechanics.Derive"/>), run whenever the deck has a Lagrangian; see
    /// <see cref="Build(Deck, MechanicsDeriver?)"/>. The mechanics result is kept in the deck's memo
    /// and reused while the Lagrangian, h, the inputs the Lagrangian reads and the energies are
    /// unchanged: a new kT re-derives nothing for a Lagrangian that does not read kT.
    /// </summary>
    public static StateSpace Build(Deck deck) => Build(deck, (lagrangian, energies, planck) => LagrangianMechanics.Derive(lagrangian, energies, planck), memoise: true);

    /// <summary>
    /// Builds the state space of <paramref name="deck"/>. When the deck has a Lagrangian and
    /// <paramref name="mechanics"/> is given, the stage is run at the state energies whether or not
    /// the weights come from it: a Lagrangian that gives no closed orbit at a state's energy is a
    /// mistake in the deck either way; its result is kept in <see cref="StateSpace.Mechanics"/>.
    /// Its weights g(E) = T(E) / h are used when the deck asks for weights from mechanics (without
    /// a stage that is refused). Throws <see cref="DeckException"/> naming the state for a
    /// non-finite energy, a weight that is not positive and finite, a kT that is not positive and
    /// finite, or an energy at which the Lagrangian has no closed orbit (at the Lagrangian's span).
    /// </summary>
    public static StateSpace Build(Deck deck, MechanicsDeriver? mechanics) => Build(deck, mechanics, memoise: false);

    private static StateSpace Build(Deck deck, MechanicsDeriver? mechanics, bool memoise)
    {
        if (!double.IsFinite(deck.KT) || deck.KT <= 0)
        {
            throw new DeckException(deck.KTSpan, string.Create(CultureInfo.InvariantCulture, $"kT is {deck.KT}; it must be positive and finite"));
        }

        var energies = PerStateEvaluator.Evaluate(deck, deck.Energies, "energy", PerStateRequirement.Finite);
        var derived = deck.Mechanics is { } spec && mechanics is not null ? DeriveMechanics(deck, spec, energies, mechanics, memoise) : null;
        var weights = deck.Weights switch
        {
            GivenWeights given => PerStateEvaluator.Evaluate(deck, given.Source, "weight", PerStateRequirement.Positive),
            MechanicsWeights fromMechanics => DerivedWeights(deck, fromMechanics, derived?.Weights),
            _ => null,
        };
        var logWeights = deck.Weights switch
        {
            IsotropicWeights isotropic => IsotropicLogWeights(deck.Grid, isotropic),
            GivenWeights or MechanicsWeights => weights!.Select(w => Math.Log(w)).ToArray(),
            _ => throw new NotSupportedException($"unknown weight specification {deck.Weights.GetType().Name}"),
        };

        var logEquilibrium = LogEquilibrium(deck, energies, logWeights);
        return new StateSpace(
            (string[])deck.Grid.Labels.Clone(),
            (double[])deck.Grid.Coordinates.Clone(),
            energies,
            logWeights,
            deck.KT,
            logEquilibrium)
        {
            Weights = weights,
            Mechanics = derived,
            EquilibriumGiven = deck.EquilibriumGiven,
        };
    }

    /// <summary>
    /// ln S_{d-1} = ln 2 + (d/2) ln pi - ln Gamma(d/2), the log of the area of the unit sphere in
    /// d dimensions (2, 2 pi, 4 pi, 2 pi^2 for d = 1..4). Finite for every d up to int.MaxValue.
    /// </summary>
    public static double LogUnitSphereArea(int dimension)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(dimension, 1);
        return Math.Log(2) + 0.5 * dimension * Math.Log(Math.PI) - SpecialFunctions.GammaLn(0.5 * dimension);
    }

    /// <summary>ln g_i = ln S_{d-1} + (d - 1) ln x_i + ln dx_i; for d = 1 the x factor is 1 and x may be any value.</summary>
    private static double[] IsotropicLogWeights(GridSpec grid, IsotropicWeights isotropic)
    {
        if (isotropic.Dimension < 1)
        {
            throw new DeckException(isotropic.Span, $"the dimension is {isotropic.Dimension}; it must be a whole number, 1 or more");
        }

        var logArea = LogUnitSphereArea(isotropic.Dimension);
        var logWeights = new double[grid.Count];
        for (var state = 0; state < grid.Count; state++)
        {
            var x = grid.Coordinates[state];
            var dx = grid.CellWidths[state];
            if (isotropic.Dimension > 1 && !(x > 0 && double.IsFinite(x)))
            {
                throw new DeckException(
                    isotropic.Span,
                    string.Create(CultureInfo.InvariantCulture, $"state '{grid.Labels[state]}' (state {state + 1}) has x = {x}; the {isotropic.Dimension}-dimensional measure needs every x positive and finite"));
            }

            if (!(dx > 0 && double.IsFinite(dx)))
            {
                throw new DeckException(
                    grid.Span,
                    string.Create(CultureInfo.InvariantCulture, $"the cell of state '{grid.Labels[state]}' (state {state + 1}) has width {dx}; neighbouring states must have distinct coordinates"));
            }

            var radial = isotropic.Dimension > 1 ? (isotropic.Dimension - 1) * Math.Log(x) : 0.0;
            logWeights[state] = logArea + radial + Math.Log(dx);
        }

        return logWeights;
    }

    /// <summary>g_i as the mechanics stage derived them, or a refusal saying what is missing.</summary>
    private static double[] DerivedWeights(Deck deck, MechanicsWeights request, double[]? derived)
    {
        if (deck.Mechanics is null)
        {
            throw new DeckException(request.Span, "weights from mechanics need a Lagrangian; add one to the deck or give the weights another way");
        }

        if (derived is null)
        {
            throw new DeckException(request.Span, "weights from mechanics need the mechanics stage, which this build does not have; give the weights per state or by dimension");
        }

        return derived;
    }

    /// <summary>
    /// Runs the mechanics stage on the deck's Lagrangian, which sees <c>q</c>, <c>v</c>, kT and the
    /// parameters, and checks every weight. A failure of the stage for one state becomes a
    /// <see cref="DeckException"/> at the Lagrangian naming that state. With
    /// <paramref name="memoise"/> a result kept for the same inputs is reused.
    /// </summary>
    private static MechanicsResult DeriveMechanics(Deck deck, MechanicsSpec spec, double[] energies, MechanicsDeriver mechanics, bool memoise)
    {
        var scope = ExpressionScope.Create(deck, LagrangianVariables);
        var compiled = scope.Compile(spec.Lagrangian, spec.Span);
        var inputs = scope.NewValues();
        double Lagrangian(double q, double v)
        {
            // A fresh buffer per call keeps the delegate safe for a stage that evaluates in parallel.
            var values = (double[])inputs.Clone();
            values[0] = q;
            values[1] = v;
            return compiled.Evaluate(values);
        }

        MechanicsResult Derive()
        {
            try
            {
                return mechanics(Lagrangian, (double[])energies.Clone(), spec.Planck);
            }
            catch (MechanicsException e)
            {
                var problem = e.StateIndex is { } k
                    ? $"the Lagrangian fails for state '{deck.Grid.Labels[k]}' (state {k + 1}): {e.Message}"
                    : $"the Lagrangian gives no orbits: {e.Message}";
                throw new DeckException(spec.Span, problem);
            }
        }

        var result = memoise
            ? deck.Memo.GetOrAdd(typeof(MechanicsMemo), () => new MechanicsMemo())
                .GetOrDerive(new MechanicsKey(spec.Lagrangian, spec.Planck, scope.InputValues(compiled), (double[])energies.Clone()), Derive)
            : Derive();
        var weights = result.Weights;
        if (weights.Length != energies.Length)
        {
            throw new InvalidOperationException($"the mechanics stage returned {weights.Length} weights for {energies.Length} states");
        }

        for (var state = 0; state < weights.Length; state++)
        {
            if (!(weights[state] > 0 && double.IsFinite(weights[state])))
            {
                throw new DeckException(
                    spec.Span,
                    string.Create(CultureInfo.InvariantCulture, $"the weight T(E)/h of state '{deck.Grid.Labels[state]}' (state {state + 1}, E = {energies[state]}) is {weights[state]}; the Lagrangian must give a closed orbit of finite period at every state energy"));
            }
        }

        return result;
    }

    private static double[] LogEquilibrium(Deck deck, double[] energies, double[] logWeights)
    {
        var logUnnormalised = new double[energies.Length];
        for (var state = 0; state < energies.Length; state++)
        {
            logUnnormalised[state] = logWeights[state] - energies[state] / deck.KT;
            if (!double.IsFinite(logUnnormalised[state]))
            {
                throw new DeckException(
                    deck.Energies.Span,
                    string.Create(CultureInfo.InvariantCulture, $"E/kT of state '{deck.Grid.Labels[state]}' (state {state + 1}) is {energies[state] / deck.KT}, beyond double range; check the energy unit and kT"));
            }
        }

        var largest = logUnnormalised.Max();
        var sum = new NeumaierSum();
        foreach (var value in logUnnormalised)
        {
            sum.Add(Math.Exp(value - largest));
        }

        var logPartition = largest + Math.Log(sum.Value);
        return logUnnormalised.Select(value => value - logPartition).ToArray();
    }
}
