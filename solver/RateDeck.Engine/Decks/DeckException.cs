namespace RateDeck.Decks;

/// <summary>
/// Bad user input: a deck, a CSV file it names, an override or an expression.
/// The command-line program prints <see cref="Exception.Message"/> as <c>file:line:column: message</c>
/// and exits with code 2; it never shows a stack trace for this exception.
/// </summary>
public sealed class DeckException : Exception
{
    /// <summary>Creates an error at <paramref name="span"/>.</summary>
    public DeckException(SourceSpan span, string problem)
        : base($"{span}: {problem}")
    {
        Span = span;
        Problem = problem;
    }

    /// <summary>Where the problem is.</summary>
    public SourceSpan Span { get; }

    /// <summary>The message without the location prefix.</summary>
    public string Problem { get; }
}
