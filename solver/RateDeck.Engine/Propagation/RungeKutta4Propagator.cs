using RateDeck.Rates;

namespace RateDeck.Propagation;

/// <summary>
/// The classical fourth-order Runge-Kutta method: fourth order; stable along the negative real
/// axis for dt rho up to <see cref="Diagnostics.StepLimits.Rk4RealAxisLimit"/>.
/// </summary>
public sealed class RungeKutta4Propagator : FixedStepPropagator
{
    /// <summary>Sets up RK4 with step <paramref name="dt"/> on K and s of <paramref name="rates"/>.</summary>
    public RungeKutta4Propagator(RateMatrix rates, double dt)
        : base(rates, dt, "rk4", "classical Runge-Kutta (fourth order)", workVectorCount: 5)
    {
    }

    /// <inheritdoc />
    protected override void Step(double[] p, double h, double[][] work)
    {
        var (k1, k2, k3, k4, stage) = (work[0], work[1], work[2], work[3], work[4]);
        EvaluateDerivative(p, k1);
        Combine(stage, p, 0.5 * h, k1);
        EvaluateDerivative(stage, k2);
        Combine(stage, p, 0.5 * h, k2);
        EvaluateDerivative(stage, k3);
        Combine(stage, p, h, k3);
        EvaluateDerivative(stage, k4);
        var sixth = h / 6.0;
        for (var i = 0; i < p.Length; i++)
        {
            p[i] += sixth * (k1[i] + 2.0 * (k2[i] + k3[i]) + k4[i]);
        }
    }

    private static void Combine(double[] target, double[] p, double h, double[] slope)
    {
        for (var i = 0; i < p.Length; i++)
        {
            target[i] = p[i] + h * slope[i];
        }
    }
}
