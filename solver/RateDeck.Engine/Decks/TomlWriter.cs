using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;

namespace RateDeck.Decks;

/// <summary>
/// Writes a <see cref="TomlTableNode"/> back as TOML text: the root's values, then each table
/// under its [header] with its values before its sub-tables, keys in their order. Numbers keep
/// their TOML type (a float always has a point or an exponent) and round-trip exactly.
/// </summary>
internal static partial class TomlWriter
{
    /// <summary>The TOML text of <paramref name="root"/>.</summary>
    public static string Write(TomlTableNode root)
    {
        var text = new StringBuilder();
        WriteTable(text, root, []);
        return text.ToString();
    }

    private static void WriteTable(StringBuilder text, TomlTableNode table, IReadOnlyList<string> path)
    {
        var values = table.Entries.Where(e => e.Value is not TomlTableNode).ToList();
        if (path.Count > 0 && (values.Count > 0 || !table.Entries.Any()))
        {
            text.Append(text.Length > 0 ? "\n" : "").Append('[').Append(string.Join('.', path.Select(Key))).Append("]\n");
        }

        foreach (var entry in values)
        {
            text.Append(Key(entry.Key)).Append(" = ").Append(Value(entry.Value)).Append('\n');
        }

        foreach (var entry in table.Entries.Where(e => e.Value is TomlTableNode))
        {
            WriteTable(text, (TomlTableNode)entry.Value, [.. path, entry.Key]);
        }
    }

    private static string Value(TomlNode node) => node switch
    {
        TomlScalar scalar => Scalar(scalar.Value),
        TomlArrayNode array => $"[{string.Join(", ", array.Items.Select(Value))}]",
        TomlTableNode table => $"{{ {string.Join(", ", table.Entries.Select(e => $"{Key(e.Key)} = {Value(e.Value)}"))} }}",
        _ => throw new InvalidOperationException($"no TOML form for {node.Describe()}"),
    };

    private static string Scalar(object value) => value switch
    {
        string s => DeckOverride.Quote(s),
        bool b => b ? "true" : "false",
        long or int => Convert.ToString(value, CultureInfo.InvariantCulture)!,
        double d => Float(d),
        IFormattable other => other.ToString(null, CultureInfo.InvariantCulture),
        _ => DeckOverride.Quote(value.ToString() ?? ""),
    };

    // A float keeps a point or an exponent, so that it reads back as a float, not an integer.
    private static string Float(double d)
    {
        var text = DeckOverride.FormatNumber(d);
        return double.IsFinite(d) && !text.Contains('.', StringComparison.Ordinal) && !text.Contains('E', StringComparison.Ordinal) ? text + ".0" : text;
    }

    private static string Key(string key) => BareKey().IsMatch(key) ? key : DeckOverride.Quote(key);

    [GeneratedRegex("^[A-Za-z0-9_-]+$")]
    private static partial Regex BareKey();
}
