using System.Globalization;
using RateDeck.Decks;
using RateDeck.Rates;
using RateDeck.States;
using RateDeck.Tests.Decks;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Rates;

/// <summary>
/// Model kernels W(x -> y) read from real deck text: which pairs they fill for each direction and
/// band, that i and j are the one-based state numbers, that the completed partner obeys detailed
/// balance K_ij pi_j = K_ji pi_i (SPEC 2; e.g. van Kampen, Stochastic Processes in Physics and
/// Chemistry, ch. V.6, cited from memory), and that bad kernel values, losses and pumping are
/// reported at their expression naming the pair or state.
/// </summary>
public sealed class KernelAssemblyTests : IDisposable
{
    private const double _kT = 0.7;

    // Coordinates unlike the state numbers, so that a kernel mixing up x and i would show.
    private static readonly double[] _coordinates = [0.25, 0.5, 1.0, 1.5, 2.5, 4.0];

    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    public static TheoryData<string, int?> DirectionsAndBands => new()
    {
        { "toward_smaller", 1 }, { "toward_smaller", 2 }, { "toward_smaller", null },
        { "toward_larger", 1 }, { "toward_larger", 2 }, { "toward_larger", null },
    };

    // The kernel encodes its own arguments, x + 100 y + 1e4 i + 1e6 j (every value exact in binary),
    // so each filled entry says which source, target and state numbers it was evaluated with.
    [Theory]
    [MemberData(nameof(DirectionsAndBands))]
    public void Kernel_FillsExactlyThePairsOfItsDirectionAndBand_WithOneBasedIJ(string direction, int? band)
    {
        var rates = Assemble(_scratch.Parse(SixStateDeck(direction, band, "x + 100*y + 1e4*i + 1e6*j")));
        var k = rates.Generator;
        var g = Enumerable.Range(1, 6).Select(n => 1.0 + n).ToArray();
        var energies = _coordinates.Select(x => 0.3 * x * x).ToArray();
        var towardSmaller = direction == "toward_smaller";
        var filled = 0;
        for (var source = 0; source < 6; source++)
        {
            for (var target = 0; target < 6; target++)
            {
                if (source == target || towardSmaller != (target < source))
                {
                    continue;
                }

                if (band is { } b && Math.Abs(source - target) > b)
                {
                    Assert.Equal(0.0, k[target, source]);
                    Assert.Equal(0.0, k[source, target]);
                    continue;
                }

                filled++;
                var expected = _coordinates[source] + 100 * _coordinates[target] + 1e4 * (source + 1) + 1e6 * (target + 1);
                Assert.Equal(expected, k[target, source]);

                // The partner from the closed form K_back = K (g_s / g_t) exp(-(E_s - E_t) / kT), formed
                // directly (all factors are in double range here), and the balance itself in log space.
                var partner = expected * g[source] / g[target] * Math.Exp(-(energies[source] - energies[target]) / _kT);
                Assert.Equal(partner, k[source, target], partner * 1e-12);
                var logPi = rates.States.LogEquilibrium;
                Assert.Equal(Math.Log(k[target, source]) + logPi[source], Math.Log(k[source, target]) + logPi[target], 1e-12);
            }
        }

        // Pairs within the band: 5 nearest-neighbour pairs, 5 + 4 for band 2, all 15 without a band.
        Assert.Equal(band switch { 1 => 5, 2 => 9, _ => 15 }, filled);
        var offDiagonal = Enumerable.Range(0, 36).Count(e => e / 6 != e % 6 && k[e / 6, e % 6] != 0);
        Assert.Equal(2 * filled, offDiagonal);
    }

    // A kernel and a one-way rate file holding the same numbers are the same measurement
    // (SPEC 3: a model replaces measured coefficients): the generators agree bit for bit.
    [Fact]
    public void Kernel_GivesTheSameGeneratorAsItsValuesGivenAsOneWayRates()
    {
        const string kernel = "a*exp(-(x - y)^2/(2*s^2))/sqrt(2*pi*s^2)";
        const string parameters = "[parameters]\na = 3.5\ns = 0.8";
        var modelled = Assemble(_scratch.Parse(SixStateDeck("toward_larger", 2, kernel, parameters)));
        var rows = new List<string> { "from,to,rate" };
        for (var source = 0; source < 6; source++)
        {
            for (var target = source + 1; target <= Math.Min(5, source + 2); target++)
            {
                var rate = modelled.Generator[target, source];
                rows.Add(string.Create(CultureInfo.InvariantCulture, $"{source + 1},{target + 1},{rate:R}"));
            }
        }

        _scratch.Write("kernel-values.csv", string.Join('\n', rows) + "\n");
        var measured = Assemble(_scratch.Parse(SixStateDeck("toward_larger", null, null, parameters)));

        Assert.Equal(measured.Generator.Values, modelled.Generator.Values);
        var first = 3.5 * Math.Exp(-(0.25 * 0.25) / (2 * (0.8 * 0.8))) / Math.Sqrt(2 * Math.PI * (0.8 * 0.8)); // normal density, textbook
        Assert.Equal(first, modelled.Generator[1, 0], first * 1e-14);
    }

    [Theory]
    [InlineData("toward_larger", "x - 2", "is -1 from state 'a' (state 1, x = 1) to state 'b' (state 2, x = 2)")]
    [InlineData("toward_larger", "sqrt(2.5 - y)", "is NaN from state 'a' (state 1, x = 1) to state 'c' (state 3, x = 3)")]
    [InlineData("toward_smaller", "1/(x - y - 1)", "is Infinity from state 'b' (state 2, x = 2) to state 'a' (state 1, x = 1)")]
    public void NegativeOrNonFiniteKernel_IsRejectedAtTheKernelNamingThePair(string direction, string kernel, string pair)
    {
        var transfer = $"kind = \"kernel\"\ndirection = \"{direction}\"\nkernel = \"§{kernel}\"";
        var error = StageErrors.FailAt(_scratch, DeckScratch.Valid(transfer: transfer), AssembleDeck);
        Assert.Contains($"the kernel {pair}", error.Problem, StringComparison.Ordinal);
        Assert.Contains("finite and zero or more", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void LossesAndPumpingAsExpressions_EqualTheSameValuesGivenExplicitly()
    {
        const string parameters = "[parameters]\nl0 = 0.75\np0 = 2.0\n";
        var modelled = Assemble(_scratch.Parse(SixStateDeck("toward_smaller", 1, "1", parameters + "[losses]\nexpression = \"l0*i\"\n[pumping]\nexpression = \"p0*exp(-x)\"")));
        double[] losses = [.. Enumerable.Range(1, 6).Select(n => 0.75 * n)];
        double[] pumping = [.. _coordinates.Select(x => 2.0 * Math.Exp(-x))];
        var listed = Assemble(_scratch.Parse(SixStateDeck("toward_smaller", 1, "1", $"{parameters}[losses]\nvalues = [{List(losses)}]\n[pumping]\nvalues = [{List(pumping)}]")));

        Assert.Equal(losses, modelled.Loss);
        Assert.Equal(pumping, modelled.Pumping);
        Assert.Equal(listed.Generator.Values, modelled.Generator.Values);
        Assert.True(modelled.IsDriven);

        // Columns sum to minus the loss (SPEC 2): the loss is in the diagonal, nowhere else.
        for (var j = 0; j < 6; j++)
        {
            var residual = ExactSum.Of(modelled.Generator.Column(j).Append(losses[j]));
            Assert.True(Math.Abs(residual) <= 1e-15 * Math.Abs(modelled.Generator[j, j]), $"column {j}: residual {residual}");
        }
    }

    [Theory]
    [InlineData("losses", "x - 2", "loss rate of state 'a' (state 1) is -1")]
    [InlineData("pumping", "sqrt(1.5 - x)", "pumping rate of state 'b' (state 2) is NaN")]
    public void NegativeOrNaNLossOrPumpingExpression_IsRejectedAtTheExpressionNamingTheState(string table, string expression, string state)
    {
        var error = StageErrors.FailAt(_scratch, DeckScratch.Valid(extra: $"[{table}]\nexpression = \"§{expression}\""), AssembleDeck);
        Assert.Contains($"the {state}", error.Problem, StringComparison.Ordinal);
        Assert.Contains("zero or more", error.Problem, StringComparison.Ordinal);
    }

    /// <summary>
    /// Six states on <see cref="_coordinates"/> with E = 0.3 x^2, g = 1 + i and kT = 0.7; a kernel
    /// (null: one-way rates from kernel-values.csv) and extra tables.
    /// </summary>
    private static string SixStateDeck(string direction, int? band, string? kernel, string extra = "")
    {
        var transfer = kernel is null
            ? $"kind = \"one_way\"\ndirection = \"{direction}\"\ncsv = \"kernel-values.csv\""
            : $"kind = \"kernel\"\ndirection = \"{direction}\"\nkernel = \"{kernel}\"" + (band is { } b ? $"\nband = {b}" : "");
        return DeckScratch.Valid(
            temperature: string.Create(CultureInfo.InvariantCulture, $"kT = {_kT}"),
            states: $"coordinates = [{List(_coordinates)}]\nlabels = [\"a\", \"b\", \"c\", \"d\", \"e\", \"f\"]",
            energies: "expression = \"0.3*x^2\"",
            weights: "expression = \"1 + i\"",
            transfer: transfer,
            extra: extra);
    }

    private static string List(IEnumerable<double> values) => string.Join(", ", values.Select(v => v.ToString("R", CultureInfo.InvariantCulture)));

    private static RateMatrix Assemble(Deck deck) => RateMatrixAssembler.Assemble(deck, StateSpaceBuilder.Build(deck));

    private static void AssembleDeck(Deck deck) => Assemble(deck);
}
