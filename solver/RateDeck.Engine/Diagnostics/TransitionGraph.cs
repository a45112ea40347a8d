using System.Runtime.CompilerServices;
using RateDeck.Rates;

namespace RateDeck.Diagnostics;

/// <summary>A closed class: a strongly connected set of states that no transition leaves.</summary>
/// <param name="States">Member state indices, ascending.</param>
/// <param name="Labels">Member state labels, in the order of <paramref name="States"/>.</param>
/// <param name="HasLoss">True when a member has a sink: the class then leaks and holds no mass at steady state.</param>
public sealed record ClosedClass(int[] States, string[] Labels, bool HasLoss);

/// <summary>The states sorted into closed classes and transient states.</summary>
/// <param name="Closed">Closed classes, ordered by their smallest member.</param>
/// <param name="Transient">States outside every closed class, ascending.</param>
/// <param name="TransientLabels">Labels of <paramref name="Transient"/>.</param>
/// <param name="ComponentCount">Number of strongly connected components, closed or not.</param>
public sealed record StateClasses(IReadOnlyList<ClosedClass> Closed, int[] Transient, string[] TransientLabels, int ComponentCount)
{
    /// <summary>Closed classes without any loss: each contributes one zero eigenvalue of K.</summary>
    public int LossFreeCount => Closed.Count(c => !c.HasLoss);
}

/// <summary>
/// The transition graph of K, from its structure (which pairs carry a rate), never from underflow:
/// an edge j -> i whenever K_ij &gt; 0 (i != j), and, for a matrix completed by detailed balance,
/// whenever K_ji &gt; 0 as well, since the completed partner K_ij = K_ji pi_i / pi_j is positive in
/// exact arithmetic even where it underflowed to zero in double (two states 1400 kT apart with a
/// measured downward rate are one class). Its strongly connected
/// components without an outgoing edge are the closed classes (SPEC 2). Tarjan's algorithm
/// (SIAM J. Comput. 1 (1972) 146) runs with an explicit stack, so N = 20,000 or more cannot
/// overflow the call stack, and it reads successors straight from the dense columns of K, so it
/// needs O(N) memory beyond K however dense K is; a sparse K is read from its stored columns.
/// </summary>
public static class TransitionGraph
{
    /// <summary>Sorts the states of <paramref name="rates"/> into closed classes and transient states.</summary>
    public static StateClasses Classify(RateMatrix rates)
    {
        var (component, closed) = Condense(Successors(rates));
        var labels = rates.States.Labels;
        var members = new List<int>[closed.Length];
        var transient = new List<int>();
        for (var state = 0; state < component.Length; state++)
        {
            var c = component[state];
            if (closed[c])
            {
                (members[c] ??= []).Add(state);
            }
            else
            {
                transient.Add(state);
            }
        }

        var classes = members
            .Where(m => m is not null)
            .OrderBy(m => m[0])
            .Select(m => new ClosedClass([.. m], [.. m.Select(s => labels[s])], m.Any(s => rates.Loss[s] > 0)))
            .ToList();
        return new StateClasses(classes, [.. transient], [.. transient.Select(s => labels[s])], closed.Length);
    }

    /// <summary>Marks every state reachable from <paramref name="sources"/> (sources included) by a path of transitions.</summary>
    public static bool[] ReachableFrom(RateMatrix rates, IEnumerable<int> sources)
    {
        var graph = Successors(rates);
        var reached = new bool[rates.Count];
        var queue = new Queue<int>();
        foreach (var source in sources)
        {
            if (!reached[source])
            {
                reached[source] = true;
                queue.Enqueue(source);
            }
        }

        while (queue.Count > 0)
        {
            var node = queue.Dequeue();
            var cursor = 0;
            for (var next = graph.Next(node, ref cursor); next >= 0; next = graph.Next(node, ref cursor))
            {
                if (!reached[next])
                {
                    reached[next] = true;
                    queue.Enqueue(next);
                }
            }
        }

        return reached;
    }

    /// <summary>
    /// The strongly connected components of the graph of the stored rates alone (an edge j -&gt; i
    /// only where K_ij &gt; 0 is stored, completed partners that underflowed left out), with whether
    /// each is closed. In this graph's order K is exactly block triangular, so its eigenvalues are
    /// those of the diagonal blocks (<see cref="SlowModes"/>).
    /// </summary>
    internal static (int[] Component, bool[] Closed) StoredComponents(RateMatrix rates) =>
        Condense(rates.Sparse is { } sparse ? new SparseSuccessors(sparse, false) : new DenseSuccessors(rates, false));

    /// <summary>The successor lists of K: from the stored columns when sparse, else by scanning the dense columns.</summary>
    private static ISuccessors Successors(RateMatrix rates)
    {
        var twoWay = rates.Origin == BalanceOrigin.CompletedByDetailedBalance;
        return rates.Sparse is { } sparse ? new SparseSuccessors(sparse, twoWay) : new DenseSuccessors(rates, twoWay);
    }

    /// <summary>
    /// Strongly connected components (component id per node) and whether each component is closed
    /// (no edge leaves it). Iterative Tarjan: each frame of the explicit call stack keeps its node
    /// and a cursor into the node's successors. A dense K makes N^2 successor steps, once or twice
    /// per run, so this and the dense successor step are compiled optimised at once, not in tiers.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    internal static (int[] Component, bool[] Closed) Condense(ISuccessors graph)
    {
        var n = graph.Count;
        var index = new int[n];
        var low = new int[n];
        var component = new int[n];
        var onStack = new bool[n];
        var stack = new int[n];
        var frameNode = new int[n];
        var frameCursor = new int[n];
        Array.Fill(index, -1);
        int counter = 0, top = 0, depth = 0, components = 0;

        void Enter(int node)
        {
            index[node] = low[node] = counter++;
            stack[top++] = node;
            onStack[node] = true;
            frameNode[depth] = node;
            frameCursor[depth] = 0;
            depth++;
        }

        for (var root = 0; root < n; root++)
        {
            if (index[root] >= 0)
            {
                continue;
            }

            Enter(root);
            while (depth > 0)
            {
                var node = frameNode[depth - 1];
                var next = graph.Next(node, ref frameCursor[depth - 1]);
                if (next >= 0)
                {
                    if (index[next] < 0)
                    {
                        Enter(next);
                    }
                    else if (onStack[next])
                    {
                        low[node] = Math.Min(low[node], index[next]);
                    }

                    continue;
                }

                if (low[node] == index[node])
                {
                    int member;
                    do
                    {
                        member = stack[--top];
                        onStack[member] = false;
                        component[member] = components;
                    }
                    while (member != node);
                    components++;
                }

                depth--;
                if (depth > 0)
                {
                    var parent = frameNode[depth - 1];
                    low[parent] = Math.Min(low[parent], low[node]);
                }
            }
        }

        var closed = new bool[components];
        Array.Fill(closed, true);
        for (var node = 0; node < n; node++)
        {
            var cursor = 0;
            for (var next = graph.Next(node, ref cursor); next >= 0; next = graph.Next(node, ref cursor))
            {
                if (component[next] != component[node])
                {
                    closed[component[node]] = false;
                }
            }
        }

        return (component, closed);
    }
}

/// <summary>Successor enumeration for the graph algorithms: dense rate columns or explicit lists.</summary>
internal interface ISuccessors
{
    /// <summary>Number of nodes.</summary>
    int Count { get; }

    /// <summary>The next successor of <paramref name="node"/> at or after <paramref name="cursor"/> (advanced past it), or -1 when none is left. Start with cursor 0.</summary>
    int Next(int node, ref int cursor);
}

/// <summary>
/// Successors j -> i where K_ij &gt; 0, scanned from the contiguous column j of the column-major K;
/// with <paramref name="twoWay"/> also where K_ji &gt; 0 (a completed partner that underflowed).
/// </summary>
internal sealed class DenseSuccessors(RateMatrix rates, bool twoWay) : ISuccessors
{
    private readonly double[] _values = rates.Generator.Values;

    public int Count { get; } = rates.Count;

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public int Next(int node, ref int cursor)
    {
        var offset = node * Count;
        while (cursor < Count)
        {
            var row = cursor++;
            if (row != node && (_values[offset + row] > 0 || (twoWay && _values[(row * Count) + node] > 0)))
            {
                return row;
            }
        }

        return -1;
    }
}

/// <summary>
/// Successors j -> i where K_ij &gt; 0 within the band of column j; with <paramref name="twoWay"/>
/// also where K_ji &gt; 0 (a completed partner that underflowed, and so was not stored).
/// </summary>
internal sealed class SparseSuccessors(SparseGenerator sparse, bool twoWay) : ISuccessors
{
    public int Count => sparse.Count;

    public int Next(int node, ref int cursor)
    {
        if (!twoWay)
        {
            var end = sparse.ColumnStarts[node + 1] - sparse.ColumnStarts[node];
            while (cursor < end)
            {
                var p = sparse.ColumnStarts[node] + cursor++;
                var row = sparse.RowIndices[p];
                if (row != node && sparse.Values[p] > 0)
                {
                    return row;
                }
            }

            return -1;
        }

        // The cursor walks the band rows node - b .. node + b.
        var first = Math.Max(0, node - sparse.Bandwidth);
        var last = Math.Min(Count - 1, node + sparse.Bandwidth);
        while (first + cursor <= last)
        {
            var row = first + cursor++;
            if (row != node && (sparse[row, node] > 0 || sparse[node, row] > 0))
            {
                return row;
            }
        }

        return -1;
    }
}
