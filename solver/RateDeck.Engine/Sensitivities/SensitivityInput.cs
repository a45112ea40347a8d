namespace RateDeck.Sensitivities;

/// <summary>What a free value of a fit is, for its derivative (<see cref="GeneratorDerivatives.Of"/>).</summary>
public enum SensitivityKind
{
    /// <summary>kT.</summary>
    Temperature,

    /// <summary>A [parameters] entry, by <see cref="SensitivityInput.Name"/>.</summary>
    Parameter,

    /// <summary>The loss rate of the state <see cref="SensitivityInput.Index"/>.</summary>
    StateLoss,

    /// <summary>The pumping rate of the state <see cref="SensitivityInput.Index"/>.</summary>
    StatePumping,

    /// <summary>The initial population of the state <see cref="SensitivityInput.Index"/> (a deck giving P(0) per state).</summary>
    StateInitial,

    /// <summary>The measured one-way rate at entry <see cref="SensitivityInput.Index"/> of the rate table.</summary>
    MeasuredRate,
}

/// <summary>One value a trajectory is differentiated by.</summary>
/// <param name="Kind">What it is.</param>
/// <param name="Name">The parameter's name for <see cref="SensitivityKind.Parameter"/>.</param>
/// <param name="Index">The state or the rate entry, where the kind has one.</param>
public sealed record SensitivityInput(SensitivityKind Kind, string? Name = null, int Index = -1)
{
    /// <summary>The name expressions know the value by (kT or the parameter), or null for a per-state or per-entry value.</summary>
    public string? ExpressionName => Kind switch
    {
        SensitivityKind.Temperature => "kT",
        SensitivityKind.Parameter => Name,
        _ => null,
    };
}
