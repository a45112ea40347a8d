namespace RateDeck.Mechanics;

/// <summary>
/// A Lagrangian model that cannot give an orbit: no potential well, an energy below its bottom or
/// above a separatrix, an integral that does not converge. The message is plain and says what to
/// change; the caller maps it to a deck error at the Lagrangian or the energies.
/// </summary>
public sealed class MechanicsException : Exception
{
    /// <summary>A problem not tied to one state.</summary>
    public MechanicsException(string message)
        : base(message)
    {
    }

    /// <summary>A problem with the state at <paramref name="stateIndex"/> (zero-based, in the order of the energies given).</summary>
    public MechanicsException(string message, int stateIndex)
        : base(message)
    {
        StateIndex = stateIndex;
    }

    /// <summary>The zero-based index of the offending state, when the problem concerns one.</summary>
    public int? StateIndex { get; }
}
