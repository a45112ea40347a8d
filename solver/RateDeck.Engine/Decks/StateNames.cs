using System.Globalization;
using System.Runtime.CompilerServices;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// Resolves a reference to a state, written as its label or as its one-based state number, to a
/// zero-based index into the grid. An unknown label is an error with a "did you mean" hint.
/// </summary>
internal sealed class StateNames
{
    private readonly string[] _labels;
    private readonly Dictionary<string, int> _index;

    public StateNames(string[] labels)
    {
        _labels = labels;
        _index = new Dictionary<string, int>(StringComparer.Ordinal);
        for (var k = 0; k < labels.Length; k++)
        {
            _index[labels[k]] = k;
        }

        HasNumberLabel = labels.Any(label => label.Length > 0 && label.All(char.IsAsciiDigit));
    }

    /// <summary>True when a label is all digits, so that a state number could also be read as a label (the label wins).</summary>
    public bool HasNumberLabel { get; }

    /// <summary>Number of states.</summary>
    public int Count => _labels.Length;

    /// <summary>Resolves a label or a state number in range without reporting anything; false when <see cref="Resolve(string, SourceSpan)"/> would throw.</summary>
    public bool TryResolve(string text, out int index) => TryResolve(text.AsSpan(), out index);

    /// <summary>As <see cref="TryResolve(string, out int)"/> for a cell's characters, looked up without making a string of them.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public bool TryResolve(ReadOnlySpan<char> text, out int index)
    {
        if (_index.GetAlternateLookup<ReadOnlySpan<char>>().TryGetValue(text, out index))
        {
            return true;
        }

        if (long.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out var number) && number >= 1 && number <= _labels.Length)
        {
            index = (int)(number - 1);
            return true;
        }

        return false;
    }

    /// <summary>Resolves text (a label or a state number, as in a CSV cell).</summary>
    public int Resolve(string text, SourceSpan span)
    {
        if (_index.TryGetValue(text, out var index))
        {
            return index;
        }

        if (long.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out var number))
        {
            return FromNumber(number, span);
        }

        throw new DeckException(span, $"unknown state `{text}`.{Suggestions.Hint(text, _labels)} The states are {Listing()}.");
    }

    /// <summary>Resolves a deck value: a label string or a one-based state number.</summary>
    public int Resolve(TomlNode node, string what) => node switch
    {
        TomlScalar { Value: string label } s => Resolve(label, s.ContentSpan),
        TomlScalar { Value: long number } => FromNumber(number, node.Span),
        _ => throw new DeckException(node.Span, $"`{what}` must name a state by its label (like \"{_labels[0]}\") or its number 1..{_labels.Length}, not {node.Describe()}"),
    };

    private int FromNumber(long number, SourceSpan span) => number >= 1 && number <= _labels.Length
        ? (int)(number - 1)
        : throw new DeckException(span, $"state number {number} does not exist; states are numbered 1..{_labels.Length}");

    /// <summary>The labels for a message: all of them when few, else the first and last few.</summary>
    private string Listing() => _labels.Length <= 12
        ? string.Join(", ", _labels)
        : $"{string.Join(", ", _labels.Take(4))}, ..., {string.Join(", ", _labels.TakeLast(2))} ({_labels.Length} in all)";
}
