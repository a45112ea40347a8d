using System.Text.Json;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Tests.Cli;
using RateDeck.Tests.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Stiff;

/// <summary>
/// Slow rates of stiff decks too large for the double-double path, or without detailed balance,
/// by inverse subspace iteration on the M-matrix factors (docs/stiff-decks.md): against mpmath
/// references at 60 digits (tests/reference/make_slow_mode_fixtures.py, mpmath 1.3.0) and the
/// closed form of a uniform birth-death chain, to 1e-10 relative, through the engine and the
/// `stiffness` verb.
/// </summary>
public class SlowModeTests
{
    private const double _tolerance = 1e-10;

    /// <summary>
    /// A 200-state chain with neighbour rates from 1e-6 to 9e6 (dense storage): the double spectrum
    /// loses its slow modes, and every slow rate reported matches mpmath's Sturm bisection.
    /// </summary>
    [Theory]
    [InlineData("stiff-chain-200", false)]
    [InlineData("stiff-chain-1500", true)]
    public void StiffChain_SlowRatesMatchMpmathSturmBisection(string name, bool sparse)
    {
        using var folder = new TempFolder();
        var fixture = SlowModeFixture.Case(name);
        var loaded = Load(SlowModeFixture.WriteChain(folder, name, fixture.Energies, fixture.Down));

        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);

        Assert.Equal(sparse, loaded.Rates.IsSparse);
        Assert.False(spectrum.IsResolved);
        var slow = spectrum.SlowModes!;
        Assert.True(slow.Converged, slow.Failure);
        Assert.NotEmpty(slow.Modes);
        for (var k = 0; k < slow.Modes.Count; k++)
        {
            var expected = fixture.SlowRates[k];
            Assert.True(Math.Abs(slow.Modes[k].Rate.Real - expected) <= _tolerance * expected, $"mode {k + 1}: {slow.Modes[k].Rate.Real:R} against {expected:R}");
            Assert.Equal(0, slow.Modes[k].Rate.Imaginary);
        }

        Assert.Equal(fixture.SlowRates[0], spectrum.SlowestRate!.Value, fixture.SlowRates[0] * _tolerance);
    }

    [Trait("Through", "program")]
    [Fact]
    public void StiffnessVerb_OnAStiffChainOf200States_ReportsTheMpmathSlowestRate()
    {
        using var folder = new TempFolder();
        var fixture = SlowModeFixture.Case("stiff-chain-200");
        var deck = SlowModeFixture.WriteChain(folder, "chain", fixture.Energies, fixture.Down);

        var (code, output, error) = CliRunner.Run("stiffness", deck, "--json");
        var (textCode, text, _) = CliRunner.Run("stiffness", deck);

        Assert.True(code == 0, error);
        using var json = JsonDocument.Parse(output);
        var root = json.RootElement;
        Assert.Equal(fixture.SlowRates[0], root.GetProperty("slowest_rate").GetDouble(), fixture.SlowRates[0] * _tolerance);
        Assert.True(root.GetProperty("slow_modes_resolved").GetBoolean());
        Assert.Contains("inverse subspace iteration", root.GetProperty("slow_modes_path").GetString());
        var rates = root.GetProperty("slow_rates").EnumerateArray().Select(r => r.GetDouble()).ToArray();
        Assert.True(rates.Length >= 2, $"{rates.Length} slow rates");
        Assert.Equal(fixture.SlowRates[1], rates[1], fixture.SlowRates[1] * _tolerance);
        Assert.Equal(0, textCode);
        Assert.Contains("slow modes               inverse subspace iteration", text);
        Assert.Contains("slowest rate 2.27e-9", text);
        Assert.DoesNotContain("NOT RESOLVED", text);
    }

    /// <summary>
    /// A full measured matrix of 200 states without detailed balance (four clusters, fast inside,
    /// 1e-12 to 1e-9 between, one loss): its slowest rate is the Perron root of -K, which mpmath
    /// certifies by the Collatz-Wielandt bounds of power iteration on the inverse.
    /// </summary>
    [Trait("Through", "program")]
    [Fact]
    public void FullMatrixWithoutDetailedBalance_SlowestRateMatchesMpmathPerronRoot()
    {
        using var folder = new TempFolder();
        var expected = SlowModeFixture.Case("full-leaking-200").SlowRates[0];
        var deck = SlowModeFixture.WriteFullLeaking(folder);
        var loaded = Load(deck);

        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);
        var (code, output, error) = CliRunner.Run("stiffness", deck, "--json");

        Assert.Equal(SpectrumPath.General, spectrum.Path);
        Assert.False(spectrum.IsResolved);
        Assert.True(spectrum.SlowModes!.Converged, spectrum.SlowModes.Failure);
        Assert.Equal(expected, spectrum.SlowestRate!.Value, expected * _tolerance);
        Assert.True(code == 0, error);
        using var json = JsonDocument.Parse(output);
        Assert.Equal(expected, json.RootElement.GetProperty("slowest_rate").GetDouble(), expected * _tolerance);
    }

    /// <summary>
    /// A uniform birth-death chain, rate p up and q down between neighbours of N states with
    /// reflecting ends, has the eigenvalues 0 and -(p + q - 2 sqrt(pq) cos(k pi / N)), k = 1..N-1
    /// (the reflecting random walk; Feller, An Introduction to Probability Theory and Its
    /// Applications, vol. I, ch. XVI, from memory), written here as
    /// (sqrt p - sqrt q)^2 + 4 sqrt(pq) sin^2(k pi / 2N) so that nothing cancels. Its slowest rate
    /// is 4N^2/pi^2 times below the fastest, which N eps rho cannot resolve to 1e-10 at N = 300,
    /// dense, or N = 2000, stored as a band.
    /// </summary>
    [Theory]
    [InlineData(300, false)]
    [InlineData(2000, true)]
    public void UniformChain_SlowRatesMatchTheClosedForm(int n, bool sparse)
    {
        using var folder = new TempFolder();
        var energies = Enumerable.Range(1, n).Select(i => (0.01 * i).ToString("R", System.Globalization.CultureInfo.InvariantCulture)).ToArray();
        var loaded = Load(SlowModeFixture.WriteChain(folder, "uniform", energies, [.. Enumerable.Repeat("1", n - 1)]));
        var (p, q) = (loaded.Rates.Generator[1, 0], 1.0);

        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);

        Assert.Equal(sparse, loaded.Rates.IsSparse);
        Assert.False(spectrum.IsResolved);
        var modes = spectrum.SlowModes!.Modes;
        Assert.True(modes.Count >= 2, spectrum.SlowModes.Failure);
        for (var k = 1; k <= modes.Count; k++)
        {
            var sine = Math.Sin(k * Math.PI / (2.0 * n));
            var expected = Math.Pow(Math.Sqrt(p) - Math.Sqrt(q), 2) + (4 * Math.Sqrt(p * q) * sine * sine);
            Assert.True(Math.Abs(modes[k - 1].Rate.Real - expected) <= _tolerance * expected, $"mode {k}: {modes[k - 1].Rate.Real:R} against {expected:R}");
        }
    }

    /// <summary>
    /// A one-way ring of N states (rate k from each state to the next, the last to the first) is a
    /// closed class without detailed balance. Its generator is circulant, with eigenvalues
    /// -k (1 - exp(2 pi i j / N)), j = 0..N-1 (the eigenvalues of a circulant matrix, Davis,
    /// Circulant Matrices, ch. 3, from memory): the slowest decay is the pair j = +-1 at
    /// 2k sin^2(pi / N) with frequency k sin(2 pi / N). At N = 200 the double spectrum cannot
    /// resolve it to 1e-10, and the group-inverse path must find the complex pair.
    /// </summary>
    [Fact]
    public void OneWayRing_SlowestPairMatchesTheCirculantEigenvalues()
    {
        using var folder = new TempFolder();
        const int n = 200;
        const double k = 3.0;
        var rows = string.Concat(Enumerable.Range(1, n).Select(i => $"{i},{(i % n) + 1},3\n"));
        var deck = SlowModeFixture.WriteFull(folder, "ring", n, rows, "");
        var loaded = Load(deck);

        var spectrum = Spectrum.Compute(loaded.Rates, loaded.Algebra);

        Assert.Equal(SpectrumPath.General, spectrum.Path);
        Assert.False(spectrum.IsResolved);
        var slow = spectrum.SlowModes!;
        Assert.True(slow.Converged, slow.Failure);
        var decay = 2 * k * Math.Pow(Math.Sin(Math.PI / n), 2);
        var frequency = k * Math.Sin(2 * Math.PI / n);
        Assert.Equal(decay, spectrum.SlowestRate!.Value, decay * _tolerance);
        Assert.Equal(frequency, Math.Abs(slow.Modes[0].Rate.Imaginary), frequency * _tolerance);
        Assert.Equal(-slow.Modes[0].Rate.Imaginary, slow.Modes[1].Rate.Imaginary, frequency * _tolerance);
    }

    /// <summary>
    /// The wiring from `run` down: spectrum.csv carries the accurate slow rates beside the
    /// structural zero and says where each row comes from, and the steady-state line takes its
    /// approach time from them.
    /// </summary>
    [Trait("Through", "program")]
    [Fact]
    public void Run_OnAStiffChain_WritesTheAccurateSlowRatesToSpectrumCsv()
    {
        using var folder = new TempFolder();
        var fixture = SlowModeFixture.Case("stiff-chain-200");
        var deck = SlowModeFixture.WriteChain(folder, "chain", fixture.Energies, fixture.Down, "t_end = 1e-6\noutputs = 3");

        var (code, output, error) = CliRunner.Run("run", deck, "--exact-only", "--no-plots", "--out", folder.File("out"));

        Assert.True(code == 0, error);
        var lines = File.ReadAllLines(folder.File("out/spectrum.csv"));
        Assert.Contains(lines, l => l.StartsWith("# modes:", StringComparison.Ordinal) && l.Contains("inverse subspace iteration"));
        var rows = ResultFiles.Rows(folder.File("out/spectrum.csv"));
        Assert.Equal(200, rows.Length);
        Assert.Equal(0.0, rows[^1][1]);
        Assert.Equal(-fixture.SlowRates[0], rows[^2][1], fixture.SlowRates[0] * _tolerance);
        Assert.Equal(1 / fixture.SlowRates[0], rows[^2][3], _tolerance / fixture.SlowRates[0]);
        Assert.Equal(-fixture.SlowRates[1], rows[^3][1], fixture.SlowRates[1] * _tolerance);
        Assert.Contains($"approach time {RateDeck.Text.Format.Number(1 / fixture.SlowRates[0])} s (1 / the slowest rate from inverse subspace iteration", output);
    }

    /// <summary>A negative rate makes -K no M-matrix: the slow rates are refused, not guessed (the refusal the spectrum keeps).</summary>
    [Fact]
    public void NegativeRate_RefusesTheSlowRates()
    {
        var offDiagonal = new double[4, 4];
        for (var i = 0; i < 3; i++)
        {
            offDiagonal[i + 1, i] = 1e-9;
            offDiagonal[i, i + 1] = 1e9;
        }

        offDiagonal[3, 0] = -1e-12;
        var rates = TestRates.Build(offDiagonal);

        var slow = SlowModes.Compute(rates, balanced: false);

        Assert.False(slow.Converged);
        Assert.Contains("negative", slow.Failure);
        Assert.Null(slow.SlowestRate);
    }

    private static LoadedDeck Load(string deck) => DeckPipeline.Load(deck, [], LinearAlgebraProviders.Select(null, out _));
}
