using RateDeck.Diagnostics;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

public class TransitionGraphTests
{
    private const int _longChain = 300_000;

    /// <summary>Successors as compressed lists, for graphs far larger than a dense K could hold.</summary>
    private sealed class ListSuccessors(int[] offsets, int[] targets) : ISuccessors
    {
        public int Count => offsets.Length - 1;

        public int Next(int node, ref int cursor)
        {
            var position = offsets[node] + cursor;
            if (position >= offsets[node + 1])
            {
                return -1;
            }

            cursor++;
            return targets[position];
        }
    }

    private static ListSuccessors Chain(int n, bool backward)
    {
        var offsets = new int[n + 1];
        var targets = new List<int>();
        for (var v = 0; v < n; v++)
        {
            if (v + 1 < n)
            {
                targets.Add(v + 1);
            }

            if (backward && v > 0)
            {
                targets.Add(v - 1);
            }

            offsets[v + 1] = targets.Count;
        }

        return new ListSuccessors(offsets, [.. targets]);
    }

    [Fact]
    public void OneWayChain_OfThreeHundredThousandStates_HasOnlyItsEndClosed()
    {
        // Depth 300,000 would overflow a recursive Tarjan (Tarjan, SIAM J. Comput. 1 (1972) 146);
        // a one-way path has one component per node and only the sink is closed (common practice).
        var (component, closed) = TransitionGraph.Condense(Chain(_longChain, backward: false));

        Assert.Equal(_longChain, closed.Length);
        Assert.Equal(1, closed.Count(c => c));
        Assert.True(closed[component[_longChain - 1]]);
    }

    [Fact]
    public void TwoWayChain_OfThreeHundredThousandStates_IsOneClosedClass()
    {
        var (component, closed) = TransitionGraph.Condense(Chain(_longChain, backward: true));

        Assert.Single(closed);
        Assert.True(closed[0]);
        Assert.All(component, c => Assert.Equal(0, c));
    }
}
