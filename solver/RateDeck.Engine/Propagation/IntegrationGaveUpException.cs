namespace RateDeck.Propagation;

/// <summary>
/// Thrown when an integrator reaches its step limit before the last output time
/// (<see cref="ImplicitSdirkPropagator.MaxSteps"/>): the deck cannot be finished on that path with
/// these output times, which is no bug, and no population of the unfinished run is handed out.
/// The message says what gave up, at which time and after how many steps.
/// </summary>
public sealed class IntegrationGaveUpException : Exception
{
    /// <summary>Creates the exception with a plain one-line message.</summary>
    public IntegrationGaveUpException(string message) : base(message) { }
}
