using RateDeck.Decks;
using RateDeck.Pipeline;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Sensitivities;

/// <summary>
/// The derivative of an assembled deck with respect to one input, from its expression trees
/// (symbolic derivatives, <see cref="Expressions.ExpressionCompiler.CompileDerivative"/>) and the
/// detailed-balance completion, without assembling the deck again:
/// <list type="bullet">
/// <item>ln pi_i = ln g_i - E_i / kT - ln Z, so d ln pi_i = d ln g_i - dE_i / kT + E_i dkT / kT^2
/// minus its pi-weighted mean (the normalisation);</item>
/// <item>a given rate r (measured one way, or the kernel in its direction) changes by dr; its
/// completed partner r pi_from / pi_to by itself times (dr / r + d ln pi_from - d ln pi_to);</item>
/// <item>the diagonal by minus the column's changes and the change of the loss; pumping, P(0)
/// (per state, an expression, or pi itself for an equilibrium start) by their own derivatives.</item>
/// </list>
/// Refused (<see cref="NotSupportedException"/>, with the reason) where the result would need
/// what is not differentiated here: rates taken as given (kind = "full"), weights from the
/// mechanics when the Lagrangian reads the input or the energies move with it, and expressions
/// through min, max or gamma. The caller then uses central differences for that input.
/// </summary>
public static class GeneratorDerivatives
{
    /// <summary>The derivative of <paramref name="loaded"/>'s K, s, P(0) and ln pi with respect to <paramref name="input"/>.</summary>
    /// <exception cref="NotSupportedException">The derivative is not formed analytically here; the message says why.</exception>
    public static GeneratorDerivative Of(LoadedDeck loaded, SensitivityInput input)
    {
        ArgumentNullException.ThrowIfNull(loaded);
        ArgumentNullException.ThrowIfNull(input);
        var (deck, states, rates) = (loaded.Deck, loaded.States, loaded.Rates);
        if (rates.Origin != BalanceOrigin.CompletedByDetailedBalance)
        {
            throw new NotSupportedException("the rates are taken as given (kind = \"full\"), not completed by detailed balance");
        }

        var n = states.Count;
        var name = input.ExpressionName;
        var logPi = LogEquilibriumChange(deck, states, input, name);
        var generator = new double[n * n];
        var direction = deck.Coupling switch
        {
            MeasuredOneWay oneWay => oneWay.Direction,
            KernelModel kernel => kernel.Direction,
            _ => throw new NotSupportedException($"no derivative for the coupling {deck.Coupling.GetType().Name}"),
        };
        var given = GivenRateChange(deck, input, name);
        var coordinates = states.Coordinates;
        bool Given(int to, int from) => direction == TransferDirection.TowardSmaller ? coordinates[to] < coordinates[from] : coordinates[to] > coordinates[from];
        if (given is not null)
        {
            rates.ForEachOffDiagonal((to, from, _) =>
            {
                if (Given(to, from))
                {
                    generator[(from * n) + to] = given(from, to);
                }
            });
        }

        // Each completed entry K[from, to] = r pi_from / pi_to follows its given partner r = K[to, from].
        rates.ForEachOffDiagonal((row, column, value) =>
        {
            if (value != 0 && !Given(row, column))
            {
                var partner = Entry(rates, column, row);
                var relative = partner > 0 ? generator[(row * n) + column] / partner : 0;
                generator[(column * n) + row] = value * (relative + logPi[row] - logPi[column]);
            }
        });

        var loss = PerStateChange(deck, deck.Losses, input, SensitivityKind.StateLoss, name);
        for (var column = 0; column < n; column++)
        {
            var outflow = 0.0;
            for (var row = 0; row < n; row++)
            {
                outflow += row == column ? 0 : generator[(column * n) + row];
            }

            generator[(column * n) + column] = -outflow - loss[column];
        }

        var pumping = PerStateChange(deck, deck.Pumping, input, SensitivityKind.StatePumping, name);
        var initial = deck.Initial switch
        {
            InitialEquilibrium => [.. states.LogEquilibrium.Select((l, i) => Math.Exp(l) * logPi[i])],
            InitialGiven givenInitial => PerStateChange(deck, givenInitial.Source, input, SensitivityKind.StateInitial, name),
            _ => new double[n],
        };
        return new GeneratorDerivative(generator, pumping, initial, logPi);
    }

    /// <summary>d ln pi_i: of ln g_i - E_i / kT, less its pi-weighted mean (ln Z).</summary>
    private static double[] LogEquilibriumChange(Deck deck, StateSpace states, SensitivityInput input, string? name)
    {
        var n = states.Count;
        var change = new double[n];
        if (name is null)
        {
            return change;
        }

        var energy = PerStateEvaluator.Derivative(deck, deck.Energies, name);
        var weight = deck.Weights switch
        {
            GivenWeights given => PerStateEvaluator.Derivative(deck, given.Source, name),
            MechanicsWeights when energy is not null => throw new NotSupportedException($"the weights come from the mechanics at the state energies, which {name} moves"),
            MechanicsWeights when StageInputs.ReadBy(deck).TryGetValue("mechanics", out var read) && read.Contains(name) => throw new NotSupportedException($"the Lagrangian reads {name}, and the mechanics is not differentiated"),
            _ => null,
        };
        var kT = deck.KT;
        var mean = new NeumaierSum();
        for (var i = 0; i < n; i++)
        {
            change[i] = ((weight?[i] ?? 0) * Math.Exp(-states.LogWeights[i]))
                - ((energy?[i] ?? 0) / kT)
                + (input.Kind == SensitivityKind.Temperature ? states.Energies[i] / (kT * kT) : 0);
            mean.Add(Math.Exp(states.LogEquilibrium[i]) * change[i]);
        }

        return [.. change.Select(c => c - mean.Value)];
    }

    /// <summary>d r(from -> to) for the given (not completed) rates, or null when the input moves none.</summary>
    private static Func<int, int, double>? GivenRateChange(Deck deck, SensitivityInput input, string? name)
    {
        switch (deck.Coupling)
        {
            case MeasuredOneWay oneWay when input.Kind == SensitivityKind.MeasuredRate:
                var entry = oneWay.Entries[input.Index];
                return (from, to) => from == entry.From && to == entry.To ? 1 : 0;
            case KernelModel kernel when name is not null:
                var derivative = RateMatrixAssembler.KernelDerivative(kernel, deck, name);
                if (derivative is null)
                {
                    return null;
                }

                var coordinates = deck.Grid.Coordinates;
                return (from, to) => derivative(coordinates[from], coordinates[to], from, to);
            default:
                return null;
        }
    }

    /// <summary>The change of a per-state table (losses, pumping, P(0) given per state) under the input.</summary>
    private static double[] PerStateChange(Deck deck, PerStateSource? source, SensitivityInput input, SensitivityKind own, string? name)
    {
        var change = new double[deck.Grid.Count];
        if (input.Kind == own)
        {
            change[input.Index] = 1;
        }
        else if (name is not null && source is not null && PerStateEvaluator.Derivative(deck, source, name) is { } derivative)
        {
            change = derivative;
        }

        return change;
    }

    private static double Entry(RateMatrix rates, int row, int column) => rates.Sparse is { } sparse ? sparse[row, column] : rates.Generator[row, column];
}
