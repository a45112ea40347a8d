using RateDeck.Outputs;

namespace RateDeck.Decks;

/// <summary>
/// A deck with every default written out (<c>ratedeck resolve</c>): the deck file's values with
/// its overrides applied, plus each key the deck left to its default, set to the value the reader
/// used. Read again, it gives the same deck, so what ran can be committed beside the results.
/// </summary>
public static class DeckResolver
{
    /// <summary>The resolved deck as TOML text, headed by comments saying where it came from.</summary>
    /// <exception cref="InvalidOperationException">The deck was built in code, not read from a deck file.</exception>
    public static string Resolve(Deck deck)
    {
        ArgumentNullException.ThrowIfNull(deck);
        var source = deck.Source ?? throw new InvalidOperationException("this deck was built in code, not read from a deck file");
        var root = source.Root.DeepCopy();
        Overrides.Apply(root, deck.AppliedOverrides);
        var span = SourceSpan.None(deck.SourcePath);
        var filled = new List<string>();

        void Default(TomlTableNode table, string path, string key, object value)
        {
            if (table.Find(key) is null)
            {
                table.Set(new TomlEntry(key, span, value is TomlNode node ? node : new TomlScalar(value, span, span)));
                filled.Add(path.Length == 0 ? key : $"{path}.{key}");
            }
        }

        Default(root, "", "title", deck.Title);
        var units = root.GetOrAddTable("units", span);
        Default(units, "units", "energy", EnergyUnits.Name(deck.EnergyUnit));
        if (units.Find("model_time") is null)
        {
            Default(units, "units", "time", deck.GivenTimeUnit ?? deck.TimeUnit);
            Default(units, "units", "output_time", deck.TimeUnit);
        }

        var states = root.GetOrAddTable("states", span);
        if (states.Find("labels") is null)
        {
            if (states.Find("coordinates") is not null)
            {
                Default(states, "states", "labels", new TomlArrayNode([.. deck.Grid.Labels.Select(l => new TomlScalar(l, span, span))], span));
            }
            else
            {
                Default(states, "states", "label_prefix", "s");
            }
        }

        if (root.Find("initial") is null)
        {
            Default(root.GetOrAddTable("initial", span), "initial", "equilibrium", true);
        }

        var run = root.GetOrAddTable("run", span);
        Default(run, "run", "outputs", (long)deck.Run.OutputCount);
        Default(run, "run", "spacing", deck.Run.Spacing == OutputSpacing.Logarithmic ? "log" : "linear");
        if (deck.Run.FirstTime is { } first && deck.GivenTimeUnit is null)
        {
            Default(run, "run", "t_first", first);
        }

        Default(run, "run", "explicit", deck.Run.Method == ExplicitMethod.Euler ? "euler" : "rk4");
        Default(run, "run", "dt", "auto");
        Default(run, "run", "safety", deck.Run.SafetyFactor);
        Default(run, "run", "accuracy", deck.Run.Accuracy);

        var header = new List<string>
        {
            $"# {deck.SourcePath} resolved by {ToolInfo.Name} {ToolInfo.Version}: every default written out.",
            $"# deck_sha256: {deck.Sha256}",
            $"# overrides: {(deck.Overrides.Count == 0 ? "none" : string.Join(" ", deck.Overrides))}",
            $"# defaults written: {(filled.Count == 0 ? "none" : string.Join(", ", filled))}",
            "# Relative file paths are as the deck wrote them: keep this file in the deck's folder.",
        };
        return string.Join("\n", header) + "\n" + TomlWriter.Write(root);
    }
}
