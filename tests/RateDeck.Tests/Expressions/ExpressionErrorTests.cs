using RateDeck.Decks;
using RateDeck.Expressions;
using Xunit;

namespace RateDeck.Tests.Expressions;

/// <summary>
/// A catalogue of malformed expressions, each with the exact place and wording of its error.
/// The expression text starts at line 12, column 9 of the deck, so an error at character
/// offset k of a single-line text is at column 9 + k.
/// </summary>
public class ExpressionErrorTests
{
    private static readonly SourceSpan _origin = new("model.toml", 12, 9);
    private static readonly string[] _variables = ["x", "y", "kT", "alpha"];

    private static DeckException CompileError(string text, SourceSpan origin)
        => Assert.Throws<DeckException>(() => ExpressionCompiler.Compile(text, origin, _variables));

    [Theory]
    [InlineData("2*", 11, "unexpected end of expression: expected a number, a name or '('")]
    [InlineData("(1+2", 13, "unexpected end of expression: expected an operator or ')' to close '(' at column 9")]
    [InlineData("x*(1+2", 15, "unexpected end of expression: expected an operator or ')' to close '(' at column 11")]
    [InlineData("(1 2)", 12, "unexpected number '2': expected an operator or ')' to close '(' at column 9")]
    [InlineData("1+)", 11, "unexpected ')': expected a number, a name or '('")]
    [InlineData("(1+2))", 14, "unexpected ')': there is no '(' to close")]
    [InlineData("()", 10, "unexpected ')': expected a number, a name or '('")]
    [InlineData("sqr(2)", 9, "unknown function 'sqr': did you mean 'sqrt'?")]
    [InlineData("1 + lgo(x)", 13, "unknown function 'lgo': did you mean 'log'?")]
    [InlineData("zeta(x)", 9, "unknown function 'zeta': the functions are exp, log, log10, sqrt, abs, sin, cos, tan, sinh, cosh, tanh, atan, gamma, erf, atan2, pow, min, max")]
    [InlineData("atan2(1)", 9, "'atan2' takes 2 arguments (y, x), got 1")]
    [InlineData("pow(1, 2, 3)", 9, "'pow' takes 2 arguments (base, exponent), got 3")]
    [InlineData("exp()", 9, "'exp' takes 1 argument, got 0")]
    [InlineData("2 * exp(1, 2)", 13, "'exp' takes 1 argument, got 2")]
    [InlineData("min(x)", 9, "'min' takes 2 or more arguments (a, b, ...), got 1")]
    [InlineData("exp(1,)", 15, "unexpected ')': expected a number, a name or '('")]
    [InlineData("exp(1 2)", 15, "unexpected number '2': expected an operator, ',' or ')' to close the arguments of 'exp' opened at column 12")]
    [InlineData("exp(x", 14, "unexpected end of expression: expected an operator, ',' or ')' to close the arguments of 'exp' opened at column 12")]
    [InlineData("2 3", 11, "unexpected number '3': expected an operator (+ - * / ^) or the end of the expression")]
    [InlineData("2x", 10, "unexpected name 'x': expected an operator (+ - * / ^) or the end of the expression; write '*' for a product")]
    [InlineData("2 (x + 1)", 11, "unexpected '(': expected an operator (+ - * / ^) or the end of the expression; write '*' for a product")]
    [InlineData("1 , 2", 11, "unexpected ',' outside the arguments of a function call")]
    [InlineData("1..2", 11, "malformed number '1..2': a number has at most one '.'")]
    [InlineData("3.14.15", 13, "malformed number '3.14.15': a number has at most one '.'")]
    [InlineData("1e", 11, "malformed number '1e': expected the digits of the exponent")]
    [InlineData("2.5E-", 14, "malformed number '2.5E-': expected the digits of the exponent")]
    [InlineData("1e400", 9, "number '1e400' is too large for double precision (at most about 1.8e308)")]
    [InlineData("x +* y", 12, "unexpected '*': expected a number, a name or '('")]
    [InlineData("2**3", 11, "unexpected '*': expected a number, a name or '('; write '^' for a power, not '**'")]
    [InlineData("2^", 11, "unexpected end of expression: expected a number, a name or '('")]
    [InlineData("-", 10, "unexpected end of expression: expected a number, a name or '('")]
    [InlineData("", 9, "empty expression: expected a number, a name or '('")]
    [InlineData("   ", 9, "empty expression: expected a number, a name or '('")]
    [InlineData("kt * x", 9, "unknown name 'kt': did you mean 'kT'?")]
    [InlineData("x * alpah", 13, "unknown name 'alpah': did you mean 'alpha'?")]
    [InlineData("exp(-x/k)", 16, "unknown name 'k': not a variable here (x, y, kT, alpha), a constant (pi, e) or a function")]
    [InlineData("PI", 9, "unknown name 'PI': did you mean 'pi'?")]
    [InlineData("sqrt + 1", 9, "'sqrt' is a function: call it as sqrt(...)")]
    [InlineData("x(2)", 9, "'x' is a variable, not a function: write '*' for a product")]
    [InlineData("pi(2)", 9, "'pi' is a constant, not a function: write '*' for a product")]
    [InlineData("2 @ 3", 11, "unexpected character '@'")]
    [InlineData("2 \u2212 1", 11, "unexpected character '\u2212' (U+2212): write the ASCII '-' for minus")]
    [InlineData("2 \u00D7 x", 11, "unexpected character '\u00D7' (U+00D7): write '*' for a product")]
    [InlineData("[x]", 9, "unexpected character '[': group with '(' and ')'")]
    [InlineData("x . 5", 11, "unexpected character '.': a '.' must be followed by digits (write 0.5 or .5)")]
    [InlineData("1\t+\u00072", 12, "unexpected character U+0007")]
    public void MalformedExpression_IsReportedAtTheOffendingCharacter(string text, int column, string problem)
    {
        var error = CompileError(text, _origin);
        Assert.Equal(problem, error.Problem);
        Assert.Equal(new SourceSpan("model.toml", 12, column), error.Span);
        Assert.Equal($"model.toml:12:{column}: {problem}", error.Message);
    }

    [Fact]
    public void MultiLineText_ReportsTheDeckLineAndColumn()
    {
        // A multi-line TOML string: text after a newline starts at column 1 of the next deck line.
        var error = CompileError("1 +\n  )", _origin);
        Assert.Equal(new SourceSpan("model.toml", 13, 3), error.Span);
        Assert.Equal("unexpected ')': expected a number, a name or '('", error.Problem);

        var unclosed = CompileError("(1 +\r\n 2", _origin);
        Assert.Equal(new SourceSpan("model.toml", 13, 3), unclosed.Span);
        Assert.Equal("unexpected end of expression: expected an operator or ')' to close '(' at line 12, column 9", unclosed.Problem);

        var third = CompileError("x\n+ y\n+ zz", _origin);
        Assert.Equal(new SourceSpan("model.toml", 14, 3), third.Span);
    }

    [Fact]
    public void OriginWithoutLine_SaysWhereInTheMessage()
    {
        // An override on the command line has no deck position: the message carries the offset.
        var error = CompileError("2*(x+", SourceSpan.None("--set energy"));
        Assert.Equal("unexpected end of expression: expected a number, a name or '(' (at character 6 of the expression)", error.Problem);
        Assert.Equal("--set energy: " + error.Problem, error.Message);

        var unclosed = CompileError("(x", SourceSpan.None("--set energy"));
        Assert.Equal("unexpected end of expression: expected an operator or ')' to close '(' at character 1 of the expression (at character 3 of the expression)", unclosed.Problem);
    }

    [Fact]
    public void DeepNesting_IsAnErrorNotACrash()
    {
        var text = new string('(', 300) + "1" + new string(')', 300);
        var error = CompileError(text, _origin);
        Assert.Equal("expression nested more than 256 levels deep: simplify it", error.Problem);
        Assert.Equal(12, error.Span.Line);
    }

    [Fact]
    public void ModerateNesting_IsAccepted()
    {
        var text = new string('(', 100) + "x" + new string(')', 100);
        Assert.Equal(2.5, ExpressionCompiler.Compile(text, _origin, _variables).Evaluate([2.5, 0, 0, 0]));
    }
}
