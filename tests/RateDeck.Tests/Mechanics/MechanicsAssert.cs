using Xunit;

namespace RateDeck.Tests.Mechanics;

/// <summary>Relative-error assertions with a readable failure message.</summary>
internal static class MechanicsAssert
{
    public static void Relative(double expected, double actual, double tolerance)
    {
        var error = Math.Abs(actual - expected) / Math.Abs(expected);
        Assert.True(
            error <= tolerance,
            FormattableString.Invariant($"expected {expected:R}, got {actual:R}: relative error {error:E2} > {tolerance:E0}"));
    }
}
