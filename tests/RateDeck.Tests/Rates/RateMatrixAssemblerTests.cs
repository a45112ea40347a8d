using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using RateDeck.States;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Rates;

public class RateMatrixAssemblerTests
{
    private const double _boltzmannInWavenumbersPerKelvin = 0.695034800; // CODATA 2018, from memory

    // Hydrogen term energies (cm^-1) and weights g = 2 n^2, n = 1..4: NIST ASD H I levels, from memory.
    private static readonly double[] _hydrogenEnergies = [0.0, 82259.1, 97492.3, 102823.9];
    private static readonly double[] _hydrogenWeights = [2, 8, 18, 32];

    // Reversible first-order reaction A <-> B (k_f: A -> B, k_b: B -> A): the relaxation rate is
    // k_f + k_b and the equilibrium constant [B]/[A] = k_f / k_b (Atkins' Physical Chemistry,
    // "reactions approaching equilibrium"; cited from memory). So K has eigenvalues 0 and -(k_f + k_b).
    [Theory]
    [InlineData(3.0, 0.5)]
    [InlineData(1e-3, 2e4)]
    public void TwoStateFullMatrix_HasReactionEigenvaluesAndEquilibriumRatio(double forward, double backward)
    {
        var deck = TestDecks.Create([0.0, 1.0], [0, 0], TestDecks.Weights(1, 1), TestDecks.Full((0, 1, forward), (1, 0, backward)));
        var rates = Assemble(deck);

        Assert.Equal(BalanceOrigin.TakenAsGiven, rates.Origin);
        AssertReversibleReaction(rates, forward, backward);
    }

    // The same reaction with only k_b measured (toward the smaller coordinate, B -> A) and
    // k_f completed by detailed balance from g_B / g_A exp(-(E_B - E_A) / kT) = k_f / k_b.
    [Fact]
    public void TwoStateOneWay_CompletesForwardRateFromEquilibriumConstant()
    {
        const double backward = 4.0;
        const double gap = 2.5;
        var deck = TestDecks.Create([0.0, 1.0], [0, gap], TestDecks.Weights(1, 3), TestDecks.OneWay(TransferDirection.TowardSmaller, (1, 0, backward)));
        var rates = Assemble(deck);

        var forward = backward * 3.0 * Math.Exp(-gap);
        Assert.Equal(BalanceOrigin.CompletedByDetailedBalance, rates.Origin);
        Assert.Equal(forward, rates.Generator[1, 0], forward * 1e-14);
        AssertReversibleReaction(rates, forward, backward);
    }

    // Hydrogen n = 1..4 at 10 000 K with downward rates between every pair (arbitrary inputs spanning
    // six decades; only the detailed-balance identity is checked, SPEC 2), plus losses from each term.
    [Fact]
    public void HydrogenDownwardRates_CompletedPairsObeyDetailedBalanceAndColumnsConserve()
    {
        var deck = TestDecks.Create(
            [1, 2, 3, 4], _hydrogenEnergies, TestDecks.Weights(_hydrogenWeights),
            DownwardPairs(4, (from, to) => Math.Pow(10, 3 + from + to)),
            kT: 10000 * _boltzmannInWavenumbersPerKelvin, unit: EnergyUnit.Wavenumber, losses: [0, 1e2, 3e5, 7e6]);
        var rates = Assemble(deck);

        AssertDetailedBalance(rates);
        AssertColumnsConserve(rates);
        Assert.Equal([0, 1e2, 3e5, 7e6], rates.Loss);
    }

    // Energies 0..1400 kT in steps of 200 kT: uphill factors e^-200 .. e^-1400 (down to 1e-608).
    // Completed rates below double range come out as exact zeros, never inf or NaN, and the
    // symmetrised generator built from them is finite.
    [Fact]
    public void CompletionAcross600Decades_UnderflowsHarmlesslyAndStaysBalanced()
    {
        const int n = 8;
        var energies = Enumerable.Range(0, n).Select(k => 200.0 * k).ToArray();
        var deck = TestDecks.Create(
            Enumerable.Range(0, n).Select(k => (double)k).ToArray(), energies, TestDecks.Weights(Enumerable.Repeat(1.0, n).ToArray()),
            DownwardPairs(n, (from, to) => 1e3 / (from - to)));
        var rates = Assemble(deck);

        Assert.All(rates.Generator.Values, v => Assert.True(double.IsFinite(v)));
        Assert.Equal(0.0, rates.Generator[7, 0]); // would be 1e3/7 e^-1400
        Assert.True(rates.Generator[1, 0] > 0); // 1e3 e^-200 ~ 1e-84, representable
        AssertDetailedBalance(rates);
        AssertColumnsConserve(rates);
        Assert.All(SymmetrizedGenerator.Build(rates).Values, v => Assert.True(double.IsFinite(v)));
    }

    // e^-740 ~ 4e-322 is a subnormal double with about two significant digits: flushed to zero.
    [Fact]
    public void CompletedRateInSubnormalRange_IsFlushedToZero()
    {
        var deck = TestDecks.Create([0.0, 1.0], [0, 740], TestDecks.Weights(1, 1), TestDecks.OneWay(TransferDirection.TowardSmaller, (1, 0, 1.0)));
        Assert.True(double.IsSubnormal(Math.Exp(-740)));
        var rates = Assemble(deck);
        Assert.Equal(0.0, rates.Generator[1, 0]);
        Assert.Equal(-1.0, rates.Generator[1, 1]);
        Assert.Equal(0.0, rates.Generator[0, 0]);
    }

    [Fact]
    public void UphillRateWhoseCompletionOverflows_IsRejectedAtTheEntry()
    {
        var deck = TestDecks.Create([0.0, 1.0], [0, 800], TestDecks.Weights(1, 1), TestDecks.OneWay(TransferDirection.TowardLarger, (0, 1, 1.0)));
        var error = Assert.Throws<DeckException>(() => Assemble(deck));
        Assert.Equal(TestDecks.At(20), error.Span);
        Assert.Contains("beyond the largest double", error.Problem, StringComparison.Ordinal);
    }

    // 300 states, rates spanning 12 decades, and losses: a plain left-to-right sum would drift by ~1e-15.
    [Fact]
    public void ColumnsSumToMinusLoss_ToRoundingOfTheColumnScale()
    {
        const int n = 300;
        var random = new Random(20240611);
        var entries = new List<(int, int, double)>();
        for (var from = 0; from < n; from++)
        {
            for (var to = 0; to < n; to++)
            {
                if (from != to)
                {
                    entries.Add((from, to, Math.Pow(10, -3 + 12 * random.NextDouble())));
                }
            }
        }

        var losses = Enumerable.Range(0, n).Select(k => k % 3 == 0 ? 0.0 : Math.Pow(10, random.Next(-2, 8))).ToArray();
        var deck = TestDecks.Create(
            Enumerable.Range(0, n).Select(k => (double)k).ToArray(), new double[n], TestDecks.Weights(Enumerable.Repeat(1.0, n).ToArray()),
            TestDecks.Full([.. entries]), losses: losses, pumping: Enumerable.Range(0, n).Select(k => 0.5 * k).ToArray());
        var rates = Assemble(deck);

        AssertColumnsConserve(rates);
        Assert.True(rates.IsDriven);
        Assert.Equal(0.5 * (n - 1), rates.Pumping[n - 1]);
    }

    [Fact]
    public void RateAgainstTheDeclaredDirection_IsRejectedAtTheEntry()
    {
        var coupling = TestDecks.OneWay(TransferDirection.TowardSmaller, (1, 0, 1.0), (1, 2, 1.0));
        var error = Assert.Throws<DeckException>(() => Assemble(TestDecks.Create([0, 1, 2], [0, 0, 0], TestDecks.Weights(1, 1, 1), coupling)));
        Assert.Equal(TestDecks.At(21), error.Span);
        Assert.Contains("against the declared direction", error.Problem, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData(0, 1, -1.0, "zero or more")]
    [InlineData(0, 1, double.NaN, "zero or more")]
    [InlineData(1, 1, 1.0, "to itself")]
    [InlineData(0, 3, 1.0, "states 1..3")]
    public void BadRateEntry_IsRejectedAtTheEntry(int from, int to, double rate, string explanation)
    {
        var deck = TestDecks.Create([0, 1, 2], [0, 0, 0], TestDecks.Weights(1, 1, 1), TestDecks.Full((1, 0, 1.0), (from, to, rate)));
        var error = Assert.Throws<DeckException>(() => Assemble(deck));
        Assert.Equal(TestDecks.At(21), error.Span);
        Assert.Contains(explanation, error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void RepeatedRateEntry_IsRejectedAtTheRepeat()
    {
        var deck = TestDecks.Create([0, 1], [0, 0], TestDecks.Weights(1, 1), TestDecks.Full((1, 0, 1.0), (0, 1, 2.0), (1, 0, 3.0)));
        var error = Assert.Throws<DeckException>(() => Assemble(deck));
        Assert.Equal(TestDecks.At(22), error.Span);
        Assert.Contains("twice", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void NegativeLoss_IsRejectedAtTheLossesNamingTheState()
    {
        var deck = TestDecks.Create([0, 1], [0, 0], TestDecks.Weights(1, 1), TestDecks.Full((1, 0, 1.0)), losses: [0.0, -1.0]);
        var error = Assert.Throws<DeckException>(() => Assemble(deck));
        Assert.Equal(TestDecks.At(6), error.Span);
        Assert.Contains("'s2'", error.Problem, StringComparison.Ordinal);
    }

    /// <summary>Measured rates toward smaller coordinate for every pair of an n-state grid 0..n-1.</summary>
    private static MeasuredOneWay DownwardPairs(int n, Func<int, int, double> rate)
    {
        var entries = Enumerable.Range(1, n - 1).SelectMany(from => Enumerable.Range(0, from).Select(to => (from, to, rate(from, to))));
        return TestDecks.OneWay(TransferDirection.TowardSmaller, [.. entries]);
    }

    private static RateMatrix Assemble(Deck deck) => RateMatrixAssembler.Assemble(deck, StateSpaceBuilder.Build(deck));

    private static void AssertReversibleReaction(RateMatrix rates, double forward, double backward)
    {
        var eigen = new ManagedLinearAlgebra().GeneralEigen(rates.Generator);
        var order = Enumerable.Range(0, 2).OrderBy(k => eigen.Values[k].Real).ToArray();
        var scale = forward + backward;
        Assert.All(eigen.Values, v => Assert.Equal(0.0, v.Imaginary));
        Assert.Equal(-scale, eigen.Values[order[0]].Real, scale * 1e-14);
        Assert.Equal(0.0, eigen.Values[order[1]].Real, scale * 1e-14);

        var nullVector = eigen.Vectors.Column(order[1]);
        var ratio = (nullVector[1] / nullVector[0]).Real;
        Assert.Equal(forward / backward, ratio, forward / backward * 1e-12);
    }

    /// <summary>
    /// K_ij pi_j = K_ji pi_i to 1e-12 relative (compared as logarithms, since pi may underflow) for
    /// every pair with both rates non-zero; where one rate is zero the other must be zero too, or
    /// the balanced partner must lie below the smallest normal double.
    /// </summary>
    private static void AssertDetailedBalance(RateMatrix rates)
    {
        var k = rates.Generator;
        var logPi = rates.States.LogEquilibrium;
        var logSmallestNormal = Math.Log(2.2250738585072014e-308);
        for (var j = 0; j < rates.Count; j++)
        {
            for (var i = j + 1; i < rates.Count; i++)
            {
                var (a, b) = (k[i, j], k[j, i]);
                if (a > 0 && b > 0)
                {
                    Assert.Equal(Math.Log(a) + logPi[j], Math.Log(b) + logPi[i], 1e-12);
                }
                else if (a > 0 || b > 0)
                {
                    var (nonzero, logPartner) = a > 0 ? (a, Math.Log(a) + logPi[j] - logPi[i]) : (b, Math.Log(b) + logPi[i] - logPi[j]);
                    Assert.True(nonzero > 0 && logPartner < logSmallestNormal, $"pair ({i}, {j}): a zero rate whose partner is not negligible");
                }
            }
        }
    }

    /// <summary>Sum_i K_ij = -loss_j, summed exactly, to 1e-14 of the column's scale |K_jj| (SPEC 2 conservation).</summary>
    private static void AssertColumnsConserve(RateMatrix rates)
    {
        for (var j = 0; j < rates.Count; j++)
        {
            var column = rates.Generator.Column(j).ToArray();
            var residual = ExactSum.Of(column.Append(rates.Loss[j]));
            var scale = Math.Abs(column[j]);
            Assert.True(Math.Abs(residual) <= 1e-14 * scale, $"column {j}: residual {residual} against scale {scale}");

            // Tighter: one rounding of the diagonal (a plain sum of 300 terms misses this by ~10x).
            Assert.True(Math.Abs(residual) <= Math.BitIncrement(scale) - scale, $"column {j}: residual {residual} exceeds one ulp of {scale}");
        }
    }
}
