using System.Numerics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.Text;
using DenseMatrix = MathNet.Numerics.LinearAlgebra.Double.DenseMatrix;

namespace RateDeck.Diagnostics;

/// <summary>One slow mode of K found by <see cref="SlowModes"/>.</summary>
/// <param name="Rate">mu, an eigenvalue of -K: its real part is the decay rate; its imaginary part is zero on a symmetric block.</param>
/// <param name="ErrorBound">
/// ||r|| / |theta| of its Ritz pair (theta = 1/mu, r = B x - theta x for the unit Ritz vector x):
/// on a symmetric block a bound on |delta mu| / |mu| (the Ritz value is within ||r|| of an
/// eigenvalue, Parlett, The Symmetric Eigenvalue Problem, thm. 4.5.1, from memory); on a general
/// block the relative backward error.
/// </param>
public sealed record SlowMode(Complex Rate, double ErrorBound);

/// <summary>What <see cref="SlowModes.Compute"/> found.</summary>
/// <param name="Modes">The slowest modes, by decay rate ascending; only modes certified to be the slowest ones of K, in order.</param>
/// <param name="Failure">Why no slow rate can be given (no convergence, a structure the method cannot take); null when it can.</param>
/// <param name="Description">The path taken, one line, for the summaries.</param>
/// <param name="Blocks">Diagonal blocks of K (strongly connected classes of its stored rates) iterated on.</param>
/// <param name="Iterations">The most iterations one block took.</param>
/// <param name="Solves">Solves with the M-matrix factors, over all blocks.</param>
public sealed record SlowModeReport(IReadOnlyList<SlowMode> Modes, string? Failure, string Description, int Blocks, int Iterations, int Solves)
{
    /// <summary>True when the slow rates are given (<see cref="Failure"/> is null).</summary>
    public bool Converged => Failure is null;

    /// <summary>The slowest decay rate, or null when it cannot be given or no mode decays.</summary>
    public double? SlowestRate => Converged && Modes.Count > 0 ? Modes[0].Rate.Real : null;
}

/// <summary>
/// The slowest decay rates of K to high relative accuracy at any stiffness, for decks whose double
/// spectrum loses them (<see cref="Spectrum.Unresolved"/>): inverse subspace iteration on the
/// accurate M-matrix factors of each diagonal block.
/// <para>
/// In the order of the strongly connected classes of its stored rates K is block triangular, so
/// its eigenvalues are the union of those of the diagonal blocks K_CC. For a class that leaks (a
/// loss, or a rate out of it) -K_CC is a non-singular column diagonally dominant M-matrix, factored
/// without subtraction from its off-diagonal rates and its column excesses
/// (<see cref="GeneratorBlock"/>); its smallest eigenvalues are the largest of B = (-K_CC)^-1. A
/// loss-free closed class's block A = -K_CC is singular with null vector pi_C; its non-zero
/// eigenvalues are the reciprocals of those of the group inverse A^#, applied through the
/// censored block: with state r (the largest pi) removed the rest A_11 is a non-singular M-matrix,
/// and A^# b = y - (1^T y) pi for y = [A_11^-1 (P b)_rest; 0], P b = b - pi (1^T b) (Meyer,
/// SIAM Review 17 (1975) 443, from memory: the group inverse of a singular irreducible M-matrix
/// from the inverse of a principal submatrix). Under detailed balance pi_C is the deck's own (log
/// space); otherwise it comes from the same censored factors, A_11 x = K_(rest, r) with a
/// non-negative right-hand side (the Grassmann-Taksar-Heyman idea, relatively accurate).
/// </para>
/// <para>
/// Each block runs subspace iteration with <see cref="Vectors"/> vectors (fewer on a small block):
/// Q &lt;- orth(B Q), then Rayleigh-Ritz on the p x p matrix Q^T W B Q, in the inner product
/// weighted by W = diag(1/pi) under detailed balance (B is self-adjoint there, the Ritz values are
/// real and optimal), else in the plain inner product with a general small eigenproblem (complex
/// pairs allowed). It stops when the residuals of the slowest half of the Ritz pairs are at most
/// <see cref="ConvergenceTolerance"/> times the largest Ritz value, after <see cref="MaxIterations"/>
/// iterations, or when they have not halved in <see cref="StallIterations"/> iterations. A Ritz
/// pair is kept while its relative residual is at most <see cref="AcceptTolerance"/>. Every solve
/// is accurate relative to ||B|| ||b|| (the factors are relatively accurate and their inverses
/// non-negative), so the slowest rate is accurate relative to itself; the k-th slowest to about
/// eps mu_k / mu_1, which the residual shows.
/// </para>
/// <para>
/// Which modes are the slowest: on a symmetric block the modes not kept are at least as fast as
/// the fastest kept; on a general block they decay at least at |mu|^2 / (2c), c the block's
/// largest outflow (its eigenvalues lie in the Gershgorin disk |z - c| &lt;= c), and a leaking
/// block's slowest mode is its smallest in modulus and real (Perron-Frobenius for M-matrices).
/// Only modes slower than every block's bound are reported; when none is, the computation refuses.
/// </para>
/// <para>
/// Cost: one factorization per block, m^3/3 operations for a dense block of m states (m b^2 for a
/// band of half-width b), then per iteration p solves of 2 m^2 (4 m b) operations and O(m p^2) for
/// the projections; a loss-free closed class without detailed balance factors twice.
/// </para>
/// </summary>
public static class SlowModes
{
    /// <summary>Vectors per block (fewer when the block has fewer non-zero modes).</summary>
    public const int Vectors = 8;

    /// <summary>Iteration cap per block.</summary>
    public const int MaxIterations = 300;

    /// <summary>Iterations without the largest wanted residual halving after which a block stops.</summary>
    public const int StallIterations = 30;

    /// <summary>The wanted Ritz pairs have converged when each residual is at most this times the largest Ritz value.</summary>
    public const double ConvergenceTolerance = 1e-12;

    /// <summary>A Ritz pair is kept while ||r|| / |theta| is at most this (the accuracy the spectrum asks of a slow rate).</summary>
    public const double AcceptTolerance = Spectrum.SlowModeTolerance;

    /// <summary>ln of the largest weight 1/pi relative to a block's most likely state that the weighted inner product takes; beyond, the plain one is used.</summary>
    private const double _maxLogWeight = 700;

    /// <summary>Seed of the start vectors: the same deck gives the same figures.</summary>
    private const int _seed = 20_261_202;

    /// <summary>
    /// The slowest modes of <paramref name="rates"/>; <paramref name="balanced"/> when K is
    /// reversible for the deck's pi (<see cref="BalanceReport.SymmetrizesWithDeckEquilibrium"/>).
    /// </summary>
    public static SlowModeReport Compute(RateMatrix rates, bool balanced)
    {
        ArgumentNullException.ThrowIfNull(rates);
        const string path = "inverse subspace iteration on the M-matrix factors of the diagonal blocks of K";
        if (GeneratorBlock.HasNegativeOffDiagonal(rates))
        {
            return Refused(path, "a rate is negative, so -K is no M-matrix and its factors would not be accurate");
        }

        var (component, closed) = TransitionGraph.StoredComponents(rates);
        var members = Enumerable.Range(0, closed.Length).Select(_ => new List<int>()).ToArray();
        for (var state = 0; state < rates.Count; state++)
        {
            members[component[state]].Add(state);
        }

        var singular = members.Select((m, c) => closed[c] && m.All(s => rates.Loss[s] == 0)).ToArray();
        var structural = TransitionGraph.Classify(rates).LossFreeCount;
        if (singular.Count(s => s) != structural)
        {
            return Refused(path, $"the stored rates make {singular.Count(s => s)} loss-free closed classes where the deck has {structural}: a completed rate underflowed to zero, and the modes it carries are slower than a double can hold");
        }

        var random = new Random(_seed);
        var blocks = new List<BlockResult>();
        for (var c = 0; c < members.Length; c++)
        {
            var block = Block(rates, [.. members[c]], singular[c], balanced, random);
            if (block.Failure is { } failure)
            {
                return Refused(path, $"a class of {Format.Count(members[c].Count, "state", "states")} ({Format.Labels([.. members[c].Select(s => rates.States.Labels[s])], 3)}): {failure}");
            }

            blocks.Add(block);
        }

        var cutoff = blocks.Select(b => b.Cutoff).DefaultIfEmpty(double.PositiveInfinity).Min();
        var modes = blocks.SelectMany(b => b.Modes).Where(m => m.Rate.Real <= cutoff).OrderBy(m => m.Rate.Real).ThenBy(m => m.Rate.Imaginary).ToList();
        var iterations = blocks.Select(b => b.Iterations).DefaultIfEmpty(0).Max();
        var solves = blocks.Sum(b => b.Solves);
        var inner = balanced && blocks.All(b => b.Symmetric) ? "Rayleigh-Ritz in the 1/pi inner product" : "Rayleigh-Ritz on the general projected matrix";
        var description = $"{path} ({Format.Count(blocks.Count, "block", "blocks")}, up to {Vectors} vectors, {iterations} iterations at most, {solves} solves; {inner})";
        if (modes.Count == 0 && blocks.Any(b => b.Modes.Count > 0))
        {
            return new SlowModeReport([], $"a class without detailed balance has modes of smaller modulus than its slowest decaying one could be, so the slowest decay cannot be told (bound {Format.Number(cutoff)})", description, blocks.Count, iterations, solves);
        }

        return new SlowModeReport(modes, null, description, blocks.Count, iterations, solves);
    }

    private static SlowModeReport Refused(string path, string why) => new([], why, path, 0, 0, 0);

    /// <summary>What one block gave: its kept modes, the decay rate below which no other mode of it lies, and its effort.</summary>
    private sealed record BlockResult(List<SlowMode> Modes, double Cutoff, int Iterations, int Solves, bool Symmetric, string? Failure);

    /// <summary>Subspace iteration on one diagonal block (states ascending).</summary>
    private static BlockResult Block(RateMatrix rates, int[] states, bool singular, bool balanced, Random random)
    {
        var m = states.Length;
        var dimension = singular ? m - 1 : m;
        if (dimension == 0)
        {
            return new BlockResult([], double.PositiveInfinity, 0, 0, balanced, null);
        }

        var logPi = rates.States.LogEquilibrium;
        var top = states.Max(s => logPi[s]);
        var symmetric = balanced && states.All(s => top - logPi[s] <= _maxLogWeight);
        var weights = symmetric ? states.Select(s => Math.Exp(top - logPi[s])).ToArray() : null;
        BlockOperator apply;
        try
        {
            apply = singular ? GroupInverse(rates, states, balanced) : Inverse(rates, states);
        }
        catch (SingularMatrixException e)
        {
            return new BlockResult([], 0, 0, 0, symmetric, $"its block is singular to working precision ({e.Message})");
        }

        var p = Math.Min(Vectors, dimension);
        var wanted = Math.Max(1, p / 2);
        var q = new double[p][];
        for (var a = 0; a < p; a++)
        {
            q[a] = [.. Enumerable.Range(0, m).Select(_ => random.NextDouble() - 0.5)];
        }

        if (!Orthonormalize(q, weights))
        {
            return new BlockResult([], 0, 0, 0, symmetric, "the start vectors are degenerate");
        }

        var z = new double[p][];
        Ritz ritz = default;
        var (best, lastGain, iteration) = (double.PositiveInfinity, 0, 0);
        while (iteration < MaxIterations)
        {
            iteration++;
            for (var a = 0; a < p; a++)
            {
                z[a] = (double[])q[a].Clone();
                apply(z[a]);
            }

            if (z.Any(v => v.Any(x => !double.IsFinite(x))))
            {
                // Rates near 1e308 beside ones near 1e-307 (found by the fuzz test): the inverse leaves the double range.
                return new BlockResult([], 0, iteration, 0, symmetric, "its inverse leaves the double range: the rates span more than a double holds");
            }

            ritz = RayleighRitz(q, z, weights);
            var worst = ritz.Residuals.Take(wanted).Max() / ritz.Values[0].Magnitude;
            if (worst <= ConvergenceTolerance)
            {
                break;
            }

            if (worst < 0.5 * best)
            {
                (best, lastGain) = (worst, iteration);
            }
            else if (iteration - lastGain >= StallIterations)
            {
                break;
            }

            (q, z) = (z, q);
            if (!Orthonormalize(q, weights))
            {
                break;
            }
        }

        var modes = new List<SlowMode>();
        for (var k = 0; k < p; k++)
        {
            var bound = ritz.Residuals[k] / ritz.Values[k].Magnitude;
            if (!(bound <= AcceptTolerance))
            {
                break;
            }

            modes.Add(new SlowMode(Complex.Reciprocal(ritz.Values[k]), bound));
        }

        if (modes.Count == 0)
        {
            return new BlockResult([], 0, iteration, iteration * p, symmetric,
                $"the inverse subspace iteration did not converge in {iteration} iterations (relative residual of the slowest mode {Format.Number(ritz.Residuals[0] / ritz.Values[0].Magnitude)}, above {Format.Number(AcceptTolerance)})");
        }

        return new BlockResult(modes, Cutoff(rates, states, modes, dimension, symmetric, singular), iteration, iteration * p, symmetric, null);
    }

    /// <summary>
    /// The decay rate below which the block has no mode but those kept: none when all its modes
    /// were kept; on a symmetric block the fastest kept; on a general block |mu|^2 / (2c) for the
    /// largest kept |mu| (Gershgorin), and for a leaking block at least its Perron root.
    /// </summary>
    private static double Cutoff(RateMatrix rates, int[] states, List<SlowMode> modes, int dimension, bool symmetric, bool singular)
    {
        if (modes.Count == dimension)
        {
            return double.PositiveInfinity;
        }

        var largest = modes.Max(mode => mode.Rate.Magnitude);
        if (symmetric)
        {
            return largest;
        }

        var outflow = states.Max(j => -rates.Diagonal(j));
        var disk = largest * largest / (2 * Math.Max(outflow, double.Epsilon));
        return singular ? disk : Math.Max(disk, modes.Min(mode => mode.Rate.Magnitude));
    }

    /// <summary>Overwrites its argument with the block operator B applied to it.</summary>
    private delegate void BlockOperator(double[] x);

    /// <summary>B = (-K_CC)^-1 for a leaking class.</summary>
    private static BlockOperator Inverse(RateMatrix rates, int[] states)
    {
        var factors = GeneratorBlock.Factor(rates, states);
        return x => factors.Solve(x);
    }

    /// <summary>B = A^# for a loss-free closed class (A = -K_CC), through the block censored at the state of largest pi.</summary>
    private static BlockOperator GroupInverse(RateMatrix rates, int[] states, bool balanced)
    {
        var m = states.Length;
        double[] pi;
        int r;
        MMatrixFactorization factors;
        if (balanced)
        {
            pi = LogSpace.NormalizedOn(rates.States.LogEquilibrium, states);
            r = Array.IndexOf(pi, pi.Max());
            factors = GeneratorBlock.Factor(rates, Without(states, r));
        }
        else
        {
            // pi from the factors censored at the first state, then again at the state of largest pi.
            (pi, factors) = Censored(rates, states, 0);
            r = Array.IndexOf(pi, pi.Max());
            if (r != 0)
            {
                (pi, factors) = Censored(rates, states, r);
            }
        }

        return x =>
        {
            var total = x.Sum();
            var rest = new double[m - 1];
            for (var a = 0; a < m - 1; a++)
            {
                var l = a < r ? a : a + 1;
                rest[a] = x[l] - (pi[l] * total);
            }

            factors.Solve(rest);
            for (var l = 0; l < m; l++)
            {
                x[l] = l == r ? 0 : rest[l < r ? l : l - 1];
            }

            var shift = x.Sum();
            for (var l = 0; l < m; l++)
            {
                x[l] -= shift * pi[l];
            }
        };
    }

    /// <summary>The stationary law of a closed class from the factors of its block censored at local state <paramref name="r"/>: A_11 x = K_(rest, r), x_r = 1, normalised.</summary>
    private static (double[] Pi, MMatrixFactorization Factors) Censored(RateMatrix rates, int[] states, int r)
    {
        var rest = Without(states, r);
        var factors = GeneratorBlock.Factor(rates, rest);
        var x = rest.Select(i => Rate(rates, i, states[r])).ToArray();
        factors.Solve(x);
        var pi = new double[states.Length];
        for (var l = 0; l < states.Length; l++)
        {
            pi[l] = l == r ? 1 : x[l < r ? l : l - 1];
        }

        var sum = pi.Sum();
        return ([.. pi.Select(v => v / sum)], factors);
    }

    private static int[] Without(int[] states, int local) => [.. states.Where((_, l) => l != local)];

    private static double Rate(RateMatrix rates, int to, int from) => rates.Sparse is { } sparse ? sparse[to, from] : rates.Generator[to, from];

    /// <summary>Ritz values theta (largest modulus first) and the residual norm of each unit Ritz vector.</summary>
    private readonly record struct Ritz(Complex[] Values, double[] Residuals);

    /// <summary>Rayleigh-Ritz on span(Q) with Z = B Q: H = Q^T W Z (symmetrised when weighted), its eigenpairs, and ||Z y - theta Q y||_W.</summary>
    private static Ritz RayleighRitz(double[][] q, double[][] z, double[]? weights)
    {
        var p = q.Length;
        var h = DenseMatrix.Create(p, p, (a, b) => Dot(q[a], z[b], weights));
        Complex[] values;
        Complex[][] vectors;
        var algebra = new ManagedLinearAlgebra();
        if (weights is not null)
        {
            var symmetric = DenseMatrix.Create(p, p, (a, b) => 0.5 * (h[a, b] + h[b, a]));
            var decomposition = algebra.SymmetricEigen(symmetric);
            values = [.. decomposition.Values.Select(v => new Complex(v, 0))];
            vectors = [.. Enumerable.Range(0, p).Select(k => decomposition.Vectors.Column(k).Select(v => new Complex(v, 0)).ToArray())];
        }
        else
        {
            var decomposition = algebra.GeneralEigen(h);
            values = decomposition.Values;
            vectors = [.. Enumerable.Range(0, p).Select(k => decomposition.Vectors.Column(k).ToArray())];
        }

        var order = Enumerable.Range(0, p).OrderByDescending(k => values[k].Magnitude).ThenBy(k => values[k].Imaginary).ToArray();
        var residuals = new double[p];
        foreach (var k in order)
        {
            residuals[k] = weights is null ? Residual(q, z, values[k], vectors[k]) : WeightedResidual(q, z, values[k].Real, [.. vectors[k].Select(v => v.Real)], weights);
        }

        return new Ritz([.. order.Select(k => values[k])], [.. order.Select(k => residuals[k])]);
    }

    /// <summary>||Z y - theta Q y|| for a complex Ritz pair (theta, y).</summary>
    private static double Residual(double[][] q, double[][] z, Complex theta, Complex[] y)
    {
        var sum = 0.0;
        for (var i = 0; i < q[0].Length; i++)
        {
            var (bx, x) = (Complex.Zero, Complex.Zero);
            for (var a = 0; a < q.Length; a++)
            {
                bx += z[a][i] * y[a];
                x += q[a][i] * y[a];
            }

            var r = bx - (theta * x);
            sum += (r.Real * r.Real) + (r.Imaginary * r.Imaginary);
        }

        return Math.Sqrt(sum);
    }

    /// <summary>||Z y - theta Q y||_W for a real Ritz pair of the symmetric problem, in real arithmetic.</summary>
    private static double WeightedResidual(double[][] q, double[][] z, double theta, double[] y, double[] weights)
    {
        var sum = 0.0;
        for (var i = 0; i < q[0].Length; i++)
        {
            var r = 0.0;
            for (var a = 0; a < q.Length; a++)
            {
                r += (z[a][i] - (theta * q[a][i])) * y[a];
            }

            sum += weights[i] * r * r;
        }

        return Math.Sqrt(sum);
    }

    /// <summary>Modified Gram-Schmidt, twice, in the W inner product; false when a vector vanishes (the block has fewer modes than vectors).</summary>
    private static bool Orthonormalize(double[][] vectors, double[]? weights)
    {
        for (var a = 0; a < vectors.Length; a++)
        {
            for (var pass = 0; pass < 2; pass++)
            {
                for (var b = 0; b < a; b++)
                {
                    var projection = Dot(vectors[b], vectors[a], weights);
                    for (var i = 0; i < vectors[a].Length; i++)
                    {
                        vectors[a][i] -= projection * vectors[b][i];
                    }
                }
            }

            var norm = Math.Sqrt(Dot(vectors[a], vectors[a], weights));
            if (!(norm > 0) || !double.IsFinite(norm))
            {
                return false;
            }

            for (var i = 0; i < vectors[a].Length; i++)
            {
                vectors[a][i] /= norm;
            }
        }

        return true;
    }

    private static double Dot(double[] x, double[] y, double[]? weights)
    {
        var sum = 0.0;
        for (var i = 0; i < x.Length; i++)
        {
            sum += (weights?[i] ?? 1.0) * x[i] * y[i];
        }

        return sum;
    }
}
