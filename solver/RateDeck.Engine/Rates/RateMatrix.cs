using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using RateDeck.States;

namespace RateDeck.Rates;

/// <summary>How the off-diagonal rates of a <see cref="RateMatrix"/> were obtained.</summary>
public enum BalanceOrigin
{
    /// <summary>One direction given, the other completed as K_ji = K_ij pi_j / pi_i: detailed balance holds by construction.</summary>
    CompletedByDetailedBalance,
    /// <summary>A full matrix taken as given: detailed balance must be checked.</summary>
    TakenAsGiven,
}

/// <summary>
/// The generator of dP/dt = K P + s. <see cref="Generator"/>[i, j] (i != j) is the rate from state j
/// to state i; the diagonal is minus the column's off-diagonal sum minus the state's loss, so
/// every column sums to minus its loss. K is stored dense, or sparse (<see cref="Sparse"/>) for
/// banded decks; a sparse matrix builds its dense form only when a stage asks for
/// <see cref="Generator"/>, and refuses above <see cref="DenseStorage.StateLimit"/> states.
/// </summary>
public sealed class RateMatrix
{
    private DenseMatrix? _dense;

    /// <summary>Wraps an assembled dense generator.</summary>
    public RateMatrix(StateSpace states, DenseMatrix generator, double[] loss, double[] pumping, BalanceOrigin origin)
        : this(states, loss, pumping, origin, "dense")
    {
        _dense = generator;
    }

    /// <summary>Wraps an assembled sparse generator; <paramref name="storageReason"/> says why it is sparse.</summary>
    public RateMatrix(StateSpace states, SparseGenerator generator, double[] loss, double[] pumping, BalanceOrigin origin, string storageReason)
        : this(states, loss, pumping, origin, storageReason)
    {
        ArgumentNullException.ThrowIfNull(generator);
        if (generator.Count != states.Count)
        {
            throw new ArgumentException($"the sparse generator has {generator.Count} states, the state space {states.Count}", nameof(generator));
        }

        Sparse = generator;
    }

    private RateMatrix(StateSpace states, double[] loss, double[] pumping, BalanceOrigin origin, string storageReason)
    {
        States = states;
        Loss = loss;
        Pumping = pumping;
        Origin = origin;
        StorageReason = storageReason;
    }

    /// <summary>The states the matrix acts on.</summary>
    public StateSpace States { get; }

    /// <summary>
    /// K, dense, column-major. For a sparse matrix it is built on first use (N^2 doubles) and kept.
    /// </summary>
    /// <exception cref="DenseStorageException">The matrix is sparse and N exceeds <see cref="DenseStorage.StateLimit"/>.</exception>
    public DenseMatrix Generator => _dense ??= Densify();

    /// <summary>K in compressed sparse columns when the assembler chose sparse storage; else null.</summary>
    public SparseGenerator? Sparse { get; }

    /// <summary>True when K is stored sparse.</summary>
    public bool IsSparse => Sparse is not null;

    /// <summary>Why K is stored the way it is, one line (e.g. "dense", or the band and the saving).</summary>
    public string StorageReason { get; }

    /// <summary>Sink rate of each state (zero when none).</summary>
    public double[] Loss { get; }

    /// <summary>Injection rate into each state (zero when none).</summary>
    public double[] Pumping { get; }

    /// <summary>How the off-diagonal rates were obtained.</summary>
    public BalanceOrigin Origin { get; }

    /// <summary>
    /// The unit of time the rates are per (the deck's output time unit), for messages that print a
    /// time or a rate; empty for a matrix built in code without a deck.
    /// </summary>
    public string TimeUnit { get; init; } = "";

    /// <summary>Number of states.</summary>
    public int Count => States.Count;

    /// <summary>True when any state is pumped.</summary>
    public bool IsDriven => Pumping.Any(s => s != 0);

    /// <summary>K_ii, without building a dense form.</summary>
    public double Diagonal(int i) => Sparse is { } sparse ? sparse[i, i] : _dense![i, i];

    /// <summary>y += K x: O(stored entries) when sparse, O(N^2) when dense. Allocates nothing.</summary>
    public void MultiplyAdd(ReadOnlySpan<double> x, Span<double> y)
    {
        if (Sparse is { } sparse)
        {
            sparse.MultiplyAdd(x, y);
        }
        else
        {
            DenseKernels.MultiplyAdd(_dense!.Values, Count, x, y);
        }
    }

    /// <summary>
    /// Visits every stored off-diagonal entry as (row i, column j, K_ij): the non-zero pattern of a
    /// sparse matrix, every off-diagonal entry of a dense one. Column by column, rows ascending.
    /// </summary>
    public void ForEachOffDiagonal(Action<int, int, double> visit)
    {
        ArgumentNullException.ThrowIfNull(visit);
        if (Sparse is { } sparse)
        {
            for (var j = 0; j < sparse.Count; j++)
            {
                for (var p = sparse.ColumnStarts[j]; p < sparse.ColumnStarts[j + 1]; p++)
                {
                    if (sparse.RowIndices[p] != j)
                    {
                        visit(sparse.RowIndices[p], j, sparse.Values[p]);
                    }
                }
            }

            return;
        }

        var n = Count;
        var values = _dense!.Values;
        for (var j = 0; j < n; j++)
        {
            for (var i = 0; i < n; i++)
            {
                if (i != j)
                {
                    visit(i, j, values[(j * n) + i]);
                }
            }
        }
    }

    private DenseMatrix Densify() => Count <= DenseStorage.StateLimit
        ? Sparse!.ToDense()
        : throw new DenseStorageException(
            $"this step needs the rate matrix as a dense {Count} x {Count} array ({8.0 * Count * Count / 1e9:F1} GB), more than the {DenseStorage.StateLimit}-state limit; the deck is stored sparse ({StorageReason}), so use a step that works on the sparse form, or fewer states");
}
