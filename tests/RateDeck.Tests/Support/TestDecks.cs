using RateDeck.Decks;

namespace RateDeck.Tests.Support;

/// <summary>Builds <see cref="Deck"/> records directly from arrays, for stage tests that skip the TOML reader.</summary>
internal static class TestDecks
{
    /// <summary>The file name every test span points into.</summary>
    public const string File = "test.toml";

    /// <summary>A span on <paramref name="line"/> of the test file.</summary>
    public static SourceSpan At(int line, int column = 1) => new(File, line, column);

    /// <summary>
    /// A deck on the grid <paramref name="coordinates"/> (labels s1, s2, ...; unit cells unless
    /// <paramref name="cellWidths"/> is given) with the given energies, weights and coupling.
    /// Spans: grid line 2, energies 3, weights 4, coupling 5, losses 6, pumping 7, kT 8.
    /// </summary>
    public static Deck Create(
        double[] coordinates,
        double[] energies,
        WeightSpec weights,
        CouplingSpec coupling,
        double kT = 1.0,
        EnergyUnit unit = EnergyUnit.Dimensionless,
        double[]? cellWidths = null,
        double[]? losses = null,
        double[]? pumping = null,
        params DeckParameter[] parameters)
    {
        var labels = Enumerable.Range(1, coordinates.Length).Select(k => $"s{k}").ToArray();
        return new Deck
        {
            SourcePath = File,
            Sha256 = new string('0', 64),
            Title = "stage test",
            FormatVersion = 1,
            EnergyUnit = unit,
            TimeUnit = "s",
            KT = kT,
            KTSpan = At(8),
            Grid = new GridSpec(coordinates, labels, cellWidths ?? coordinates.Select(_ => 1.0).ToArray(), At(2)),
            Energies = new PerStateValues(energies, At(3)),
            Weights = weights,
            Coupling = coupling,
            Losses = losses is null ? null : new PerStateValues(losses, At(6)),
            Pumping = pumping is null ? null : new PerStateValues(pumping, At(7)),
            Initial = new InitialEquilibrium(At(9)),
            Run = new RunSpec(1.0, 11, OutputSpacing.Linear, null, ExplicitMethod.Euler, null, 0.5, [], At(10)),
            Parameters = parameters.ToDictionary(p => p.Name),
            Overrides = [],
        };
    }

    /// <summary>Weights given per state.</summary>
    public static WeightSpec Weights(params double[] g) => new GivenWeights(new PerStateValues(g, At(4)));

    /// <summary>No coupling at all (a full matrix with no entries).</summary>
    public static CouplingSpec NoCoupling { get; } = new MeasuredFull([], At(5));

    /// <summary>Measured one-way rates, entry k on line 20 + k.</summary>
    public static MeasuredOneWay OneWay(TransferDirection direction, params (int From, int To, double Rate)[] entries)
        => new(direction, Entries(entries), At(5));

    /// <summary>A full measured matrix, entry k on line 20 + k.</summary>
    public static MeasuredFull Full(params (int From, int To, double Rate)[] entries) => new(Entries(entries), At(5));

    private static RateEntry[] Entries((int From, int To, double Rate)[] entries)
        => entries.Select((e, k) => new RateEntry(e.From, e.To, e.Rate, At(20 + k))).ToArray();
}
