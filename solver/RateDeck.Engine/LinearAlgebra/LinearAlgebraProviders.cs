namespace RateDeck.LinearAlgebra;

/// <summary>
/// Chooses the linear-algebra provider. Only the managed one exists until the native provider lands.
/// </summary>
public static class LinearAlgebraProviders
{
    /// <summary>The provider the pipeline uses by default.</summary>
    public static ILinearAlgebra Default { get; } = new ManagedLinearAlgebra();
}
