using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Decks;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck resolve DECK</c>: prints the deck, with its <c>--set</c> overrides applied, as TOML
/// with every default written out. The text is read back before it is printed and must give the
/// same deck, so that what ran can be committed beside the results.
/// </summary>
public sealed class ResolveVerb : IVerb
{
    /// <summary>Declares the verb: the deck and its overrides, nothing that runs it.</summary>
    public ResolveVerb() => Command = new Command("resolve", "print the deck with every default written out, as TOML that checks and runs the same")
    {
        new Argument<string>(DeckOptions.Deck) { Description = "a deck file (TOML)" },
        VerbOptions.Repeated(DeckOptions.Set, "KEY=VALUE", "override a deck parameter or key (KEY=VALUE), or remove one (remove:KEY); written into the resolved deck"),
    };

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var deck = DeckReader.Read(args.DeckPath, args.Overrides);
        var text = DeckResolver.Resolve(deck);
        var reread = DeckReader.Parse(text, args.DeckPath, Path.GetDirectoryName(args.DeckPath) ?? "", []);
        if (reread.Title != deck.Title || reread.KT != deck.KT || reread.Grid.Count != deck.Grid.Count)
        {
            throw new InvalidOperationException("the resolved deck reads back differently from the deck");
        }

        context.Out.Write(text);
        return ExitCodes.Success;
    }
}
