namespace RateDeck.Fitting;

/// <summary>
/// The fitter wraps the solver pipeline (deck -> state space -> rate matrix -> propagators) to fit
/// kT or model parameters to measured time series. Its methods arrive with the fitting work.
/// </summary>
public static class FitterInfo
{
    /// <summary>The solver assembly the fitter drives, for version reporting.</summary>
    public static string SolverVersion => typeof(RateDeck.Decks.Deck).Assembly.GetName().Version?.ToString() ?? "unknown";
}
