namespace RateDeck.Mechanics;

/// <summary>Settings for <see cref="LagrangianMechanics.Derive"/>; the defaults suit a well near q = 0 of size about 1.</summary>
public sealed record MechanicsOptions
{
    /// <summary>
    /// Low end of the interval where the search for the minimum of the potential U(q) = -L(q, 0)
    /// starts (default -1). The search walks downhill from it, so it picks the well nearest this
    /// interval; half the interval's width is also the first step of the outward turning-point search.
    /// </summary>
    public double SearchLow { get; init; } = -1;

    /// <summary>High end of the starting interval (default 1).</summary>
    public double SearchHigh { get; init; } = 1;

    /// <summary>
    /// A typical |v| of the motion, the floor of the differentiation step near the turning points.
    /// Null (default): taken per orbit as the largest |v| at the bottom of the well.
    /// </summary>
    public double? VelocityScale { get; init; }

    /// <summary>
    /// Relative change between successive Gauss-Legendre rules (n and 2n nodes) below which the
    /// action and the period are accepted (default 1e-11). Geometric convergence makes the error of
    /// the accepted rule far smaller than this change on smooth wells.
    /// </summary>
    public double RelativeTolerance { get; init; } = 1e-11;

    /// <summary>
    /// Largest Gauss-Legendre rule tried on each side of the minimum (default 8192, at least 64);
    /// a rule of n nodes evaluates the orbit at n/2 points, the integrand being even.
    /// </summary>
    public int MaxNodes { get; init; } = 8192;

    /// <summary>
    /// Largest estimated relative error accepted for J and T (default 1e-6). When rounding keeps the
    /// quadrature from reaching <see cref="RelativeTolerance"/> (L holding a constant much larger than
    /// the depth of the well, or an orbit near a separatrix) the result is kept at its rounding floor
    /// up to this limit, and refused beyond it.
    /// </summary>
    public double MaxRelativeError { get; init; } = 1e-6;
}
