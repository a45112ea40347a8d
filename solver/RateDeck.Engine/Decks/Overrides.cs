using RateDeck.Text;
namespace RateDeck.Decks;

/// <summary>
/// Applies <see cref="DeckOverride"/>s to a parsed deck before it is read. The whole key is
/// checked against the schema (a parameter must exist); setting one of a table's alternative keys
/// removes the others, so <c>initial.state=k3</c> replaces <c>equilibrium = true</c>. Errors carry
/// the override's origin, <c>SourceSpan.None("--set key=value")</c>.
/// </summary>
internal static class Overrides
{
    public static void Apply(TomlTableNode root, IEnumerable<DeckOverride> overrides)
    {
        foreach (var change in overrides)
        {
            ApplyOne(root, change);
        }
    }

    /// <summary>
    /// Checks that <paramref name="key"/> names a value an override may set in the deck of
    /// <paramref name="root"/> (a deck key or one of its parameters), without changing anything.
    /// </summary>
    public static void CheckKey(TomlTableNode root, string key, SourceSpan origin)
    {
        var path = key.Split('.');
        if (path.Any(p => p.Length == 0))
        {
            throw new DeckException(origin, $"`{key}` is not a key; write names joined by dots, like temperature.kT");
        }

        if (path.Length == 1 && DeckSchema.Tables.ContainsKey(key))
        {
            throw new DeckException(origin, $"`{key}` is a table; set one of its keys, like {key}.{FirstKey(key)}=...");
        }

        Target(root, path, origin, create: false);
    }

    private static void ApplyOne(TomlTableNode root, DeckOverride change)
    {
        var origin = change.Origin;
        var path = change.Key.Split('.');
        if (path.Any(p => p.Length == 0))
        {
            throw new DeckException(origin, $"`{change.Key}` is not a key; write names joined by dots, like temperature.kT");
        }

        var key = path[^1];
        if (change.Value is not { } value)
        {
            if (path.Length == 1 && DeckSchema.Tables.ContainsKey(key))
            {
                root.Remove(key);
                return;
            }

            // A removal creates nothing: a missing table has nothing to remove.
            Target(root, path, origin, create: false)?.Remove(key);
            return;
        }

        var target = Target(root, path, origin, create: true)!;
        if (path.Length == 2 && DeckSchema.Alternatives.TryGetValue(path[0], out var alternatives) && alternatives.Contains(key))
        {
            foreach (var other in alternatives.Where(a => a != key))
            {
                target.Remove(other);
            }
        }

        target.Set(new TomlEntry(key, origin, value));
    }

    /// <summary>
    /// The table that holds the override's last key, after checking the whole key against the
    /// schema; created along the way when <paramref name="create"/>, else null when absent.
    /// </summary>
    private static TomlTableNode? Target(TomlTableNode root, string[] path, SourceSpan origin, bool create)
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

        if (!create)
        {
            var existing = root.Find(table)?.Value as TomlTableNode;
            return byState && path.Length == 3 ? existing?.Find(key)?.Value as TomlTableNode : existing;
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
