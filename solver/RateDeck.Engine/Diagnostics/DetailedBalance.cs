using RateDeck.Rates;
using RateDeck.Text;

namespace RateDeck.Diagnostics;

/// <summary>One entry of K named by its states: the rate <paramref name="Value"/> = K[to, from] from state <paramref name="From"/> to state <paramref name="To"/>, or a measure attached to that pair.</summary>
/// <param name="From">Label of the source state j.</param>
/// <param name="To">Label of the target state i.</param>
/// <param name="Value">The rate K_ij, or the measure reported for the pair.</param>
public sealed record RateEntry(string From, string To, double Value);

/// <summary>What <see cref="DetailedBalance.Analyze"/> found.</summary>
/// <param name="PairViolation">max over pairs of |K_ij pi_j - K_ji pi_i| / max(K_ij pi_j, K_ji pi_i), with pi the deck's equilibrium; 0 when no pair is resolvable.</param>
/// <param name="WorstPair">The pair reaching <paramref name="PairViolation"/> (its value is the violation), or null.</param>
/// <param name="OneWayCount">Number of one-way edges: K_ij &gt; 0 while K_ji = 0.</param>
/// <param name="OneWayEdges">The first <see cref="DetailedBalance.ListedOneWayEdges"/> one-way edges (value = the rate).</param>
/// <param name="CycleViolation">Worst |ln(product forward) - ln(product backward)| over the fundamental cycles; null when not examined (completed matrices) or when the support has no cycle.</param>
/// <param name="WorstCycle">Labels around the worst cycle, in order (the last state links back to the first); empty when none.</param>
/// <param name="CycleCount">Number of fundamental cycles examined.</param>
/// <param name="Origin">How the matrix was obtained, which decides the criterion of <see cref="Holds"/>.</param>
public sealed record BalanceReport(
    double PairViolation,
    RateEntry? WorstPair,
    int OneWayCount,
    IReadOnlyList<RateEntry> OneWayEdges,
    double? CycleViolation,
    IReadOnlyList<string> WorstCycle,
    int CycleCount,
    BalanceOrigin Origin)
{
    /// <summary>Detailed balance holds with respect to the deck's own equilibrium pi: no one-way edge and <see cref="PairViolation"/> within <see cref="DetailedBalance.PairTolerance"/>. Only then is S = D^(-1/2) K D^(1/2) symmetric.</summary>
    public bool HoldsForDeckEquilibrium => OneWayCount == 0 && PairViolation <= DetailedBalance.PairTolerance;

    /// <summary>
    /// Detailed balance holds at all: for completed matrices as <see cref="HoldsForDeckEquilibrium"/>;
    /// for matrices taken as given, by the Kolmogorov criterion (no one-way edge, every fundamental
    /// cycle within <see cref="DetailedBalance.CycleTolerance"/>), for some equilibrium that need not be the deck's.
    /// </summary>
    public bool Holds => Origin == BalanceOrigin.CompletedByDetailedBalance
        ? HoldsForDeckEquilibrium
        : OneWayCount == 0 && (CycleViolation ?? 0) <= DetailedBalance.CycleTolerance;

    /// <summary>
    /// False for a matrix taken as given from a deck with neither energies nor weights: its pi is
    /// the defaults, no claim of the user's, so a violation against it is reported as such.
    /// </summary>
    public bool DeckGivesEquilibrium { get; init; } = true;

    /// <summary>
    /// The one policy deciding whether S = D^(-1/2) K D^(1/2), built with the deck's pi, is
    /// symmetric, so that the symmetric eigen paths (spectrum and exact propagation) may be taken:
    /// by construction for a completed matrix, else only when balance holds for the deck's own pi.
    /// A matrix balanced for some other equilibrium (<see cref="Holds"/> by its cycles) does not
    /// qualify: symmetrizing it with the deck's pi gives a non-symmetric S.
    /// </summary>
    public bool SymmetrizesWithDeckEquilibrium => Origin == BalanceOrigin.CompletedByDetailedBalance || HoldsForDeckEquilibrium;

    /// <summary>Why the symmetric paths are or are not open, one clause for summaries (see <see cref="SymmetrizesWithDeckEquilibrium"/>).</summary>
    public string SymmetryReason
    {
        get
        {
            if (Origin == BalanceOrigin.CompletedByDetailedBalance)
            {
                return "detailed balance holds by construction (one direction completed from the other)";
            }

            if (OneWayCount > 0)
            {
                return $"no detailed balance: {Format.Count(OneWayCount, "one-way edge", "one-way edges")} (rate one way, none back)";
            }

            var pair = WorstPair is null ? "no resolvable pair" : $"worst pairwise violation {Format.Number(PairViolation)} between {WorstPair.From} and {WorstPair.To}";
            if (HoldsForDeckEquilibrium)
            {
                return $"detailed balance holds for the deck's pi ({pair}, tolerance {Format.Number(DetailedBalance.PairTolerance)})";
            }

            var other = Holds ? "; the matrix is balanced for another equilibrium (its Kolmogorov cycles close), not the deck's" : "";
            return DeckGivesEquilibrium
                ? $"no detailed balance for the deck's pi ({pair} > {Format.Number(DetailedBalance.PairTolerance)}){other}"
                : $"the deck gives no pi (no energies or weights), and K is not symmetric for the default pi ({pair} > {Format.Number(DetailedBalance.PairTolerance)}){other}";
        }
    }
}

/// <summary>
/// Detailed-balance measures of a rate matrix (SPEC 2), all in log space.
/// <para>
/// Pairwise (against the deck's pi): for each pair with rates a = K_ij, b = K_ji the flows
/// ln(a pi_j) and ln(b pi_i) are compared; the relative violation 1 - exp(-|difference|) equals
/// |a pi_j - b pi_i| / max(a pi_j, b pi_i) without forming pi. For completed matrices a partner
/// that completion sends below the smallest normal double (2.2e-308) may have underflowed to zero
/// legitimately; such pairs cannot be resolved in double precision and are skipped.
/// </para>
/// <para>
/// Kolmogorov cycles (matrices taken as given): detailed balance for some pi holds if and only if
/// K_ij &gt; 0 exactly when K_ji &gt; 0 and, around every cycle, the product of rates one way equals
/// the product the other way (Kolmogorov, Math. Ann. 112 (1936) 155; Kelly, Reversibility and
/// Stochastic Networks, 1979, sec. 1.5, from memory). With f(j -&gt; i) = ln(K_ij / K_ji), an
/// antisymmetric function on the edges, the criterion says f sums to zero around every cycle,
/// i.e. f = phi_i - phi_j for a potential phi (then pi = exp(phi)). A breadth-first spanning forest
/// of the two-way support graph fixes phi along its edges; each non-tree edge closes exactly one
/// fundamental cycle, whose violation is |f(j -&gt; i) - (phi_i - phi_j)|. Every cycle's edge set is
/// a sum of fundamental cycles (they form a cycle basis) and the cycle sum of f is linear, so
/// zero on the basis means zero on all cycles; a general cycle's violation is at most the sum of
/// its fundamental ones. The worst value reported is the worst fundamental cycle of that forest.
/// </para>
/// </summary>
public static class DetailedBalance
{
    /// <summary>
    /// Largest pairwise relative violation still counted as balance: 1e-10. Completion in log space
    /// leaves relative errors near eps |ln pi| &lt;= 745 eps = 1.7e-13 for any representable pi.
    /// </summary>
    public const double PairTolerance = 1e-10;

    /// <summary>
    /// Largest |ln ratio| over a cycle still counted as balance: 1e-8. A cycle of L edges sums L
    /// logarithms each rounded to about 745 eps, so L up to 6e4 states stays within it.
    /// </summary>
    public const double CycleTolerance = 1e-8;

    /// <summary>How many one-way edges a report lists by name (all are counted).</summary>
    public const int ListedOneWayEdges = 20;

    /// <summary>Smallest positive normal double.</summary>
    private const double _minNormal = 2.2250738585072014E-308;

    private static readonly double _logMinNormal = Math.Log(_minNormal);

    /// <summary>Measures detailed balance of <paramref name="rates"/>: pairwise always, Kolmogorov cycles for matrices taken as given.</summary>
    public static BalanceReport Analyze(RateMatrix rates)
    {
        var logPi = rates.States.LogEquilibrium;
        var labels = rates.States.Labels;
        var tolerateUnderflow = rates.Origin == BalanceOrigin.CompletedByDetailedBalance;
        var worst = 0.0;
        RateEntry? worstPair = null;
        var oneWay = new List<RateEntry>();
        var oneWayCount = 0;

        // One visit per unordered pair {i, j} (i > j) with a rate either way: toI = K_ij, toJ = K_ji.
        void VisitPair(int i, int j, double toI, double toJ)
        {
            if (toI <= 0 && toJ <= 0)
            {
                return;
            }

            // Flows at equilibrium in log space: ln(K_ij pi_j) and ln(K_ji pi_i).
            var flowToI = toI > 0 ? Math.Log(toI) + logPi[j] : double.NegativeInfinity;
            var flowToJ = toJ > 0 ? Math.Log(toJ) + logPi[i] : double.NegativeInfinity;
            var smallIsToJ = toJ < toI;
            var small = smallIsToJ ? toJ : toI;
            if (small < _minNormal)
            {
                var expectedLog = smallIsToJ ? flowToI - logPi[i] : flowToJ - logPi[j];
                if (tolerateUnderflow && expectedLog < _logMinNormal)
                {
                    return;
                }

                if (small <= 0)
                {
                    oneWayCount++;
                    if (oneWay.Count < ListedOneWayEdges)
                    {
                        oneWay.Add(smallIsToJ ? new RateEntry(labels[j], labels[i], toI) : new RateEntry(labels[i], labels[j], toJ));
                    }

                    return;
                }
            }

            var violation = Math.Abs(double.ExpM1(-Math.Abs(flowToI - flowToJ)));
            if (worstPair is null || violation > worst)
            {
                worst = violation;
                worstPair = new RateEntry(labels[j], labels[i], violation);
            }
        }

        if (rates.Sparse is { } sparse)
        {
            // Stored entries only; a pair stored on one side alone is visited from that side.
            rates.ForEachOffDiagonal((row, column, value) =>
            {
                if (row > column)
                {
                    VisitPair(row, column, value, sparse[column, row]);
                }
                else if (sparse[column, row] == 0)
                {
                    VisitPair(column, row, 0.0, value);
                }
            });
        }
        else
        {
            var n = rates.Count;
            var k = rates.Generator.Values;
            for (var j = 0; j < n; j++)
            {
                for (var i = j + 1; i < n; i++)
                {
                    VisitPair(i, j, k[(j * n) + i], k[(i * n) + j]);
                }
            }
        }

        if (rates.Origin == BalanceOrigin.CompletedByDetailedBalance)
        {
            return new BalanceReport(worst, worstPair, oneWayCount, oneWay, null, [], 0, rates.Origin);
        }

        var cycles = new CycleSearch(rates);
        return new BalanceReport(worst, worstPair, oneWayCount, oneWay, cycles.WorstViolation, cycles.WorstCycle, cycles.Count, rates.Origin)
        {
            DeckGivesEquilibrium = rates.States.EquilibriumGiven != Decks.EquilibriumGiven.None,
        };
    }

    /// <summary>Fundamental cycles of the two-way support graph against a breadth-first spanning forest.</summary>
    private sealed class CycleSearch
    {
        private readonly int _n;
        private readonly double[] _k;
        private readonly int[] _parent;
        private readonly int[] _depth;
        private readonly double[] _potential;

        public CycleSearch(RateMatrix rates)
        {
            _n = rates.Count;
            _k = rates.Generator.Values;
            _parent = new int[_n];
            _depth = new int[_n];
            _potential = new double[_n];
            BuildForest();

            var worstFrom = -1;
            var worstTo = -1;
            for (var j = 0; j < _n; j++)
            {
                for (var i = j + 1; i < _n; i++)
                {
                    if (!TwoWay(i, j) || _parent[i] == j || _parent[j] == i)
                    {
                        continue;
                    }

                    Count++;
                    var violation = Math.Abs(LogRatio(i, j) - (_potential[i] - _potential[j]));
                    if (WorstViolation is null || violation > WorstViolation)
                    {
                        WorstViolation = violation;
                        (worstFrom, worstTo) = (j, i);
                    }
                }
            }

            WorstCycle = worstFrom < 0 ? [] : [.. TreePath(worstFrom, worstTo).Select(s => rates.States.Labels[s])];
        }

        public int Count { get; }

        public double? WorstViolation { get; }

        public IReadOnlyList<string> WorstCycle { get; }

        private bool TwoWay(int i, int j) => _k[(j * _n) + i] > 0 && _k[(i * _n) + j] > 0;

        /// <summary>f(j -&gt; i) = ln(K_ij / K_ji).</summary>
        private double LogRatio(int i, int j) => Math.Log(_k[(j * _n) + i]) - Math.Log(_k[(i * _n) + j]);

        private void BuildForest()
        {
            Array.Fill(_parent, -2);
            var queue = new Queue<int>();
            for (var root = 0; root < _n; root++)
            {
                if (_parent[root] != -2)
                {
                    continue;
                }

                _parent[root] = -1;
                queue.Enqueue(root);
                while (queue.Count > 0)
                {
                    var node = queue.Dequeue();
                    for (var next = 0; next < _n; next++)
                    {
                        if (next != node && _parent[next] == -2 && TwoWay(next, node))
                        {
                            _parent[next] = node;
                            _depth[next] = _depth[node] + 1;
                            _potential[next] = _potential[node] + LogRatio(next, node);
                            queue.Enqueue(next);
                        }
                    }
                }
            }
        }

        /// <summary>States on the tree path from <paramref name="from"/> to <paramref name="to"/>, both included.</summary>
        private List<int> TreePath(int from, int to)
        {
            var head = new List<int>();
            var tail = new List<int>();
            while (from != to)
            {
                if (_depth[from] >= _depth[to])
                {
                    head.Add(from);
                    from = _parent[from];
                }
                else
                {
                    tail.Add(to);
                    to = _parent[to];
                }
            }

            head.Add(from);
            tail.Reverse();
            head.AddRange(tail);
            return head;
        }
    }
}
