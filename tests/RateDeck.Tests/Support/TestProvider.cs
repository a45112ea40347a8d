using RateDeck.LinearAlgebra;

namespace RateDeck.Tests.Support;

/// <summary>The provider the suite runs under (tests/run-tests.sh sets RATEDECK_LINALG once per provider).</summary>
internal static class TestProvider
{
    private static readonly Lazy<ILinearAlgebra> _selected = new(() => LinearAlgebraProviders.Select(null, out _));

    /// <summary>The provider chosen as the command line would choose it with no --linalg.</summary>
    public static ILinearAlgebra Selected => _selected.Value;
}
