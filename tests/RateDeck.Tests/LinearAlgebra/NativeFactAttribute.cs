using RateDeck.LinearAlgebra;
using Xunit;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>The system's native provider, loaded once for the test run, and why it is missing if it is.</summary>
internal static class NativeLapack
{
    private static readonly Lazy<(OpenBlasLinearAlgebra? Provider, string Reason)> _load = new(() =>
        OpenBlasLinearAlgebra.TryLoadSystem(out var provider, out var reason) ? (provider, reason) : (null, reason));

    /// <summary>Null when the native library is absent or failed its self-check.</summary>
    public static OpenBlasLinearAlgebra? Provider => _load.Value.Provider;

    /// <summary>The skip text for tests that need the native library.</summary>
    public static string? SkipReason => Provider is null ? $"native LAPACK not available: {_load.Value.Reason}" : null;

    /// <summary>The provider, for tests that the attributes below have already let run.</summary>
    public static OpenBlasLinearAlgebra Required => Provider ?? throw new InvalidOperationException(SkipReason);
}

/// <summary>A fact that is skipped, with the reason shown, when native LAPACK cannot be loaded.</summary>
public sealed class NativeFactAttribute : FactAttribute
{
    public NativeFactAttribute() => Skip = NativeLapack.SkipReason;
}

/// <summary>A theory that is skipped, with the reason shown, when native LAPACK cannot be loaded.</summary>
public sealed class NativeTheoryAttribute : TheoryAttribute
{
    public NativeTheoryAttribute() => Skip = NativeLapack.SkipReason;
}
