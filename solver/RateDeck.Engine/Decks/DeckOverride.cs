using System.Globalization;
using System.Text;

namespace RateDeck.Decks;

/// <summary>
/// One change to a deck, applied in memory before validation: a value for a key, or the removal
/// of a key. A key is a parameter name (<c>alpha</c>), a top-level key (<c>title</c>) or a dotted
/// deck key (<c>run.t_end</c>, <c>losses.by_state.k1</c>). Typed overrides
/// (<see cref="Set(string, double)"/> and its siblings) take the value as it is, without parsing
/// text; <see cref="Parse"/> reads the command line's <c>--set</c> form. The deck is validated
/// after its overrides exactly as if the deck file said so, and <see cref="ToString"/> is the
/// <c>--set</c> text that repeats the override, recorded in every output's provenance.
/// </summary>
public sealed class DeckOverride
{
    /// <summary>The prefix of a removal in the <c>--set</c> form: <c>--set remove:run.t_first</c>.</summary>
    public const string RemovePrefix = "remove:";

    private readonly TomlNode? _value;

    private DeckOverride(string key, TomlNode? value, string text)
    {
        Key = key;
        _value = value;
        Text = text;
    }

    /// <summary>The dotted key, as given.</summary>
    public string Key { get; }

    /// <summary>True when this override removes <see cref="Key"/> from the deck.</summary>
    public bool Removes => _value is null;

    /// <summary>Where an error about this override is reported: <c>--set key=value</c>.</summary>
    internal SourceSpan Origin => SourceSpan.None("--set " + Text);

    /// <summary>The value, placed at <see cref="Origin"/>; null for a removal.</summary>
    internal TomlNode? Value => _value;

    private string Text { get; }

    /// <summary>kT in the deck's energy unit (<c>temperature.kT</c>; replaces a temperature in kelvin).</summary>
    public static DeckOverride KT(double kT) => Set("temperature.kT", kT);

    /// <summary>The value of the deck parameter <paramref name="name"/>, which the deck must define.</summary>
    public static DeckOverride Parameter(string name, double value) => Set("parameters." + name, value);

    /// <summary>A number (a rate, a time, kT, a parameter, one state's loss or pumping rate).</summary>
    public static DeckOverride Set(string key, double value) => Typed(key, value, FormatNumber(value));

    /// <summary>A whole number (<c>run.outputs</c>, <c>states.count</c>).</summary>
    public static DeckOverride Set(string key, long value) => Typed(key, value, value.ToString(CultureInfo.InvariantCulture));

    /// <summary>True or false.</summary>
    public static DeckOverride Set(string key, bool value) => Typed(key, value, value ? "true" : "false");

    /// <summary>A string (a word such as <c>run.spacing = "linear"</c>, a state label, an expression).</summary>
    public static DeckOverride Set(string key, string value)
    {
        ArgumentNullException.ThrowIfNull(value);
        return Typed(key, value, Quote(value));
    }

    /// <summary>An array of numbers, one per state (<c>initial.values</c>, <c>losses.values</c>).</summary>
    public static DeckOverride Set(string key, IReadOnlyList<double> values)
    {
        ArgumentNullException.ThrowIfNull(values);
        var text = "[" + string.Join(", ", values.Select(FormatNumber)) + "]";
        var origin = SourceSpan.None("--set " + key + "=" + text);
        return new DeckOverride(key, new TomlArrayNode(values.Select(v => (TomlNode)new TomlScalar(v, origin, origin)).ToArray(), origin), key + "=" + text);
    }

    /// <summary>Removes <paramref name="key"/> (nothing happens when the deck does not have it; an unknown key is an error).</summary>
    public static DeckOverride Remove(string key) => new(key, null, RemovePrefix + key);

    /// <summary>
    /// Reads the <c>--set</c> form: <c>key=value</c> with the value parsed as TOML (a bare word
    /// is taken as a string, so quoting on the shell is optional), or <c>remove:key</c>.
    /// </summary>
    /// <exception cref="DeckException">The text is neither form (at <c>SourceSpan.None("--set text")</c>).</exception>
    public static DeckOverride Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var origin = SourceSpan.None("--set " + text);
        if (text.StartsWith(RemovePrefix, StringComparison.Ordinal))
        {
            var removed = text[RemovePrefix.Length..].Trim();
            return removed.Length > 0 && !removed.Contains('=')
                ? new DeckOverride(removed, null, text)
                : throw new DeckException(origin, "a removal is written remove:key, like remove:run.t_first");
        }

        var equals = text.IndexOf('=');
        if (equals <= 0)
        {
            throw new DeckException(origin, "an override is written key=value, like run.t_end=10 or alpha=0.3, or remove:key to remove a key");
        }

        var valueText = text[(equals + 1)..];
        if (valueText.Trim().Length == 0)
        {
            throw new DeckException(origin, "the override has no value after `=`; to remove a key write remove:key");
        }

        return new DeckOverride(text[..equals].Trim(), TomlTree.ParseOverrideValue(valueText, origin), text);
    }

    /// <summary>The <c>--set</c> text of this override: <c>key=value</c> or <c>remove:key</c>.</summary>
    public override string ToString() => Text;

    private static DeckOverride Typed(string key, object value, string valueText)
    {
        var text = key + "=" + valueText;
        var origin = SourceSpan.None("--set " + text);
        return new DeckOverride(key, new TomlScalar(value, origin, origin), text);
    }

    /// <summary>Round-trip text that TOML reads back as the same double (inf and nan in TOML's words).</summary>
    internal static string FormatNumber(double value) => value switch
    {
        double.PositiveInfinity => "inf",
        double.NegativeInfinity => "-inf",
        _ when double.IsNaN(value) => "nan",
        _ => value.ToString("R", CultureInfo.InvariantCulture),
    };

    /// <summary>A TOML basic string: quotes, backslashes and control characters escaped.</summary>
    internal static string Quote(string value)
    {
        var text = new StringBuilder("\"");
        foreach (var c in value)
        {
            text.Append(c switch
            {
                '"' => "\\\"",
                '\\' => "\\\\",
                '\n' => "\\n",
                '\t' => "\\t",
                '\r' => "\\r",
                _ when char.IsControl(c) => $"\\u{(int)c:X4}",
                _ => c.ToString(),
            });
        }

        return text.Append('"').ToString();
    }
}
