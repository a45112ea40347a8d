namespace RateDeck.Expressions;

/// <summary>The kinds of token of the expression language.</summary>
internal enum TokenKind
{
    Number,
    Name,
    Plus,
    Minus,
    Star,
    Slash,
    Caret,
    OpenParen,
    CloseParen,
    Comma,
    End,
}

/// <summary>A token: its kind, where it starts, its text, and its value when a number.</summary>
internal readonly record struct Token(TokenKind Kind, int Offset, string Text, double Value = 0)
{
    /// <summary>The token as a message names it: "number '3'", "name 'x'", "'*'", "end of expression".</summary>
    public string Describe() => Kind switch
    {
        TokenKind.Number => $"number '{Text}'",
        TokenKind.Name => $"name '{Text}'",
        TokenKind.End => "end of expression",
        _ => $"'{Text}'",
    };
}
