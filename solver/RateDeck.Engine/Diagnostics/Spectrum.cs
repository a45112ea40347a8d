using System.Numerics;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>Which eigen-solver produced a <see cref="Spectrum"/>.</summary>
public enum SpectrumPath
{
    /// <summary>Symmetric eigen-decomposition of S = D^(-1/2) K D^(1/2): detailed balance holds for the deck's pi, eigenvalues are real.</summary>
    Symmetrized,

    /// <summary>General eigen-decomposition of K itself: detailed balance fails or is not established.</summary>
    General,
}

/// <summary>How much of the spectrum <see cref="Spectrum.Compute(RateMatrix, ILinearAlgebra, BalanceReport, SpectrumExtent)"/> computes.</summary>
public enum SpectrumExtent
{
    /// <summary>Every eigenvalue up to <see cref="Spectrum.FullSpectrumStateLimit"/> states; above it, for a tridiagonal sparse S, the extremes only.</summary>
    Automatic,

    /// <summary>Every eigenvalue, whatever N.</summary>
    Full,

    /// <summary>The extremes only whatever N, where S is sparse and tridiagonal (every eigenvalue otherwise).</summary>
    Extremes,
}

/// <summary>
/// The eigenvalues of K, computed once, with the facts every later stage asks for: spectral
/// radius, null space, slowest decay and the path taken.
/// Zero tolerance: <see cref="Precision.ZeroEigenvalueTolerance"/> (a mode slower than it cannot be
/// told from zero at working precision, and the null space then counts it).
/// </summary>
public sealed class Spectrum
{
    /// <summary>
    /// A closed class carries a null vector when some null-space basis vector has at least this
    /// squared 2-norm on the class (of 1 in total). An orthonormal basis of m null vectors gives
    /// each loss-free class at least 1/m; a leaking class gets only rounding, of order eps^2.
    /// </summary>
    public const double NullWeightFloor = 1e-6;

    /// <summary>
    /// The slow modes count as resolved while N eps rho / (slowest rate) is at most this: the
    /// slowest rate then carries at most about this relative error (a backward-stable solver's
    /// absolute error is of order N eps rho, Golub and Van Loan as above).
    /// </summary>
    public const double SlowModeTolerance = 1e-10;

    /// <summary>
    /// The tolerance of <see cref="SlowModeTolerance"/> for a spectrum computed in double-double,
    /// which is taken only when double failed: its slowest rate is reported unless its relative
    /// error bound exceeds this (the accuracy the stiff-deck tests ask of slow rates).
    /// </summary>
    public const double ExtendedSlowModeTolerance = 1e-8;

    /// <summary>
    /// Largest N decomposed in double-double when the double spectrum cannot resolve the slow modes
    /// (<see cref="ExtendedSymmetricEigen"/>, about 60 N^3 operations a sweep: 0.3 s at N = 80 on
    /// one core of the bench machine, docs/stiff-decks.md). Larger decks propagate by the implicit
    /// integrator instead and report their slow rates as unresolved.
    /// </summary>
    public const int ExtendedPrecisionStateLimit = 120;

    /// <summary>
    /// Above this many states a sparse tridiagonal S gets the extremes of its spectrum only
    /// (<see cref="SpectrumExtent.Automatic"/>): all N eigenvalues cost O(N^2) operations (1 s
    /// natively at 10,000 states and 4.2 s at 20,000, docs/performance.md; twice that managed),
    /// while every stage after the spectrum needs only the spectral radius, the slowest rates and
    /// the zero count, which bisection gives in O(N) each.
    /// </summary>
    public const int FullSpectrumStateLimit = 10_000;

    /// <summary>Fastest and slowest decaying modes computed on the extremes-only path, each (the slow-mode iteration uses as many vectors).</summary>
    public const int ExtremeModeCount = Diagnostics.SlowModes.Vectors;

    /// <summary>The extremes-only path computes at most this many eigenvalues; a spectrum with more zero modes than leave room for the extremes is computed whole.</summary>
    public const int MaxExtremeModes = 4 * ExtremeModeCount;

    /// <summary>Inverse-iteration steps for a null vector of a sparse S (see <see cref="ComputeBand"/>).</summary>
    private const int _inverseIterations = 8;

    private readonly double[] _logEquilibrium;
    private readonly RateMatrix _rates;
    private readonly double? _solverSlowest;
    private SlowModeReport? _slowModes;
    private readonly double[][] _nullBasis;
    private readonly int _nullDimension;

    private Spectrum(RateMatrix rates, SpectrumPath path, string reason, Complex[] raw, SymmetricEigenDecomposition? symmetric, GeneralEigenDecomposition? general, double[][]? nullBasis = null, ExtendedSymmetricEigenDecomposition? extended = null, PartialSpectrum? partial = null)
    {
        _logEquilibrium = rates.States.LogEquilibrium;
        _rates = rates;
        Path = path;
        PathReason = reason;
        Symmetric = symmetric;
        General = general;
        Extended = extended;
        var order = Enumerable.Range(0, raw.Length).OrderBy(c => raw[c].Real).ThenBy(c => raw[c].Imaginary).ToArray();
        Values = [.. order.Select(c => raw[c])];
        Eigenvalues = [.. Values.Select(v => v.Real)];
        ModeCount = partial?.ModeCount ?? raw.Length;
        ModeNumbers = partial is null ? [.. Enumerable.Range(1, raw.Length)] : [.. order.Select(c => partial.ModeNumbers[c])];
        Coverage = partial?.Coverage;
        SpectralRadius = raw.Length == 0 ? 0 : raw.Max(Complex.Abs);
        var epsilon = extended is null ? Precision.MachineEpsilon : 2 * DoubleDouble.Epsilon;
        AbsoluteAccuracy = partial?.AbsoluteAccuracy ?? raw.Length * epsilon * SpectralRadius;
        ZeroTolerance = Precision.ZeroEigenvalueFactor * AbsoluteAccuracy;
        var nullColumns = Enumerable.Range(0, raw.Length).Where(c => Complex.Abs(raw[c]) <= ZeroTolerance).ToList();
        _nullDimension = nullColumns.Count;
        _nullBasis = nullBasis ?? [.. nullColumns.Select(c => RealNullVector(symmetric, general, c))];
        var decaying = raw.Where(v => Complex.Abs(v) > ZeroTolerance && -v.Real > ZeroTolerance).ToList();
        NonDecayingCount = raw.Length - nullColumns.Count - decaying.Count;
        MaxImaginaryPart = raw.Length == 0 ? 0 : raw.Max(v => Math.Abs(v.Imaginary));
        StructuralNullDimension = TransitionGraph.Classify(rates).LossFreeCount;
        var slowest = decaying.Count == 0 ? (double?)null : decaying.Min(v => -v.Real);
        if (_nullDimension > StructuralNullDimension)
        {
            Unresolved = $"{Format.Count(_nullDimension, "eigenvalue is", "eigenvalues are")} zero to the solver's accuracy ({AccuracyName} = {Format.Rate(AbsoluteAccuracy, rates.TimeUnit)}) where the structure has {Format.Count(StructuralNullDimension, "closed class", "closed classes")} without loss: {Format.Count(_nullDimension - StructuralNullDimension, "slow mode is", "slow modes are")} lost in rounding";
        }
        else if (_nullDimension < StructuralNullDimension)
        {
            Unresolved = $"only {Format.Count(_nullDimension, "eigenvalue is", "eigenvalues are")} zero to the solver's accuracy where the structure has {Format.Count(StructuralNullDimension, "closed class", "closed classes")} without loss";
        }
        else if (slowest is { } rate && AbsoluteAccuracy / rate > (extended is null ? SlowModeTolerance : ExtendedSlowModeTolerance))
        {
            Unresolved = $"the slowest rate {Format.Rate(rate, rates.TimeUnit)} is only {Format.Number(rate / AbsoluteAccuracy)} times the solver's absolute accuracy {AccuracyName} = {Format.Rate(AbsoluteAccuracy, rates.TimeUnit)}, so it carries a relative error up to {Format.Number(AbsoluteAccuracy / rate)}";
        }

        // A slowest rate read from a spectrum that lost modes to rounding would be a faster mode's.
        _solverSlowest = _nullDimension > StructuralNullDimension ? null : slowest;
    }

    /// <summary>The path taken.</summary>
    public SpectrumPath Path { get; }

    /// <summary>Why that path was taken, one line.</summary>
    public string PathReason { get; }

    /// <summary>
    /// The eigenvalues computed, sorted by real part ascending (most negative first), then
    /// imaginary part: all of them, or on the extremes-only path (<see cref="IsPartial"/>) the
    /// fastest and slowest modes and every zero, whose places in the whole spectrum are
    /// <see cref="ModeNumbers"/>.
    /// </summary>
    public Complex[] Values { get; }

    /// <summary>N: the number of eigenvalues of K, computed or not.</summary>
    public int ModeCount { get; }

    /// <summary>For each entry of <see cref="Values"/> its mode number: its place, from 1, in the whole spectrum sorted as <see cref="Values"/> is.</summary>
    public int[] ModeNumbers { get; }

    /// <summary>Null when every eigenvalue was computed; else one line saying which modes <see cref="Values"/> holds and why only those.</summary>
    public string? Coverage { get; }

    /// <summary>True when <see cref="Values"/> holds only the extremes of the spectrum (<see cref="Coverage"/> says which).</summary>
    public bool IsPartial => Coverage is not null;

    /// <summary>Real parts of <see cref="Values"/>, in the same order (ascending).</summary>
    public double[] Eigenvalues { get; }

    /// <summary>rho = max |lambda|.</summary>
    public double SpectralRadius { get; }

    /// <summary>Eigenvalues with |lambda| at or below this count as zero: <see cref="Precision.ZeroEigenvalueTolerance"/>.</summary>
    public double ZeroTolerance { get; }

    /// <summary>Number of zero eigenvalues within <see cref="ZeroTolerance"/>.</summary>
    public int NullDimension => _nullDimension;

    /// <summary>
    /// The null-space dimension the structure implies: the number of closed classes without loss
    /// (<see cref="TransitionGraph"/>, from which pairs carry a rate). A generator has exactly this
    /// many zero eigenvalues; a numerical count that differs means slow modes were lost in rounding.
    /// </summary>
    public int StructuralNullDimension { get; }

    /// <summary>
    /// The absolute accuracy of the eigenvalues on the path taken: N u rho for a whole-spectrum
    /// solver, u = 2^-52 in double or 2^-103 in double-double; c u ||S||_inf for the bisection of the
    /// extremes-only path (<see cref="TridiagonalBisection.AccuracyFactor"/>).
    /// </summary>
    public double AbsoluteAccuracy { get; }

    /// <summary>How <see cref="AbsoluteAccuracy"/> is formed, for messages.</summary>
    private string AccuracyName => IsPartial ? Invariant($"{TridiagonalBisection.AccuracyFactor} eps ||S||_inf") : "N eps rho";

    /// <summary>
    /// Null when the spectrum resolves every mode (its zero count matches <see cref="StructuralNullDimension"/>
    /// and the slowest rate is above <see cref="AbsoluteAccuracy"/> / <see cref="SlowModeTolerance"/>);
    /// else one line saying what is not resolved. Propagators built on such a spectrum are not trusted.
    /// </summary>
    public string? Unresolved { get; }

    /// <summary>True when <see cref="Unresolved"/> is null.</summary>
    public bool IsResolved => Unresolved is null;

    /// <summary>
    /// True when the zero count differs from <see cref="StructuralNullDimension"/>: modes were lost
    /// in rounding (or a null mode was not found), so no eigen path built on this spectrum is
    /// trusted. A spectrum may be unresolved only in the relative accuracy of its slowest rate
    /// and still serve propagation over a short enough horizon (<see cref="Propagation.ExactPropagatorChoice.HorizonTolerance"/>).
    /// </summary>
    public bool LostModes => _nullDimension != StructuralNullDimension;

    /// <summary>
    /// The double-double decomposition of S when the double one could not resolve the slow modes
    /// (see <see cref="Compute(RateMatrix, ILinearAlgebra, BalanceReport, SpectrumExtent)"/>); else null.
    /// </summary>
    public ExtendedSymmetricEigenDecomposition? Extended { get; }

    /// <summary>Why the double-double decomposition, tried because the double one could not resolve the slow modes, failed too; else null.</summary>
    public string? ExtendedFailure { get; private init; }

    /// <summary>
    /// Decay rate of the slowest decaying mode: -Re(lambda) of the slowest mode beyond the zero
    /// tolerance when the spectrum is resolved; else the accurate one of <see cref="SlowModes"/>.
    /// Null when no mode decays, or when the spectrum is unresolved and the slow modes could not be
    /// computed (a rate read from rounding is never given).
    /// </summary>
    public double? SlowestRate => IsResolved ? _solverSlowest : SlowModes!.SlowestRate;

    /// <summary>The slowest rate as the eigen-solver gave it (null when it lost modes), whether or not it is resolved: the scale of its null vectors' perturbation.</summary>
    internal double? SolverSlowestRate => _solverSlowest;

    /// <summary>
    /// The slowest modes computed to high relative accuracy (<see cref="Diagnostics.SlowModes"/>)
    /// when this spectrum cannot resolve them (<see cref="Unresolved"/>); null when it can.
    /// Computed on first use.
    /// </summary>
    public SlowModeReport? SlowModes => IsResolved ? null : _slowModes ??= Diagnostics.SlowModes.Compute(_rates, Path == SpectrumPath.Symmetrized);

    /// <summary>
    /// One line for the summaries on how the slow rates were obtained when the spectrum cannot
    /// resolve them: the path and the slowest rate, or why they are not resolved; null when the
    /// spectrum resolves them.
    /// </summary>
    public string? SlowModeLine => SlowModes switch
    {
        null => null,
        { Converged: true, Modes.Count: > 0 } found => $"{found.Description}: slowest rate {Format.Rate(found.Modes[0].Rate.Real, _rates.TimeUnit)} (relative error bound {Format.Number(found.Modes[0].ErrorBound)}){(found.Modes.Count > 1 ? $", {Format.Count(found.Modes.Count, "slow mode", "slow modes")} to {Format.Rate(found.Modes[^1].Rate.Real, _rates.TimeUnit)}" : "")}, because in double {Unresolved}",
        { Converged: true } => $"{SlowModes.Description}: no mode decays",
        { Failure: var failure } => $"not resolved: {failure}; in double {Unresolved}",
    };

    /// <summary>
    /// <see cref="Values"/> as a report may print them: when the spectrum is unresolved, the
    /// structural null modes are exactly zero, the slowest modes next to them are those of
    /// <see cref="SlowModes"/> (in sorted order the k slowest computed eigenvalues stand for the k
    /// slowest true ones: each moves by at most N eps rho, Weyl's theorem for the symmetric case),
    /// and a remaining value within <see cref="ZeroTolerance"/> of zero, which is rounding and no
    /// rate, is NaN. Equal to <see cref="Values"/> when the spectrum is resolved.
    /// </summary>
    public Complex[] ReportedValues
    {
        get
        {
            if (IsResolved)
            {
                return Values;
            }

            var values = (Complex[])Values.Clone();
            var n = values.Length;
            var zeros = Math.Min(n, StructuralNullDimension);
            var modes = SlowModes!.Converged ? SlowModes.Modes.Take(n - zeros).ToList() : [];
            for (var i = 0; i < n; i++)
            {
                var fromEnd = n - 1 - i;
                values[i] = fromEnd < zeros ? Complex.Zero
                    : fromEnd - zeros < modes.Count ? -modes[fromEnd - zeros].Rate
                    : Complex.Abs(values[i]) <= ZeroTolerance ? new Complex(double.NaN, double.NaN) : values[i];
            }

            return values;
        }
    }

    /// <summary>The zero tolerance that goes with <see cref="ReportedValues"/>: <see cref="ZeroTolerance"/> when resolved, else 0 (their zeros are exact, their slow rates real ones however small).</summary>
    public double ReportedZeroTolerance => IsResolved ? ZeroTolerance : 0;

    /// <summary>What <see cref="ReportedValues"/> holds, mode by mode (<see cref="ModeNumbers"/>), for a file's notes; null when the spectrum is resolved.</summary>
    public string? ReportedValuesNote
    {
        get
        {
            if (IsResolved)
            {
                return null;
            }

            var n = Values.Length;
            var zeros = Math.Min(n, StructuralNullDimension);
            var modes = SlowModes!.Converged ? Math.Min(SlowModes.Modes.Count, n - zeros) : 0;
            var first = n - zeros - modes;
            var solver = $"{ModesAt(0, first)}: the eigen-solver's values, absolute error up to {AccuracyName} = {Format.Number(AbsoluteAccuracy)}, nan where the value is rounding (within {Format.Number(ZeroTolerance)} of zero)";
            var slow = modes > 0 ? $"; {ModesAt(first, n - zeros)}: {SlowModes.Description} (relative error at most {Format.Number(SlowModes.Modes.Take(modes).Max(m => m.ErrorBound))})" : $"; slow modes not resolved: {SlowModes.Failure ?? "none decays"}";
            var structural = zeros > 0 ? $"; {ModesAt(n - zeros, n)}: zero by structure ({Format.Count(zeros, "closed class", "closed classes")} without loss)" : "";
            return $"{solver}{slow}{structural}";
        }
    }

    /// <summary>The mode numbers of the entries <paramref name="from"/> to <paramref name="to"/> (exclusive) of <see cref="Values"/>, as runs: "modes 1 to 8 and 99985 to 99991".</summary>
    private string ModesAt(int from, int to)
    {
        var runs = new List<string>();
        for (var a = from; a < to;)
        {
            var b = a;
            while (b + 1 < to && ModeNumbers[b + 1] == ModeNumbers[b] + 1)
            {
                b++;
            }

            runs.Add(a == b ? $"{ModeNumbers[a]}" : $"{ModeNumbers[a]} to {ModeNumbers[b]}");
            a = b + 1;
        }

        return runs.Count == 0 ? "no modes" : $"{(to - from == 1 ? "mode" : "modes")} {string.Join(" and ", runs)}";
    }

    /// <summary>Non-zero eigenvalues whose real part is not below -<see cref="ZeroTolerance"/> (oscillating or growing modes); a sane generator has none.</summary>
    public int NonDecayingCount { get; }

    /// <summary>max |Im lambda|; zero on the symmetric path.</summary>
    public double MaxImaginaryPart { get; }

    /// <summary>True when every eigenvalue is real to within <see cref="ZeroTolerance"/>.</summary>
    public bool IsReal => MaxImaginaryPart <= ZeroTolerance;

    /// <summary>The decomposition of S on the symmetric path (columns in the solver's order), else null; also null for a sparse K, whose spectrum comes without eigenvectors.</summary>
    public SymmetricEigenDecomposition? Symmetric { get; }

    /// <summary>The decomposition of K on the general path (columns in the solver's order), else null.</summary>
    public GeneralEigenDecomposition? General { get; }

    /// <summary>
    /// Decides the path and computes the eigenvalues: the symmetric solver on S when
    /// <see cref="BalanceReport.SymmetrizesWithDeckEquilibrium"/> (completed by detailed balance,
    /// or taken as given and balanced for the deck's own pi); otherwise the general solver on K.
    /// Measures the balance first; throws <see cref="ArgumentException"/> when K has a non-finite
    /// entry (no eigen-solver can use it).
    /// </summary>
    public static Spectrum Compute(RateMatrix rates, ILinearAlgebra algebra) =>
        Compute(rates, algebra, DetailedBalance.Analyze(rates));

    /// <summary>
    /// As <see cref="Compute(RateMatrix, ILinearAlgebra)"/> with the balance of <paramref name="rates"/>
    /// already measured; <paramref name="extent"/> says whether all eigenvalues are wanted or the
    /// extremes may serve (<see cref="SpectrumExtent"/>).
    /// </summary>
    public static Spectrum Compute(RateMatrix rates, ILinearAlgebra algebra, BalanceReport balance, SpectrumExtent extent = SpectrumExtent.Automatic)
    {
        ArgumentNullException.ThrowIfNull(rates);
        ArgumentNullException.ThrowIfNull(balance);
        if ((rates.Sparse?.Values ?? rates.Generator.Values).Any(v => !double.IsFinite(v)))
        {
            throw new ArgumentException("the rate matrix has non-finite entries; fix the rates before asking for its spectrum", nameof(rates));
        }

        if (!balance.SymmetrizesWithDeckEquilibrium)
        {
            var decomposition = algebra.GeneralEigen(rates.Generator);
            return new Spectrum(rates, SpectrumPath.General, $"{balance.SymmetryReason}: general eigen-decomposition of K", decomposition.Values, null, decomposition);
        }

        var reason = $"{balance.SymmetryReason}: symmetric eigen-decomposition of S";
        if (rates.IsSparse)
        {
            return ComputeBand(rates, algebra, reason, extent);
        }

        // S is built only to be decomposed, so the provider may work in its storage.
        var built = SymmetrizedGenerator.Build(rates);
        var symmetric = algebra.SymmetricEigenOverwriting(built);
        var spectrum = new Spectrum(rates, SpectrumPath.Symmetrized, reason, [.. symmetric.Values.Select(v => new Complex(v, 0))], symmetric, null);
        if (spectrum.IsResolved || rates.Origin != BalanceOrigin.CompletedByDetailedBalance || rates.Count > ExtendedPrecisionStateLimit)
        {
            return spectrum;
        }

        ExtendedSymmetricEigenDecomposition extended;
        try
        {
            extended = ExtendedSymmetricEigen.Decompose(rates.Count, SymmetrizedGenerator.BuildExtended(rates));
        }
        catch (ArithmeticException e)
        {
            // Rates spanning more than double-double resolves (some 1e32) leave rounding above the
            // slow modes in every sweep: the double spectrum stands, marked unresolved, and the
            // propagator choice then takes a path that needs no eigenvalues.
            return new Spectrum(rates, SpectrumPath.Symmetrized, $"{reason}; not resolved in double-double either ({e.Message})", spectrum.Values, symmetric, null)
            {
                ExtendedFailure = e.Message,
            };
        }

        var rounded = new SymmetricEigenDecomposition(
            [.. extended.Values.Select(v => v.Value)],
            DenseMatrix.Create(rates.Count, rates.Count, (i, m) => extended.Vectors[(m * rates.Count) + i].Value));
        var extendedReason = $"{reason} in double-double ({extended.Sweeps} Jacobi sweeps), because in double {spectrum.Unresolved}";
        return new Spectrum(rates, SpectrumPath.Symmetrized, extendedReason, [.. rounded.Values.Select(v => new Complex(v, 0))], rounded, null, extended: extended);
    }

    /// <summary>
    /// The symmetric path for a sparse K: eigenvalues of the band matrix S without eigenvectors
    /// (<see cref="BandEigenvalues"/>, O(N) or O(N b) memory), and one null vector per closed class
    /// by inverse iteration on that class's block of S (under detailed balance every transition is
    /// two-way, so S is block diagonal over the closed classes and each block has at most one
    /// zero eigenvalue). The shift sigma = 1e-2 of the zero tolerance sits between the zero
    /// eigenvalue and the slowest decay of any mode that the tolerance can tell from zero, so
    /// each step shrinks the other modes by at least 1e-2; <see cref="_inverseIterations"/> steps
    /// leave 1e-16 of them. A block's vector counts as a null vector when its Rayleigh quotient is
    /// within the zero tolerance.
    /// </summary>
    private static Spectrum ComputeBand(RateMatrix rates, ILinearAlgebra algebra, string reason, SpectrumExtent extent)
    {
        var band = SymmetrizedGenerator.BuildBand(rates);
        var extremes = Extremes(band, extent);
        double[] values;
        string what;
        double tolerance;
        if (extremes is { } found)
        {
            (values, what) = (found.Values, found.Method);
            tolerance = Precision.ZeroEigenvalueFactor * found.Partial.AbsoluteAccuracy;
        }
        else
        {
            values = algebra.SymmetricBandEigenvalues(band, out var method);
            what = $"eigenvalues of the band matrix S by {method}";
            var rho = values.Length == 0 ? 0.0 : Math.Max(Math.Abs(values[0]), Math.Abs(values[^1]));
            tolerance = Precision.ZeroEigenvalueTolerance(rho, values.Length);
        }

        var basis = new List<double[]>();
        foreach (var closedClass in TransitionGraph.Classify(rates).Closed)
        {
            var (vector, rayleigh) = SlowestVector(band, closedClass.States, tolerance);
            if (Math.Abs(rayleigh) <= tolerance)
            {
                var full = new double[rates.Count];
                for (var a = 0; a < closedClass.States.Length; a++)
                {
                    full[closedClass.States[a]] = vector[a];
                }

                basis.Add(full);
            }
        }

        var sparseReason = $"{reason}; K is sparse ({rates.StorageReason}): {what}, null vectors by inverse iteration on each closed class";
        return new Spectrum(rates, SpectrumPath.Symmetrized, sparseReason, [.. values.Select(v => new Complex(v, 0))], null, null, [.. basis], partial: extremes?.Partial);
    }

    /// <summary>Which modes of a whole spectrum a partial one holds, and how accurate they are.</summary>
    /// <param name="ModeCount">N.</param>
    /// <param name="ModeNumbers">The mode number (from 1, ascending order of the whole spectrum) of each value computed, in the order computed.</param>
    /// <param name="AbsoluteAccuracy">The absolute accuracy of every value computed.</param>
    /// <param name="Coverage">One line: which modes, and why only those.</param>
    private sealed record PartialSpectrum(int ModeCount, int[] ModeNumbers, double AbsoluteAccuracy, string Coverage);

    /// <summary>
    /// The extremes of the spectrum of a tridiagonal S by bisection (<see cref="TridiagonalBisection"/>),
    /// when <paramref name="extent"/> allows them: the <see cref="ExtremeModeCount"/> fastest modes
    /// (the fastest gives rho), every eigenvalue at or above -tolerance (the zeros, and any mode
    /// that fails to decay) and the <see cref="ExtremeModeCount"/> slowest decaying ones below
    /// them. Their absolute accuracy is <see cref="TridiagonalBisection.AccuracyFactor"/> eps
    /// ||S||_inf, without the factor N of a whole-spectrum solver, and the zero tolerance is
    /// <see cref="Precision.ZeroEigenvalueFactor"/> times it. Null when every eigenvalue is to be
    /// computed: a wider band, <see cref="SpectrumExtent.Full"/>, N at most
    /// <see cref="FullSpectrumStateLimit"/> unless the extremes are asked for, or more zero modes
    /// than leave the extremes below <see cref="MaxExtremeModes"/> values.
    /// </summary>
    private static (double[] Values, string Method, PartialSpectrum Partial)? Extremes(SymmetricBand band, SpectrumExtent extent)
    {
        var n = band.Count;
        const int k = ExtremeModeCount;
        if (band.Bandwidth > 1 || extent == SpectrumExtent.Full || (extent == SpectrumExtent.Automatic && n <= FullSpectrumStateLimit) || n <= 2 * k)
        {
            return null;
        }

        var (d, e) = (band.Diagonal(), band.SubDiagonal());
        var accuracy = TridiagonalBisection.AccuracyFactor * Precision.MachineEpsilon * TridiagonalBisection.NormInf(d, e);
        var tolerance = Precision.ZeroEigenvalueFactor * accuracy;
        var notDecaying = n - TridiagonalBisection.CountBelow(d, e, [-tolerance])[0];
        var slow = Math.Min(k, n - notDecaying - k);
        if (slow < 1 || notDecaying + slow + k > MaxExtremeModes)
        {
            return null;
        }

        int[] indices = [.. Enumerable.Range(0, k), .. Enumerable.Range(n - notDecaying - slow, notDecaying + slow)];
        var values = TridiagonalBisection.Eigenvalues(d, e, indices);
        var why = extent == SpectrumExtent.Extremes
            ? "asked for"
            : Invariant($"N = {n} is above {FullSpectrumStateLimit} states, where all N eigenvalues cost O(N^2) and no later stage needs them; all are computed on request");
        var top = n - notDecaying - slow + 1;
        var coverage = Invariant($"extremes only, {values.Length} of {n} modes: modes 1 to {k} (the fastest) and {top} to {n} (the {slow} slowest decaying{(notDecaying > 0 ? $" and {notDecaying} at or above zero" : "")}); {why}");
        var method = Invariant($"the extremes of the spectrum of S only ({why}): the {k} fastest modes, the {slow} slowest decaying and {notDecaying} at or above zero by Sturm-count bisection on the tridiagonal S, O(N) each, absolute accuracy {TridiagonalBisection.AccuracyFactor} eps ||S||_inf = {Format.Number(accuracy)}");
        return (values, method, new PartialSpectrum(n, [.. indices.Select(i => i + 1)], accuracy, coverage));
    }

    private static string Invariant(FormattableString text) => text.ToString(System.Globalization.CultureInfo.InvariantCulture);

    /// <summary>The unit eigenvector of the block of S on <paramref name="states"/> whose eigenvalue is nearest zero, and its Rayleigh quotient.</summary>
    private static (double[] Vector, double Rayleigh) SlowestVector(SymmetricBand band, int[] states, double tolerance)
    {
        var m = states.Length;
        var b = band.Bandwidth;
        var local = new double[m * (b + 1)];
        for (var a = 0; a < m; a++)
        {
            for (var c = a; c < Math.Min(m, a + b + 1); c++)
            {
                local[(a * (b + 1)) + c - a] = band[states[c], states[a]];
            }
        }

        var block = new SymmetricBand(m, b, local);
        if (m == 1 || tolerance == 0)
        {
            var single = new double[m];
            single[0] = 1.0;
            return (single, m == 1 ? block[0, 0] : double.PositiveInfinity);
        }

        // (sigma I - S) x = u: the solver forms z I - t S, here with z = sigma and t = 1.
        var solver = new ComplexBandSolver(block, 1);
        var u = Enumerable.Repeat(1.0 / Math.Sqrt(m), m).ToArray();
        for (var step = 0; step < _inverseIterations; step++)
        {
            var x = solver.Solve(new Complex(1e-2 * tolerance, 0), 1.0, [u]);
            var norm = 0.0;
            for (var a = 0; a < m; a++)
            {
                norm += x[a].Real * x[a].Real;
            }

            norm = Math.Sqrt(norm);
            for (var a = 0; a < m; a++)
            {
                u[a] = x[a].Real / norm;
            }
        }

        var rayleigh = 0.0;
        for (var a = 0; a < m; a++)
        {
            for (var c = Math.Max(0, a - b); c < Math.Min(m, a + b + 1); c++)
            {
                rayleigh += u[a] * block[a, c] * u[c];
            }
        }

        return (u, rayleigh);
    }

    /// <summary>
    /// The stationary vector of K supported on <paramref name="states"/> (a closed class), taken from
    /// the null-space basis and normalised to sum 1, in the order of <paramref name="states"/>; null
    /// when no null vector carries weight <see cref="NullWeightFloor"/> there (a leaking class, or
    /// a null space too small). Uses the basis vector with the most weight on the class: all of
    /// them are proportional there, since null vectors vanish on transient states and are
    /// stationary laws on each closed class. On the symmetric path the null vector of K is
    /// D^(1/2) times that of S, formed in log space so that tiny pi cannot underflow early.
    /// </summary>
    public double[]? NullVectorOn(IReadOnlyList<int> states)
    {
        var best = _nullBasis
            .Select(vector => (Vector: vector, Weight: states.Sum(s => vector[s] * vector[s])))
            .Where(candidate => candidate.Weight >= NullWeightFloor)
            .OrderByDescending(candidate => candidate.Weight)
            .Select(candidate => candidate.Vector)
            .FirstOrDefault();
        if (best is null)
        {
            return null;
        }

        double[] vector;
        if (Path == SpectrumPath.Symmetrized)
        {
            // v_i = u_i sqrt(pi_i), scaled by the largest |v_i| in log space before leaving it.
            var logs = states.Select(s => Math.Log(Math.Abs(best[s])) + (0.5 * _logEquilibrium[s])).ToArray();
            var top = logs.Max();
            vector = [.. states.Select((s, k) => Math.Sign(best[s]) * Math.Exp(logs[k] - top))];
        }
        else
        {
            vector = [.. states.Select(s => best[s])];
        }

        var sum = vector.Sum();
        return [.. vector.Select(v => v / sum)];
    }

    /// <summary>Null basis vector of column <paramref name="column"/> as real numbers: a general-path vector is turned so that its largest entry is real and positive.</summary>
    private static double[] RealNullVector(SymmetricEigenDecomposition? symmetric, GeneralEigenDecomposition? general, int column)
    {
        if (symmetric is not null)
        {
            return symmetric.Vectors.Column(column).ToArray();
        }

        var vector = general!.Vectors.Column(column);
        var pivot = vector[vector.AbsoluteMaximumIndex()];
        var turn = Complex.Conjugate(pivot) / Complex.Abs(pivot);
        return [.. vector.Select(v => (v * turn).Real)];
    }
}
