using RateDeck.Decks;
using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>Creates the explicit fixed-step propagator a deck asks for.</summary>
public static class ExplicitPropagatorChoice
{
    /// <summary>Forward Euler or RK4 on <paramref name="rates"/> with step <paramref name="dt"/>.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Unknown method, or dt not positive and finite.</exception>
    public static FixedStepPropagator Create(RateMatrix rates, ExplicitMethod method, double dt) => method switch
    {
        ExplicitMethod.Euler => new ForwardEulerPropagator(rates, dt),
        ExplicitMethod.RungeKutta4 => new RungeKutta4Propagator(rates, dt),
        _ => throw new ArgumentOutOfRangeException(nameof(method), method, "unknown explicit method"),
    };

    /// <summary>The method's short name, as on the command line and in file names: "euler" or "rk4".</summary>
    public static string MethodName(ExplicitMethod method) => method == ExplicitMethod.Euler ? "euler" : "rk4";
}
