using System.Globalization;

namespace RateDeck.Expressions;

/// <summary>
/// Splits expression text into tokens, one at a time so that the first problem from the left is
/// the one reported. Numbers: digits with an optional fraction and exponent (1, 2.5, .5, 1.,
/// 1e-3, 6.02E23); names: [A-Za-z_][A-Za-z0-9_]*; whitespace (space, tab, CR, LF) separates.
/// </summary>
internal sealed class Lexer(ExpressionSource source)
{
    private readonly string _text = source.Text;
    private int _position;

    /// <summary>The next token, or <see cref="TokenKind.End"/> at the end of the text.</summary>
    public Token Next()
    {
        while (_position < _text.Length && _text[_position] is ' ' or '\t' or '\r' or '\n')
        {
            _position++;
        }
        if (_position == _text.Length)
        {
            return new Token(TokenKind.End, _position, "");
        }
        var c = _text[_position];
        if (char.IsAsciiDigit(c) || (c == '.' && _position + 1 < _text.Length && char.IsAsciiDigit(_text[_position + 1])))
        {
            return ReadNumber();
        }
        if (char.IsAsciiLetter(c) || c == '_')
        {
            var start = _position;
            while (_position < _text.Length && (char.IsAsciiLetterOrDigit(_text[_position]) || _text[_position] == '_'))
            {
                _position++;
            }
            return new Token(TokenKind.Name, start, _text[start.._position]);
        }
        var kind = c switch
        {
            '+' => TokenKind.Plus,
            '-' => TokenKind.Minus,
            '*' => TokenKind.Star,
            '/' => TokenKind.Slash,
            '^' => TokenKind.Caret,
            '(' => TokenKind.OpenParen,
            ')' => TokenKind.CloseParen,
            ',' => TokenKind.Comma,
            _ => throw source.Error(_position, DescribeStrayCharacter(c)),
        };
        return new Token(kind, _position++, c.ToString());
    }

    private Token ReadNumber()
    {
        var start = _position;
        SkipDigits();
        if (At('.'))
        {
            _position++;
            SkipDigits();
            if (At('.'))
            {
                var end = _position;
                while (end < _text.Length && (char.IsAsciiDigit(_text[end]) || _text[end] == '.'))
                {
                    end++;
                }
                throw source.Error(_position, $"malformed number '{_text[start..end]}': a number has at most one '.'");
            }
        }
        if (At('e') || At('E'))
        {
            _position++;
            if (At('+') || At('-'))
            {
                _position++;
            }
            if (!(_position < _text.Length && char.IsAsciiDigit(_text[_position])))
            {
                throw source.Error(_position, $"malformed number '{_text[start.._position]}': expected the digits of the exponent");
            }
            SkipDigits();
        }
        var text = _text[start.._position];
        var value = double.Parse(text, NumberStyles.AllowDecimalPoint | NumberStyles.AllowExponent, CultureInfo.InvariantCulture);
        if (double.IsInfinity(value))
        {
            throw source.Error(start, $"number '{text}' is too large for double precision (at most about 1.8e308)");
        }
        return new Token(TokenKind.Number, start, text, value);
    }

    private bool At(char c) => _position < _text.Length && _text[_position] == c;

    private void SkipDigits()
    {
        while (_position < _text.Length && char.IsAsciiDigit(_text[_position]))
        {
            _position++;
        }
    }

    private static string DescribeStrayCharacter(char c)
    {
        var hint = c switch
        {
            '\u2212' or '\u2013' => ": write the ASCII '-' for minus",
            '\u00D7' or '\u00B7' or '\u22C5' => ": write '*' for a product",
            '[' or '{' => ": group with '(' and ')'",
            '.' => ": a '.' must be followed by digits (write 0.5 or .5)",
            _ => "",
        };
        var shown = char.IsControl(c) ? $"U+{(int)c:X4}"
            : char.IsAscii(c) ? $"'{c}'"
            : $"'{c}' (U+{(int)c:X4})";
        return $"unexpected character {shown}{hint}";
    }
}
