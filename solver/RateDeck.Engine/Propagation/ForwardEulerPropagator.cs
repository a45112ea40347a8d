using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// Forward Euler, P += h (K P + s): first order; stable on a real negative spectrum for
/// dt &lt;= 2 / rho and positivity-preserving for dt &lt;= 1 / max |K_ii| (SPEC 2).
/// </summary>
public sealed class ForwardEulerPropagator : FixedStepPropagator
{
    /// <summary>Sets up forward Euler with step <paramref name="dt"/> on K and s of <paramref name="rates"/>.</summary>
    public ForwardEulerPropagator(RateMatrix rates, double dt)
        : base(rates, dt, "euler", "forward Euler (first order)", workVectorCount: 1)
    {
    }

    /// <inheritdoc />
    protected override void Step(double[] p, double h, double[][] work)
    {
        var derivative = work[0];
        EvaluateDerivative(p, derivative);
        for (var i = 0; i < p.Length; i++)
        {
            p[i] += h * derivative[i];
        }
    }
}
