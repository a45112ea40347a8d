using RateDeck.Decks;

namespace RateDeck.Expressions;

/// <summary>
/// The expression text and where it sits in the deck: turns a character offset into a
/// <see cref="SourceSpan"/> and builds the located errors. The origin is the span of the first
/// character; text after a newline (a multi-line TOML string) starts again at column 1 of the
/// following deck line.
/// </summary>
internal sealed class ExpressionSource(string text, SourceSpan origin)
{
    /// <summary>The expression text.</summary>
    public string Text { get; } = text;

    /// <summary>The deck position of the character at <paramref name="offset"/> (or just past the end).</summary>
    public SourceSpan Locate(int offset)
    {
        var lastNewline = offset == 0 ? -1 : Text.LastIndexOf('\n', offset - 1);
        if (lastNewline < 0)
        {
            return origin.Shift(offset);
        }
        var lines = Text.AsSpan(0, offset).Count('\n');
        return origin with { Line = origin.Line + lines, Column = offset - lastNewline };
    }

    /// <summary>
    /// "column 7", or "line 3, column 7" when <paramref name="offset"/> is on another line than
    /// <paramref name="errorOffset"/>; "character 7 of the expression" when the origin has no line.
    /// </summary>
    public string Describe(int offset, int errorOffset)
    {
        if (origin.Line <= 0)
        {
            return $"character {offset + 1} of the expression";
        }
        var place = Locate(offset);
        return place.Line == Locate(errorOffset).Line ? $"column {place.Column}" : $"line {place.Line}, column {place.Column}";
    }

    /// <summary>A located error. Without a deck line (an override, say) the message itself says where.</summary>
    public DeckException Error(int offset, string problem)
        => new(Locate(offset), origin.Line <= 0 ? $"{problem} (at character {offset + 1} of the expression)" : problem);
}
