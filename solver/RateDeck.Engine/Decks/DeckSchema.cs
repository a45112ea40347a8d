using RateDeck.Text;
namespace RateDeck.Decks;

/// <summary>
/// The keys of deck format 1: what may appear where, and which keys are alternatives to each
/// other. Unknown keys are errors with a "did you mean" hint, both in a deck and in an override.
/// </summary>
internal static class DeckSchema
{
    /// <summary>Keys of the top level that hold plain values.</summary>
    public static readonly string[] TopLevelKeys = ["format", "title"];

    /// <summary>The tables and their keys; <see cref="OpenTables"/> take any key.</summary>
    public static readonly IReadOnlyDictionary<string, string[]> Tables = new Dictionary<string, string[]>(StringComparer.Ordinal)
    {
        ["units"] = ["energy", "time", "model_time", "output_time"],
        ["temperature"] = ["kT", "kelvin"],
        ["parameters"] = [],
        ["states"] = ["coordinates", "labels", "spacing", "count", "from", "to", "label_prefix", "coordinate_name", "coordinate_unit"],
        ["energies"] = ["values", "expression"],
        ["weights"] = ["values", "expression", "isotropic_dimension", "from_mechanics"],
        ["transfer"] = ["kind", "direction", "csv", "kernel", "band"],
        ["losses"] = ["values", "expression", "by_state"],
        ["pumping"] = ["values", "expression", "by_state"],
        ["initial"] = ["state", "values", "expression", "equilibrium", "csv"],
        ["run"] = ["t_end", "outputs", "spacing", "t_first", "explicit", "dt", "safety", "accuracy", "times", "plot_states"],
        ["mechanics"] = ["lagrangian", "planck"],
        ["plot"] = ["time_axis", "state_axis"],
        ["fit"] = ["starts", "seed", "max_iterations", "profile", "profile_level", "derivatives", "triangle", "free", "observables", "data"],
    };

    /// <summary>Tables whose keys are names the deck chooses (parameter names, state labels).</summary>
    public static readonly string[] OpenTables = ["parameters", "losses.by_state", "pumping.by_state"];

    /// <summary>Keys of a table that are alternative ways to give the same thing: at most one may appear.</summary>
    public static readonly IReadOnlyDictionary<string, string[]> Alternatives = new Dictionary<string, string[]>(StringComparer.Ordinal)
    {
        ["units"] = ["time", "model_time"],
        ["temperature"] = ["kT", "kelvin"],
        ["energies"] = ["values", "expression"],
        ["weights"] = ["values", "expression", "isotropic_dimension", "from_mechanics"],
        ["losses"] = ["values", "expression", "by_state"],
        ["pumping"] = ["values", "expression", "by_state"],
        ["initial"] = ["state", "values", "expression", "equilibrium", "csv"],
    };

    /// <summary>Every name allowed at the top level.</summary>
    public static IEnumerable<string> TopLevelNames => TopLevelKeys.Concat(Tables.Keys);

    /// <summary>
    /// Rejects unknown keys anywhere in <paramref name="root"/>, at the key's span, and values of
    /// the wrong shape where a table is expected.
    /// </summary>
    public static void Check(TomlTableNode root)
    {
        foreach (var entry in root.Entries)
        {
            if (Tables.TryGetValue(entry.Key, out var keys))
            {
                if (entry.Value is not TomlTableNode table)
                {
                    throw new DeckException(entry.Value.Span, $"`{entry.Key}` must be a table, written [{entry.Key}] on its own line; it is {entry.Value.Describe()}");
                }

                CheckTable(entry.Key, table, keys);
            }
            else if (!TopLevelKeys.Contains(entry.Key))
            {
                throw new DeckException(entry.KeySpan, UnknownTopLevel(entry.Key));
            }
        }
    }

    /// <summary>The message for an unknown name at the top level.</summary>
    public static string UnknownTopLevel(string key)
        => $"unknown key `{key}`.{Suggestions.Hint(key, TopLevelNames)} The deck's keys are {string.Join(", ", TopLevelKeys)} and the tables {string.Join(", ", Tables.Keys.Select(t => $"[{t}]"))}.";

    /// <summary>The message for an unknown key of a known table.</summary>
    public static string UnknownKey(string table, string key)
    {
        var known = Tables[table];
        return $"unknown key `{key}` in [{table}].{Suggestions.Hint(key, known)} Its keys are {string.Join(", ", known)}.";
    }

    private static void CheckTable(string name, TomlTableNode table, string[] keys)
    {
        if (OpenTables.Contains(name))
        {
            return;
        }

        foreach (var entry in table.Entries)
        {
            if (!keys.Contains(entry.Key))
            {
                throw new DeckException(entry.KeySpan, UnknownKey(name, entry.Key));
            }
        }
    }
}
