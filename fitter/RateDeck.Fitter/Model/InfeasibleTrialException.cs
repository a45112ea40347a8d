namespace RateDeck.Fitting.Model;

/// <summary>
/// A trial the model cannot evaluate (a rate turned negative, kT at zero, the fixed propagator
/// refusing); the optimizer rejects the trial. The message says what went wrong.
/// </summary>
public sealed class InfeasibleTrialException : Exception
{
    /// <summary>Creates the exception around the model's own complaint.</summary>
    public InfeasibleTrialException(string message, Exception inner) : base(message, inner) { }
}
