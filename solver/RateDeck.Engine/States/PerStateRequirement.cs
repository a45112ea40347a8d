namespace RateDeck.States;

/// <summary>What every value of a per-state quantity must satisfy.</summary>
public enum PerStateRequirement
{
    /// <summary>Finite (an energy).</summary>
    Finite,
    /// <summary>Finite and zero or more (a loss or pumping rate, a population).</summary>
    NonNegative,
    /// <summary>Finite and more than zero (a statistical weight).</summary>
    Positive,
}
