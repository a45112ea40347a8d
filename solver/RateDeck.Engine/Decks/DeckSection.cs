using System.Globalization;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// Typed access to one table of a deck. Every accessor reports a wrong type or a bad value at
/// the value's span and a missing required key at the table's span, with the key written as
/// <c>table.key</c> so the user can find it.
/// </summary>
internal sealed class DeckSection
{
    private readonly TomlTableNode? _table;

    public DeckSection(string name, TomlTableNode? table, SourceSpan missingSpan)
    {
        Name = name;
        _table = table;
        Span = table?.Span ?? missingSpan;
    }

    /// <summary>The table's name as written in the deck (empty for the top level).</summary>
    public string Name { get; }

    /// <summary>Where the table is written, or where a missing table would be reported.</summary>
    public SourceSpan Span { get; }

    /// <summary>Whether the deck has this table.</summary>
    public bool Exists => _table is not null;

    public bool Has(string key) => _table?.Find(key) is not null;

    public TomlEntry? Entry(string key) => _table?.Find(key);

    public IEnumerable<TomlEntry> Entries => _table?.Entries ?? [];

    /// <summary>The key as the user would search for it: <c>run.t_end</c>.</summary>
    public string Qualified(string key) => Name.Length == 0 ? key : $"{Name}.{key}";

    /// <summary>
    /// Which of the alternative keys is given (null when none); two of them is an error at the
    /// second one.
    /// </summary>
    public string? Choice(IReadOnlyList<string> alternatives)
    {
        TomlEntry? chosen = null;
        foreach (var entry in Entries)
        {
            if (!alternatives.Contains(entry.Key))
            {
                continue;
            }

            if (chosen is not null)
            {
                throw new DeckException(entry.KeySpan, $"give only one of {string.Join(", ", alternatives)} in [{Name}]; `{chosen.Key}` is already given at line {chosen.KeySpan.Line}");
            }

            chosen = entry;
        }

        return chosen?.Key;
    }

    public DeckException Missing(string key, string what)
        => new(Span, Exists ? $"[{Name}] needs `{key}` ({what})" : $"the deck needs a [{Name}] table with `{key}` ({what})");

    public TomlNode Require(string key, string what) => Entry(key)?.Value ?? throw Missing(key, what);

    public double? Number(string key) => Entry(key) is { } e ? AsNumber(e.Value, Qualified(key)) : null;

    public double RequireNumber(string key) => AsNumber(Require(key, "a number"), Qualified(key));

    public long? Integer(string key) => Entry(key) is { } e ? AsInteger(e.Value, Qualified(key)) : null;

    public long RequireInteger(string key) => AsInteger(Require(key, "a whole number"), Qualified(key));

    public TomlScalar? String(string key) => Entry(key) is { } e ? AsString(e.Value, Qualified(key)) : null;

    public TomlScalar RequireString(string key, string what) => AsString(Require(key, what), Qualified(key));

    public bool? Bool(string key) => Entry(key) is { } e ? AsBool(e.Value, Qualified(key)) : null;

    public TomlArrayNode? Array(string key) => Entry(key) is { } e ? AsArray(e.Value, Qualified(key)) : null;

    /// <summary>A string that must be one of <paramref name="allowed"/>; otherwise an error with a hint.</summary>
    public string? Word(string key, IReadOnlyList<string> allowed)
    {
        if (String(key) is not { } scalar)
        {
            return null;
        }

        var word = (string)scalar.Value;
        if (!allowed.Contains(word))
        {
            throw new DeckException(scalar.ContentSpan, $"`{Qualified(key)}` cannot be \"{word}\".{Suggestions.Hint(word, allowed)} Choose one of {string.Join(", ", allowed.Select(a => $"\"{a}\""))}.");
        }

        return word;
    }

    /// <summary>Rejects <paramref name="key"/> when present: it does not apply to the choice made by <paramref name="because"/>.</summary>
    public void Forbid(string key, string because)
    {
        if (Entry(key) is { } entry)
        {
            throw new DeckException(entry.KeySpan, $"`{Qualified(key)}` does not apply here: {because}");
        }
    }

    public static double AsNumber(TomlNode node, string what)
    {
        var value = node switch
        {
            TomlScalar { Value: long l } => l,
            TomlScalar { Value: double d } => d,
            _ => throw new DeckException(node.Span, $"`{what}` must be a number (like 2.5 or 1e-3), not {node.Describe()}"),
        };
        if (!double.IsFinite(value))
        {
            throw new DeckException(node.Span, $"`{what}` must be a finite number, not {Format(value)}");
        }

        return value;
    }

    public static long AsInteger(TomlNode node, string what) => node is TomlScalar { Value: long l }
        ? l
        : throw new DeckException(node.Span, $"`{what}` must be a whole number (like 3), not {node.Describe()}");

    public static TomlScalar AsString(TomlNode node, string what) => node is TomlScalar { Value: string } s
        ? s
        : throw new DeckException(node.Span, $"`{what}` must be a string in quotes (like \"text\"), not {node.Describe()}");

    public static bool AsBool(TomlNode node, string what) => node is TomlScalar { Value: bool b }
        ? b
        : throw new DeckException(node.Span, $"`{what}` must be true or false, not {node.Describe()}");

    public static TomlArrayNode AsArray(TomlNode node, string what) => node as TomlArrayNode
        ?? throw new DeckException(node.Span, $"`{what}` must be an array (like [1.0, 2.0]), not {node.Describe()}");

    /// <summary>Invariant, round-trippable formatting for messages.</summary>
    public static string Format(double value) => value.ToString("R", CultureInfo.InvariantCulture);
}
