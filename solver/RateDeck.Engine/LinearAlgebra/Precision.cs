namespace RateDeck.LinearAlgebra;

/// <summary>The working precision and the tolerances derived from it, one home for every stage.</summary>
public static class Precision
{
    /// <summary>Unit roundoff of IEEE double, 2^-52 (not <see cref="double.Epsilon"/>, the smallest subnormal).</summary>
    public const double MachineEpsilon = 2.220446049250313e-16;

    /// <summary>The zero-eigenvalue tolerance is this factor times N times machine epsilon times rho.</summary>
    public const double ZeroEigenvalueFactor = 100;

    /// <summary>
    /// An eigenvalue of a generator counts as zero when |lambda| &lt;= <see cref="ZeroEigenvalueFactor"/>
    /// * N * eps * rho, in the diagnostics (null space, slowest rate) and in the propagators (which set
    /// such eigenvalues to exactly zero, so that the total population does not drift like exp(lambda t)
    /// over long runs). A backward-stable eigen-solver returns the exact eigenvalues of K + E with
    /// ||E|| of order p(N) eps ||K|| for a modest polynomial p (Golub and Van Loan, Matrix Computations,
    /// 4th ed., sec. 7.5.6 and 8.3, from memory); on the symmetric path ||S||_2 = rho and Weyl's
    /// theorem bounds every eigenvalue's shift by ||E||_2. The zero eigenvalue of a generator is well
    /// conditioned (its left eigenvector is the vector of ones, condition at most sqrt N). Taking
    /// p(N) = 100 N leaves two decades of margin; a mode slower than this tolerance cannot be told
    /// from zero at working precision.
    /// </summary>
    public static double ZeroEigenvalueTolerance(double spectralRadius, int count) =>
        ZeroEigenvalueFactor * Math.Max(count, 1) * MachineEpsilon * spectralRadius;

    /// <summary>
    /// The propagators' resolution relative to the total population is this factor times machine
    /// epsilon (1.1e-15): see <see cref="PopulationResolution"/>.
    /// </summary>
    public const double PopulationResolutionFactor = 5;

    /// <summary>
    /// The smallest population a propagated result resolves when the run's largest total population
    /// is <paramref name="largestTotal"/>: <see cref="PopulationResolutionFactor"/> * eps * total,
    /// about 1e-15 of the total. Each population is a sum over modes or steps whose terms are of the
    /// order of the total, so its rounding error is a few eps times the total whatever its own size
    /// (measured on the cascade demo: states that are empty in exact arithmetic read up to 1.6e-16 at
    /// a total of 3.2, i.e. 5e-17 of the total; the factor leaves a decade of margin). A smaller
    /// value cannot be told from zero and is not shown as data.
    /// </summary>
    public static double PopulationResolution(double largestTotal) =>
        PopulationResolutionFactor * MachineEpsilon * Math.Abs(largestTotal);
}
