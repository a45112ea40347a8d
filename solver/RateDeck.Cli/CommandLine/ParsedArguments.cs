using System.Globalization;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// A verb's command line after parsing: the deck path, repeated <c>--set</c> overrides, flags and
/// valued options. Only options the verb declared can be present.
/// </summary>
public sealed class ParsedArguments
{
    private readonly Dictionary<string, string> _values;
    private readonly HashSet<string> _flags;

    internal ParsedArguments(string deckPath, IReadOnlyList<string> overrides, Dictionary<string, string> values, HashSet<string> flags)
    {
        DeckPath = deckPath;
        Overrides = overrides;
        _values = values;
        _flags = flags;
    }

    /// <summary>The deck file.</summary>
    public string DeckPath { get; }

    /// <summary>The <c>--set key=value</c> overrides, in order.</summary>
    public IReadOnlyList<string> Overrides { get; }

    /// <summary>True when the flag was given.</summary>
    public bool Has(string flag) => _flags.Contains(flag);

    /// <summary>The option's value, or null when absent.</summary>
    public string? Value(string option) => _values.GetValueOrDefault(option);

    /// <summary>The option's value as a positive finite number, or null when absent.</summary>
    public double? PositiveNumber(string option)
    {
        var text = Value(option);
        if (text is null)
        {
            return null;
        }

        if (!double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var number) || !double.IsFinite(number) || number <= 0)
        {
            throw new UsageException($"{option} takes a positive number, not '{text}'");
        }

        return number;
    }
}
