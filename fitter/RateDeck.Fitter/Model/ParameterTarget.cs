using RateDeck.Decks;
using RateDeck.Sensitivities;

namespace RateDeck.Fitting.Model;

/// <summary>
/// What a free parameter sets in a deck, through the engine's typed overrides collected by
/// <see cref="TrialDeck"/> (the deck text is not parsed again per trial): kT, a [parameters]
/// entry, a state's loss or pumping rate, a state's initial population, or one measured rate of a
/// one-way table.
/// </summary>
public abstract record ParameterTarget(string Key)
{
    /// <summary>The deck's value (the default start).</summary>
    public abstract double Read(Deck deck);

    /// <summary>Sets this value in the trial.</summary>
    public abstract void Apply(TrialDeck trial, double value);

    /// <summary>What the value is, for its analytic derivative.</summary>
    public abstract SensitivityInput Input { get; }

    /// <summary>
    /// Resolves a [fit.free] key against <paramref name="deck"/>: <c>kT</c>, a parameter name,
    /// <c>loss.LABEL</c>, <c>pumping.LABEL</c>, <c>initial.LABEL</c> or <c>rate.FROM.TO</c>.
    /// </summary>
    /// <exception cref="DeckException">The key names nothing the deck has, or a value the deck gives as an expression.</exception>
    public static ParameterTarget Resolve(string key, Deck deck, SourceSpan span)
    {
        ParameterTarget target = key switch
        {
            "kT" => new TemperatureTarget(key),
            _ when deck.Parameters.ContainsKey(key) => new DeckParameterTarget(key),
            _ when key.StartsWith("loss.", StringComparison.Ordinal) => new StateRateTarget(key, State(key[5..], deck, span), IsLoss: true),
            _ when key.StartsWith("pumping.", StringComparison.Ordinal) => new StateRateTarget(key, State(key[8..], deck, span), IsLoss: false),
            _ when key.StartsWith("initial.", StringComparison.Ordinal) => new InitialTarget(key, State(key[8..], deck, span)),
            _ when key.StartsWith("rate.", StringComparison.Ordinal) => TriangleTarget.Find(key, deck, span),
            _ => throw new DeckException(span, $"`{key}` is not something the deck can fit.{Text.Suggestions.Hint(key, deck.Parameters.Keys.Append("kT"))} A free key is kT, a [parameters] name ({(deck.Parameters.Count == 0 ? "the deck has none" : string.Join(", ", deck.Parameters.Keys))}), loss.LABEL, pumping.LABEL, initial.LABEL or rate.FROM.TO."),
        };
        try
        {
            target.Read(deck);
        }
        catch (InvalidOperationException e)
        {
            throw new DeckException(span, e.Message);
        }

        return target;
    }

    private static int State(string label, Deck deck, SourceSpan span)
    {
        var index = Array.IndexOf(deck.Grid.Labels, label);
        return index >= 0
            ? index
            : throw new DeckException(span, $"the deck has no state `{label}`.{Text.Suggestions.Hint(label, deck.Grid.Labels)}");
    }
}

/// <summary>kT in the deck's energy unit.</summary>
public sealed record TemperatureTarget(string Key) : ParameterTarget(Key)
{
    /// <inheritdoc />
    public override double Read(Deck deck) => deck.KT;

    /// <inheritdoc />
    public override void Apply(TrialDeck trial, double value) => trial.Add(DeckOverride.KT(value));

    /// <inheritdoc />
    public override SensitivityInput Input => new(SensitivityKind.Temperature);
}

/// <summary>A [parameters] entry.</summary>
public sealed record DeckParameterTarget(string Key) : ParameterTarget(Key)
{
    /// <inheritdoc />
    public override double Read(Deck deck) => deck.Parameters[Key].Value;

    /// <inheritdoc />
    public override void Apply(TrialDeck trial, double value) => trial.Add(DeckOverride.Parameter(Key, value));

    /// <inheritdoc />
    public override SensitivityInput Input => new(SensitivityKind.Parameter, Key);
}

/// <summary>One state's loss or pumping rate, where the deck gives them per state (values or by_state).</summary>
public sealed record StateRateTarget(string Key, int State, bool IsLoss) : ParameterTarget(Key)
{
    /// <inheritdoc />
    public override double Read(Deck deck) => Values(deck)[State];

    /// <inheritdoc />
    public override void Apply(TrialDeck trial, double value) => trial.PerState(IsLoss ? "losses" : "pumping", Values)[State] = value;

    /// <inheritdoc />
    public override SensitivityInput Input => new(IsLoss ? SensitivityKind.StateLoss : SensitivityKind.StatePumping, Index: State);

    private double[] Values(Deck deck) => (IsLoss ? deck.Losses : deck.Pumping) switch
    {
        null => new double[deck.Grid.Count],
        PerStateValues given => given.Values,
        _ => throw new InvalidOperationException($"the deck gives its {(IsLoss ? "losses" : "pumping")} as an expression, so `{Key}` cannot be set alone; put a [parameters] entry in the expression and fit that"),
    };
}

/// <summary>One state's initial population, where the deck gives P(0) per state or as one state.</summary>
public sealed record InitialTarget(string Key, int State) : ParameterTarget(Key)
{
    /// <inheritdoc />
    public override double Read(Deck deck) => Values(deck)[State];

    /// <inheritdoc />
    public override void Apply(TrialDeck trial, double value) => trial.PerState("initial", Values)[State] = value;

    /// <inheritdoc />
    public override SensitivityInput Input => new(SensitivityKind.StateInitial, Index: State);

    private double[] Values(Deck deck) => deck.Initial switch
    {
        InitialInState single => [.. Enumerable.Range(0, deck.Grid.Count).Select(k => k == single.State ? 1.0 : 0.0)],
        InitialGiven { Source: PerStateValues given } => given.Values,
        _ => throw new InvalidOperationException($"the deck gives P(0) as an expression or the equilibrium, so `{Key}` cannot be set alone; give [initial] values = [...] or put a [parameters] entry in the expression and fit that"),
    };
}

/// <summary>One measured rate (from, to) of a one-way table, completed by detailed balance as usual.</summary>
public sealed record TriangleTarget(string Key, int Entry) : ParameterTarget(Key)
{
    /// <summary>The key of a measured entry: rate.FROM.TO with state labels.</summary>
    public static string KeyOf(RateEntry entry, Deck deck) => $"rate.{deck.Grid.Labels[entry.From]}.{deck.Grid.Labels[entry.To]}";

    /// <summary>Finds the measured entry a rate.FROM.TO key names.</summary>
    public static TriangleTarget Find(string key, Deck deck, SourceSpan span)
    {
        if (deck.Coupling is not MeasuredOneWay oneWay)
        {
            throw new DeckException(span, $"`{key}` names a measured rate, but the deck's [transfer] is not a one-way measured table (kind = \"one_way\")");
        }

        for (var k = 0; k < oneWay.Entries.Count; k++)
        {
            if (KeyOf(oneWay.Entries[k], deck) == key)
            {
                return new TriangleTarget(key, k);
            }
        }

        throw new DeckException(span, $"the measured table has no rate `{key}`; write rate.FROM.TO with two state labels of a measured pair, like {KeyOf(oneWay.Entries[0], deck)}");
    }

    /// <inheritdoc />
    public override double Read(Deck deck) => ((MeasuredOneWay)deck.Coupling).Entries[Entry].Rate;

    /// <inheritdoc />
    public override SensitivityInput Input => new(SensitivityKind.MeasuredRate, Index: Entry);

    /// <inheritdoc />
    public override void Apply(TrialDeck trial, double value)
    {
        var entries = trial.Measured((MeasuredOneWay)trial.Base.Coupling);
        entries[Entry] = entries[Entry] with { Rate = value };
    }
}
