using System.Text.Json;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.Rates;
using RateDeck.States;

namespace RateDeck.Tests.Diagnostics;

/// <summary>Rate matrices built directly for the diagnostics tests (the deck reader and assembler live elsewhere).</summary>
internal static class TestMatrices
{
    /// <summary>
    /// K from off-diagonal rates (rates[i, j] = rate from j to i); the diagonal makes each column
    /// sum to minus its loss. Equilibrium ln pi = logWeights normalised (zero energies, kT = 1).
    /// </summary>
    public static RateMatrix FromRates(double[,] rates, double[]? logWeights = null, BalanceOrigin origin = BalanceOrigin.TakenAsGiven,
        double[]? loss = null, double[]? pumping = null)
    {
        var n = rates.GetLength(0);
        loss ??= new double[n];
        var k = DenseMatrix.Create(n, n, (i, j) => i == j ? 0 : rates[i, j]);
        for (var j = 0; j < n; j++)
        {
            k[j, j] = -k.Column(j).Sum() - loss[j];
        }

        return Wrap(k, logWeights ?? new double[n], origin, loss, pumping ?? new double[n], [.. Enumerable.Range(0, n).Select(i => $"s{i}")]);
    }

    /// <summary>Wraps a full generator with its labels; ln pi = logWeights normalised.</summary>
    public static RateMatrix Wrap(DenseMatrix k, double[] logWeights, BalanceOrigin origin, double[] loss, double[] pumping, string[] labels)
    {
        var n = k.RowCount;
        var top = logWeights.Max();
        var logZ = top + Math.Log(logWeights.Sum(w => Math.Exp(w - top)));
        var states = new StateSpace(labels, [.. Enumerable.Range(0, n).Select(i => (double)i)], new double[n], logWeights, 1.0,
            [.. logWeights.Select(w => w - logZ)]);
        return new RateMatrix(states, k, loss, pumping, origin);
    }

    /// <summary>Symmetric random walk on n sites with reflecting ends, hop rate r each way.</summary>
    public static RateMatrix RandomWalk(int n, double r, BalanceOrigin origin = BalanceOrigin.CompletedByDetailedBalance, double[]? logWeights = null)
    {
        var rates = new double[n, n];
        for (var i = 0; i + 1 < n; i++)
        {
            rates[i + 1, i] = r;
            rates[i, i + 1] = r;
        }

        return FromRates(rates, logWeights, origin);
    }

    /// <summary>
    /// Continuous-time Ehrenfest urn with m balls: state n = balls in the first urn; events at
    /// rate r each move one ball chosen uniformly, so n -> n-1 at r n / m and n -> n+1 at r (m-n) / m.
    /// Weights are the binomial coefficients C(m, n).
    /// </summary>
    public static RateMatrix Ehrenfest(int m, double r, BalanceOrigin origin = BalanceOrigin.CompletedByDetailedBalance)
    {
        var rates = new double[m + 1, m + 1];
        for (var n = 0; n <= m; n++)
        {
            if (n > 0)
            {
                rates[n - 1, n] = r * n / m;
            }

            if (n < m)
            {
                rates[n + 1, n] = r * (m - n) / m;
            }
        }

        var logBinomial = Enumerable.Range(0, m + 1).Select(n => MathNet.Numerics.SpecialFunctions.BinomialLn(m, n)).ToArray();
        return FromRates(rates, logBinomial, origin);
    }

    /// <summary>The fixture written by tests/reference/make_diagnostics_fixtures.py (Debian SciPy).</summary>
    public static JsonElement Fixture { get; } = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "diagnostics.json"))).RootElement;

    /// <summary>One case of the fixture by name.</summary>
    public static JsonElement Case(string name) => Fixture.GetProperty("cases").EnumerateArray().Single(c => c.GetProperty("name").GetString() == name);

    /// <summary>A fixture case as a rate matrix (no losses, no pumping), its origin overridable.</summary>
    public static RateMatrix FromFixture(string name, BalanceOrigin? origin = null)
    {
        var entry = Case(name);
        var rows = entry.GetProperty("generator").EnumerateArray().Select(r => r.EnumerateArray().Select(v => v.GetDouble()).ToArray()).ToArray();
        var n = rows.Length;
        var k = DenseMatrix.Create(n, n, (i, j) => rows[i][j]);
        var labels = entry.GetProperty("labels").EnumerateArray().Select(l => l.GetString()!).ToArray();
        return Wrap(k, Doubles(entry, "log_equilibrium"), origin ?? Enum.Parse<BalanceOrigin>(entry.GetProperty("origin").GetString()!), new double[n], new double[n], labels);
    }

    /// <summary>A numeric array property of a fixture entry.</summary>
    public static double[] Doubles(JsonElement entry, string property) =>
        [.. entry.GetProperty(property).EnumerateArray().Select(v => v.GetDouble())];

    /// <summary>y = K x.</summary>
    public static double[] Apply(RateMatrix rates, double[] x) => [.. rates.Generator.Multiply(DenseVector.OfArray(x))];
}
