using RateDeck.Cli.CommandLine;
using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>What the verbs share: loading a deck with the chosen provider, and the deck line of a summary.</summary>
internal static class VerbSupport
{
    /// <summary>Loads the deck named on the command line through the pipeline with the provider asked for.</summary>
    public static LoadedDeck Load(VerbArguments args) => DeckPipeline.Load(args.DeckPath, args.Overrides, Algebra(args));

    /// <summary>The linear-algebra provider asked for with <c>--linalg</c> (automatic when absent); a bad choice is a usage error.</summary>
    public static ILinearAlgebra Algebra(VerbArguments args)
    {
        try
        {
            return LinearAlgebraProviders.Select(args.LinearAlgebra, out _);
        }
        catch (LinearAlgebraChoiceException e)
        {
            throw new UsageException(e.Message);
        }
    }

    /// <summary>The output folder: <paramref name="asked"/> (<c>--out</c>), else <c>ratedeck-out/&lt;deck file name without extension&gt;</c>.</summary>
    public static string OutputFolder(string? asked, Deck deck) =>
        asked ?? Path.Combine("ratedeck-out", Path.GetFileNameWithoutExtension(deck.SourcePath));

    /// <summary>
    /// True when a progress bar may be drawn: the verb writes to the console, stdout is a terminal
    /// (not piped or redirected to a file) and neither --json nor --quiet asked for plain output.
    /// </summary>
    public static bool ShowsProgress(VerbArguments args, VerbContext context) =>
        context.Error == Console.Error && !Console.IsOutputRedirected && !args.Json && !args.Quiet;

    /// <summary>
    /// The provenance every JSON summary starts with (tool version, deck, hash, overrides, provider,
    /// state count, kT and its units, the unit of every time and rate that follows and the unit the
    /// deck's own numbers are in); a verb adds its own snake_case keys in order.
    /// </summary>
    public static Dictionary<string, object?> JsonFields(LoadedDeck loaded) => JsonFields(loaded.Deck, loaded.Algebra);

    /// <summary>The provenance of <see cref="JsonFields(LoadedDeck)"/> for a verb that holds the deck without its assembled stages (fit).</summary>
    public static Dictionary<string, object?> JsonFields(Deck deck, ILinearAlgebra algebra) => new()
    {
        ["tool_version"] = ToolInfo.Version,
        ["deck"] = deck.SourcePath,
        ["deck_sha256"] = deck.Sha256,
        ["overrides"] = deck.Overrides,
        ["linear_algebra"] = algebra.Name,
        ["states"] = deck.Grid.Count,
        ["kt"] = deck.KT,
        ["energy_unit"] = EnergyUnits.Name(deck.EnergyUnit),
        ["temperature_kelvin"] = EnergyUnits.KelvinFromKT(deck.KT, deck.EnergyUnit),
        ["time_unit"] = deck.TimeUnit,
        ["rate_unit"] = Format.RateUnit(deck.TimeUnit),
        ["deck_time_unit"] = deck.GivenTimeUnit ?? deck.TimeUnit,
    };

    /// <summary>The first lines of every summary: which deck, how many states, which provider.</summary>
    public static void WriteDeckLine(TextWriter output, LoadedDeck loaded)
    {
        var deck = loaded.Deck;
        output.WriteLine($"deck         {deck.SourcePath}  \"{deck.Title}\"  sha256 {deck.Sha256[..12]}");
        if (deck.Overrides.Count > 0)
        {
            output.WriteLine($"overrides    {string.Join(" ", deck.Overrides)}");
        }

        output.WriteLine($"states       {loaded.States.Count} ({StateRange(loaded.States.Labels)})   linear algebra: {loaded.Algebra.Name}");
        output.WriteLine($"temperature  {Temperature(deck)}");
        if (deck.GivenTimeUnit is { } given)
        {
            output.WriteLine($"time unit    {deck.TimeUnit} in every result; the deck's rates are per {given} and its times in {given}, converted");
        }
    }

    /// <summary>"kT = 0.05 eV (T = 580 K)"; a deck in model units has no kelvin and says so.</summary>
    private static string Temperature(Deck deck) => EnergyUnits.KelvinFromKT(deck.KT, deck.EnergyUnit) is { } kelvin
        ? $"kT = {Format.Number(deck.KT)} {EnergyUnits.Name(deck.EnergyUnit)} (T = {Format.Number(kelvin)} K)"
        : $"kT = {Format.Number(deck.KT)} (model energy units, no temperature in kelvin)";

    private static string StateRange(string[] labels) =>
        labels.Length <= 4 ? string.Join(", ", labels) : $"{labels[0]} .. {labels[^1]}";

    /// <summary>The command-line name of an explicit method.</summary>
    public static string MethodName(ExplicitMethod method) => Propagation.ExplicitPropagatorChoice.MethodName(method);
}
