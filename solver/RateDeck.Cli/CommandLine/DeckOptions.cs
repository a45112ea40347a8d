using System.CommandLine;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// What every verb that reads a deck takes besides its own options: the deck file, <c>--set</c>
/// overrides, <c>--json</c>, <c>--quiet</c> and <c>--linalg</c>. Declared once here; a verb adds
/// only its own options.
/// </summary>
internal static class DeckOptions
{
    /// <summary>The name of the deck argument.</summary>
    public const string Deck = "DECK";

    /// <summary>The overrides option.</summary>
    public const string Set = "--set";

    /// <summary>The JSON switch.</summary>
    public const string Json = "--json";

    /// <summary>The one-line summary switch.</summary>
    public const string Quiet = "--quiet";

    /// <summary>The linear-algebra provider option.</summary>
    public const string Linalg = "--linalg";

    /// <summary>A verb reading one deck, with the shared options followed by <paramref name="options"/>.</summary>
    public static Command Command(string name, string summary, params Option[] options)
    {
        var command = new Command(name, summary)
        {
            new Argument<string>(Deck) { Description = "a deck file (TOML)" },
            VerbOptions.Repeated(Set, "KEY=VALUE", "override a deck parameter or key (KEY=VALUE), or remove one (remove:KEY); repeatable, applied in order"),
            VerbOptions.Switch(Json, "print one JSON object on stdout instead of the summary"),
            VerbOptions.Switch(Quiet, "print one summary line instead of the summary"),
            VerbOptions.Word(Linalg, "linear-algebra provider (default auto, or the RATEDECK_LINALG environment variable)", "auto", "native", "managed"),
        };
        foreach (var option in options)
        {
            command.Options.Add(option);
        }

        return command;
    }
}
