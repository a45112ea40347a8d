using RateDeck.LinearAlgebra;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>
/// Bisection on Sturm counts against the closed-form spectrum of the uniform reflecting
/// birth-death chain (<see cref="UniformLadder"/>: Takacs 1962, from memory, checked with SciPy).
/// </summary>
public sealed class TridiagonalBisectionTests
{
    private const int _count = 3000;
    private const double _slope = 0.3;

    [Fact]
    public void Eigenvalues_AtChosenPlaces_MatchClosedForm()
    {
        var (d, e) = SymmetrizedChain();
        int[] places = [0, 1, 7, _count / 2, _count - 3, _count - 2, _count - 1];

        var values = TridiagonalBisection.Eigenvalues(d, e, places);

        // Ascending order: place p holds k = N - 1 - p (k = 0 is the zero mode at the top).
        for (var a = 0; a < places.Length; a++)
        {
            var k = _count - 1 - places[a];
            var expected = k == 0 ? 0.0 : UniformLadder.Eigenvalue(_count, _slope, k);
            // Absolute accuracy of bisection: a few eps ||T|| (Demmel, ANLA sec. 5.3.4, from memory); ||T|| is about 4 here.
            Assert.True(Math.Abs(values[a] - expected) <= 1e-13, $"place {places[a]}: {values[a]:R} vs {expected:R}");
        }
    }

    [Fact]
    public void CountBelow_BetweenNeighbouringEigenvalues_CountsTheClosedFormOnes()
    {
        var (d, e) = SymmetrizedChain();
        // Midpoints between closed-form eigenvalues k and k + 1: below the midpoint lie the modes k + 1 .. N - 1.
        int[] ks = [1, 2, 10, 1500, _count - 2];
        var shifts = ks.Select(k => 0.5 * (UniformLadder.Eigenvalue(_count, _slope, k) + UniformLadder.Eigenvalue(_count, _slope, k + 1))).ToArray();

        var counts = TridiagonalBisection.CountBelow(d, e, shifts);

        Assert.Equal(ks.Select(k => _count - 1 - k), counts);
    }

    /// <summary>S = D^(-1/2) K D^(1/2) of the chain with rate 1 down and e^-slope up: diagonal -(1 + e^-s) inside, -e^-s and -1 at the ends, off-diagonal e^(-s/2).</summary>
    private static (double[] Diagonal, double[] OffDiagonal) SymmetrizedChain()
    {
        var up = Math.Exp(-_slope);
        var d = Enumerable.Repeat(-(1 + up), _count).ToArray();
        (d[0], d[^1]) = (-up, -1.0);
        return (d, Enumerable.Repeat(Math.Sqrt(up), _count - 1).ToArray());
    }
}
