using RateDeck.Decks;
using RateDeck.Expressions;
using Xunit;

namespace RateDeck.Tests.Expressions;

/// <summary>
/// Compiling recurses once per level of the expression tree, so the depth is bounded: a chain of
/// 1000 terms still compiles (and evaluates exactly) on a thread with a small stack, and a longer
/// one is refused at the operator that goes too deep instead of overflowing the stack (issue 9 §8:
/// about 90,000 `+ x` terms ended the process with exit 134).
/// </summary>
public sealed class ExpressionDepthTests
{
    private static readonly SourceSpan _origin = new("deck.toml", 3, 11);

    private static string Chain(int terms) => "1" + string.Concat(Enumerable.Repeat(" + x", terms));

    [Fact]
    public void ChainAtTheDepthLimit_CompilesOnASmallStackAndSumsExactly()
    {
        CompiledExpression? compiled = null;
        // 256 KiB, a sixth of a default secondary thread's stack on Linux.
        var thread = new Thread(() => compiled = ExpressionCompiler.Compile(Chain(999), _origin, ["x"]), 256 * 1024);
        thread.Start();
        thread.Join();

        Assert.NotNull(compiled);
        // 1 + 999 x with x = 2: every partial sum is a small integer, exact in doubles.
        Assert.Equal(1999.0, compiled.Evaluate([2.0]));
    }

    [Theory]
    [InlineData(1000)]
    [InlineData(90_000)]
    public void ChainBeyondTheDepthLimit_IsALocatedErrorAtTheOperatorTooDeep(int terms)
    {
        var error = Assert.Throws<DeckException>(() => ExpressionCompiler.Compile(Chain(terms), _origin, ["x"]));

        // The 1000th '+' sits at offset 4 * 1000 - 2 of the text.
        Assert.Equal(_origin.Shift(3998), error.Span);
        Assert.Contains("more than 1000 operations deep", error.Problem, StringComparison.Ordinal);
    }

    [Fact]
    public void DeepNegationAndCalls_CountTowardsTheSameLimit()
    {
        var nested = string.Concat(Enumerable.Repeat("exp(", 200)) + "x" + new string(')', 200);
        var deep = string.Join(" * ", Enumerable.Repeat($"({nested})", 5)) + string.Concat(Enumerable.Repeat(" + x", 850));

        var error = Assert.Throws<DeckException>(() => ExpressionCompiler.Compile(deep, _origin, ["x"]));
        Assert.Contains("more than 1000 operations deep", error.Problem, StringComparison.Ordinal);
    }
}
