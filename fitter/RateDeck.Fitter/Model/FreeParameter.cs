using RateDeck.Fitting.Setup;

namespace RateDeck.Fitting.Model;

/// <summary>
/// A free parameter: its key, what it sets, its start and bounds, and the optimizer's variable
/// u = ln(value) for a log parameter, u = value otherwise.
/// </summary>
/// <param name="Spec">As written in [fit.free] (or made by triangle mode).</param>
/// <param name="Target">What it sets in the deck.</param>
/// <param name="Start">The start value.</param>
public sealed record FreeParameter(FreeParameterSpec Spec, ParameterTarget Target, double Start)
{
    /// <summary>The name reported (the key).</summary>
    public string Name => Spec.Key;

    /// <summary>The optimizer's variable of <paramref name="value"/>.</summary>
    public double ToVariable(double value) => Spec.Log ? Math.Log(value) : value;

    /// <summary>The value of the optimizer's variable <paramref name="u"/>.</summary>
    public double FromVariable(double u) => Spec.Log ? Math.Exp(u) : u;

    /// <summary>d value / d u at <paramref name="value"/>: the value itself for a log parameter, 1 otherwise.</summary>
    public double Derivative(double value) => Spec.Log ? value : 1.0;

    /// <summary>The lower bound in the optimizer's variable (ln 0 = -infinity).</summary>
    public double LowerVariable => Spec.Log ? (Spec.Lower > 0 ? Math.Log(Spec.Lower) : double.NegativeInfinity) : Spec.Lower;

    /// <summary>The upper bound in the optimizer's variable.</summary>
    public double UpperVariable => Spec.Log ? Math.Log(Spec.Upper) : Spec.Upper;
}
