using RateDeck.Text;
namespace RateDeck.Decks;

/// <summary>
/// Applies <c>--set key=value</c> overrides to a parsed deck before it is read. A key is a
/// parameter name (<c>alpha=2</c>), a top-level key (<c>title=...</c>) or a dotted deck key
/// (<c>run.t_end=10</c>, <c>losses.by_state.k1=0.5</c>); the value is parsed as TOML, and a bare
/// word is taken as a string. Setting one of a table's alternative keys removes the others, so
/// <c>initial.state=k3</c> replaces <c>equilibrium = true</c>. Errors carry the span
/// <c>SourceSpan.None("--set key=value")</c>.
/// </summary>
internal static class Overrides
{
    public static void Apply(TomlTableNode root, IReadOnlyList<string> overrides)
    {
        foreach (var text in overrides)
        {
            ApplyOne(root, text);
        }
    }

    private static void ApplyOne(TomlTableNode root, string text)
    {
        var origin = SourceSpan.None("--set " + text);
        var equals = text.IndexOf('=');
        if (equals <= 0)
        {
            throw new DeckException(origin, "an override is written key=value, like run.t_end=10 or alpha=0.3");
        }

        var path = text[..equals].Trim().Split('.');
        if (path.Any(p => p.Length == 0))
        {
            throw new DeckException(origin, $"`{text[..equals]}` is not a key; write names joined by dots, like temperature.kT");
        }

        var valueText = text[(equals + 1)..];
        if (valueText.Trim().Length == 0)
        {
            throw new DeckException(origin, "the override has no value after `=`");
        }

        var target = Target(root, path, origin);
        var key = path[^1];
        if (path.Length == 2 && DeckSchema.Alternatives.TryGetValue(path[0], out var alternatives) && alternatives.Contains(key))
        {
            foreach (var other in alternatives.Where(a => a != key))
            {
                target.Remove(other);
            }
        }

        target.Set(new TomlEntry(key, origin, TomlTree.ParseOverrideValue(valueText, origin)));
    }

    /// <summary>The table that receives the override's last key, after checking the whole key against the schema.</summary>
    private static TomlTableNode Target(TomlTableNode root, string[] path, SourceSpan origin)
    {
        if (path.Length == 1)
        {
            var name = path[0];
            if (DeckSchema.TopLevelKeys.Contains(name))
            {
                return root;
            }

            if (Parameters(root).Find(name) is not null)
            {
                return Parameters(root);
            }

            if (DeckSchema.Tables.ContainsKey(name))
            {
                throw new DeckException(origin, $"`{name}` is a table; set one of its keys, like {name}.{FirstKey(name)}=...");
            }

            throw new DeckException(origin, UnknownParameter(root, name));
        }

        var table = path[0];
        if (DeckSchema.TopLevelKeys.Contains(table))
        {
            throw new DeckException(origin, $"`{table}` holds a value, not a table; set it as {table}=...");
        }

        if (!DeckSchema.Tables.TryGetValue(table, out var keys))
        {
            throw new DeckException(origin, DeckSchema.UnknownTopLevel(table));
        }

        if (table == "parameters")
        {
            if (path.Length != 2 || Parameters(root).Find(path[1]) is null)
            {
                throw new DeckException(origin, UnknownParameter(root, string.Join('.', path[1..])));
            }

            return Parameters(root);
        }

        var key = path[1];
        if (!keys.Contains(key))
        {
            throw new DeckException(origin, DeckSchema.UnknownKey(table, key));
        }

        var byState = key == "by_state";
        if (path.Length > (byState ? 3 : 2))
        {
            throw new DeckException(origin, $"`{string.Join('.', path)}` goes deeper than the deck's keys; `{table}.{key}` holds a value");
        }

        var section = root.GetOrAddTable(table, origin);
        if (byState && path.Length == 3)
        {
            // Setting one state's rate keeps by_state as the chosen alternative.
            foreach (var other in DeckSchema.Alternatives[table].Where(a => a != key))
            {
                section.Remove(other);
            }

            return section.GetOrAddTable(key, origin);
        }

        return section;
    }

    private static TomlTableNode Parameters(TomlTableNode root)
        => root.Find("parameters")?.Value as TomlTableNode ?? new TomlTableNode(root.Span);

    private static string UnknownParameter(TomlTableNode root, string name)
    {
        var known = Parameters(root).Entries.Select(e => e.Key).ToList();
        var listing = known.Count == 0 ? "The deck has no [parameters]." : $"The deck's parameters are {string.Join(", ", known)}.";
        return $"`{name}` is neither a parameter of the deck nor a deck key.{Suggestions.Hint(name, known.Concat(DeckSchema.TopLevelKeys))} {listing} A deck key is written table.key, like run.t_end.";
    }

    private static string FirstKey(string table) => DeckSchema.Tables[table] is [var first, ..] ? first : "name";
}
