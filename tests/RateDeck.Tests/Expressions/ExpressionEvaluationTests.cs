using MathNet.Numerics;
using RateDeck.Decks;
using RateDeck.Expressions;
using Xunit;

namespace RateDeck.Tests.Expressions;

public class ExpressionEvaluationTests
{
    private static readonly SourceSpan _origin = new("deck.toml", 3, 10);

    private static double Eval(string text, params (string Name, double Value)[] variables)
    {
        var compiled = ExpressionCompiler.Compile(text, _origin, variables.Select(v => v.Name).ToArray());
        return compiled.Evaluate(variables.Select(v => v.Value).ToArray());
    }

    // Operator precedence and associativity: common practice of mathematical notation (ISO 80000-2
    // writes powers as superscripts, which bind tighter than a sign and group from the top down,
    // so a^b^c = a^(b^c)); every expected value is exact in double precision.
    [Theory]
    [InlineData("2^3^2", 512.0)]
    [InlineData("(2^3)^2", 64.0)]
    [InlineData("-2^2", -4.0)]
    [InlineData("(-2)^2", 4.0)]
    [InlineData("2^-1", 0.5)]
    [InlineData("-2^-2", -0.25)]
    [InlineData("2^-2^2", 0.0625)]
    [InlineData("2*3+4", 10.0)]
    [InlineData("2+3*4", 14.0)]
    [InlineData("2*3^2", 18.0)]
    [InlineData("2-3-4", -5.0)]
    [InlineData("8/4/2", 1.0)]
    [InlineData("8/(4/2)", 4.0)]
    [InlineData("2*-3", -6.0)]
    [InlineData("--2", 2.0)]
    [InlineData("+2", 2.0)]
    [InlineData("1-(-1)", 2.0)]
    [InlineData("-(1+2)*3", -9.0)]
    [InlineData(" ( 1 + 2 ) * ( 3 - 1 ) ", 6.0)]
    [InlineData("1 +\n 2\r\n * 3", 7.0)]
    public void Operators_FollowMathematicalPrecedenceAndAssociativity(string text, double expected)
        => Assert.Equal(expected, Eval(text));

    // Number literals, parsed as by the invariant culture (IEEE round to nearest).
    [Theory]
    [InlineData("1", 1.0)]
    [InlineData("2.5", 2.5)]
    [InlineData(".5", 0.5)]
    [InlineData("1.", 1.0)]
    [InlineData("1e-3", 1e-3)]
    [InlineData("6.02E23", 6.02e23)]
    [InlineData("1.5e+2", 150.0)]
    [InlineData("0001.250", 1.25)]
    public void NumberLiterals_ParseToTheNearestDouble(string text, double expected)
        => Assert.Equal(expected, Eval(text));

    [Fact]
    public void Variables_TakeTheValueInTheirSlot_AndPowerBindsTighterThanUnaryMinus()
    {
        Assert.Equal(-9.0, Eval("-x^2", ("x", 3.0)));
        Assert.Equal(1.0, Eval("x - y", ("x", 3.0), ("y", 2.0)));
        Assert.Equal(-1.0, Eval("x - y", ("y", 3.0), ("x", 2.0)));
        Assert.Equal(6.0, Eval("_a1*kT", ("_a1", 2.0), ("kT", 3.0)));
    }

    [Fact]
    public void Constants_AreMathPiAndMathE()
    {
        // Reference library: System.Math.PI and System.Math.E (the doubles nearest pi and e).
        Assert.Equal(Math.PI, Eval("pi"));
        Assert.Equal(Math.E, Eval("e"));
        Assert.Equal(Math.E, Eval("exp(1)"), 1e-15);
    }

    public static TheoryData<string, Func<double, double>, double> UnaryFunctions => new()
    {
        // Reference library: System.Math (.NET base class library); the compiled code must call
        // the same function, so equality is exact.
        { "exp", Math.Exp, 0.7 },
        { "exp", Math.Exp, -700.0 },
        { "log", Math.Log, 2.5 },
        { "log10", Math.Log10, 2.5e-7 },
        { "sqrt", Math.Sqrt, 2.0 },
        { "abs", Math.Abs, -3.25 },
        { "sin", Math.Sin, 0.4 },
        { "cos", Math.Cos, 0.4 },
        { "tan", Math.Tan, 1.2 },
        { "sinh", Math.Sinh, -1.3 },
        { "cosh", Math.Cosh, -1.3 },
        { "tanh", Math.Tanh, 0.2 },
        { "atan", Math.Atan, 5.0 },
        // Reference library: MathNet.Numerics.SpecialFunctions, the implementation the language uses.
        { "gamma", SpecialFunctions.Gamma, 4.3 },
        { "erf", SpecialFunctions.Erf, 0.3 },
    };

    [Theory]
    [MemberData(nameof(UnaryFunctions))]
    public void UnaryFunctions_MatchTheReferenceLibrary_CompiledAndFolded(string name, Func<double, double> reference, double x)
    {
        var expected = reference(x);
        Assert.Equal(expected, Eval($"{name}(x)", ("x", x)));
        // The same call on a literal is folded at compile time and must give the same bits.
        var literal = x.ToString("R", System.Globalization.CultureInfo.InvariantCulture).TrimStart('-');
        Assert.Equal(expected, Eval(x < 0 ? $"{name}(-{literal})" : $"{name}({literal})"));
    }

    [Fact]
    public void BinaryAndVariadicFunctions_MatchSystemMath()
    {
        // Reference library: System.Math.
        Assert.Equal(Math.Atan2(1.0, -2.0), Eval("atan2(y, x)", ("y", 1.0), ("x", -2.0)));
        Assert.Equal(Math.Pow(2.0, 0.5), Eval("pow(x, 0.5)", ("x", 2.0)));
        Assert.Equal(Math.Pow(1.7, 3.1), Eval("x^3.1", ("x", 1.7)));
        Assert.Equal(-4.0, Eval("min(x, 2, -4, 7)", ("x", 3.0)));
        Assert.Equal(7.0, Eval("max(x, 2, -4, 7)", ("x", 3.0)));
        Assert.Equal(3.0, Eval("max(x, 2)", ("x", 3.0)));
    }

    [Theory]
    [InlineData(2.0)]
    [InlineData(3.0)]
    [InlineData(-1.0)]
    public void SmallIntegerPowers_StayWithinOneUlpOfMathPow(double exponent)
    {
        // Reference library: System.Math.Pow. x^2, x^3 and x^-1 are compiled as products and a
        // quotient; they may differ from Math.Pow by one unit in the last place, not more.
        var literal = exponent.ToString(System.Globalization.CultureInfo.InvariantCulture);
        var compiled = ExpressionCompiler.Compile($"x^{literal}", _origin, ["x"]);
        var random = new Random(20240611);
        for (var k = 0; k < 20_000; k++)
        {
            var x = (2 * random.NextDouble() - 1) * Math.Pow(10, random.Next(-100, 100));
            var actual = compiled.Evaluate([x]);
            var expected = Math.Pow(x, exponent);
            var ulps = Math.Abs(BitConverter.DoubleToInt64Bits(actual) - BitConverter.DoubleToInt64Bits(expected));
            Assert.True(ulps <= 1, $"{x:R}^{literal}: {actual:R} vs Math.Pow {expected:R}");
            // The folded constant follows the same rule, so literal and variable agree bit for bit
            // (checked on a sample: each check compiles an expression).
            if (k % 100 == 0)
            {
                var folded = ExpressionCompiler.Compile($"({x:R})^{literal}", _origin, []).Evaluate([]);
                Assert.Equal(actual, folded);
            }
        }
        foreach (var edge in new[] { 0.0, -0.0, double.PositiveInfinity, double.NegativeInfinity, double.NaN, 1e200, -1e-200 })
        {
            Assert.Equal(Math.Pow(edge, exponent), compiled.Evaluate([edge]));
        }
    }

    [Fact]
    public void Gamma_MatchesPublishedValues()
    {
        // Relative tolerance 1e-14: the Lanczos approximation is not correctly rounded.
        // Abramowitz & Stegun, Handbook of Mathematical Functions (1964), 6.1.8: Gamma(1/2) = sqrt(pi).
        AssertRelative(Math.Sqrt(Math.PI), Eval("gamma(0.5)"), 1e-14);
        // A&S 6.1.6: Gamma(n + 1) = n!, so Gamma(5) = 24 and Gamma(11) = 3628800.
        AssertRelative(24.0, Eval("gamma(5)"), 1e-14);
        AssertRelative(3628800.0, Eval("gamma(11)"), 1e-14);
        // A&S 6.1.12: Gamma(n + 1/2) = 1*3*5*...*(2n-1) / 2^n * sqrt(pi); n = 2 gives 3/4 sqrt(pi).
        AssertRelative(0.75 * Math.Sqrt(Math.PI), Eval("gamma(2.5)"), 1e-14);
        // A&S 6.1.17 (reflection) at x = 1/2: Gamma(-1/2) = -2 sqrt(pi).
        AssertRelative(-2.0 * Math.Sqrt(Math.PI), Eval("gamma(-0.5)"), 1e-14);
    }

    [Fact]
    public void Gamma_FollowsTheC99EdgeConventions()
    {
        // ISO/IEC 9899:1999 Annex F.10.5.4 (tgamma): +-infinity at +-0, NaN at negative integers
        // and at -infinity, +infinity on overflow (beyond about 171.62).
        Assert.Equal(double.PositiveInfinity, Eval("gamma(x)", ("x", 0.0)));
        Assert.Equal(double.NegativeInfinity, Eval("gamma(x)", ("x", -0.0)));
        Assert.True(double.IsNaN(Eval("gamma(-1)")));
        Assert.True(double.IsNaN(Eval("gamma(-7)")));
        Assert.True(double.IsNaN(Eval("gamma(x)", ("x", double.NegativeInfinity))));
        Assert.Equal(double.PositiveInfinity, Eval("gamma(172)"));
        Assert.Equal(double.PositiveInfinity, Eval("gamma(1e300)"));
        // A&S 6.1.6: Gamma(171) = 170! = 7.257415615307999e306 (value from SciPy 1.10.1
        // scipy.special.factorial(170)); finite although near the overflow point.
        AssertRelative(7.257415615307999e306, Eval("gamma(171)"), 2e-13);
    }

    [Fact]
    public void Erf_MatchesPublishedValues()
    {
        // Abramowitz & Stegun (1964), Table 7.1: erf(1) = 0.8427007929497149 (15 decimals).
        Assert.Equal(0.8427007929497149, Eval("erf(1)"), 1e-15);
        // A&S 7.1.9: erf is odd; erf(0) = 0.
        Assert.Equal(-Eval("erf(0.7)"), Eval("erf(-0.7)"));
        Assert.Equal(0.0, Eval("erf(0)"));
    }

    [Fact]
    public void IsotropicMeasure_InThreeDimensions_IsFourPiXSquared()
    {
        // Area of the unit sphere in three dimensions, S_2 = 2 pi^(3/2) / Gamma(3/2) = 4 pi
        // (SPEC 2; analytic result).
        Assert.Equal(4.0 * Math.PI * 4.0, Eval("2*pi^(d/2)/gamma(d/2)*x^(d-1)", ("d", 3.0), ("x", 2.0)), 1e-13);
    }

    private static void AssertRelative(double expected, double actual, double tolerance)
        => Assert.True(
            Math.Abs(actual - expected) <= tolerance * Math.Abs(expected),
            $"expected {expected:R}, got {actual:R} (relative tolerance {tolerance:E0})");
}
