namespace RateDeck.Decks;

/// <summary>
/// A place in an input file: the file path and a one-based line and column.
/// Every error about user input carries one so that the message can say exactly where to look.
/// </summary>
public readonly record struct SourceSpan(string File, int Line, int Column)
{
    /// <summary>A span for input that has no place in a file (a command-line override, say).</summary>
    public static SourceSpan None(string origin) => new(origin, 0, 0);

    /// <summary>The span shifted right by <paramref name="columns"/> on the same line (for a position inside a string value).</summary>
    public SourceSpan Shift(int columns) => this with { Column = Column + columns };

    /// <summary>Formats as <c>file:line:column</c>, or just the origin when there is no line.</summary>
    public override string ToString() => Line > 0 ? $"{File}:{Line}:{Column}" : File;
}
