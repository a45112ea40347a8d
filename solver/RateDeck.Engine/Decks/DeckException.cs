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
        : base($"{span}: {OneLine(problem)}")
    {
        Span = span;
        Problem = OneLine(problem);
    }

    /// <summary>Where the problem is.</summary>
    public SourceSpan Span { get; }

    /// <summary>The message without the location prefix.</summary>
    public string Problem { get; }

    /// <summary>
    /// Control characters in echoed user text (a label or unit read from <c>"\n"</c>) written as
    /// escapes, so that the error stays the one line <c>file:line:column: message</c> that editors
    /// and shell tools parse.
    /// </summary>
    private static string OneLine(string problem)
    {
        if (!problem.Any(char.IsControl))
        {
            return problem;
        }

        var text = new System.Text.StringBuilder(problem.Length + 8);
        foreach (var c in problem)
        {
            text.Append(c switch
            {
                '\n' => "\\n",
                '\r' => "\\r",
                '\t' => "\\t",
                _ when char.IsControl(c) => $"\\u{(int)c:X4}",
                _ => c.ToString(),
            });
        }

        return text.ToString();
    }
}
