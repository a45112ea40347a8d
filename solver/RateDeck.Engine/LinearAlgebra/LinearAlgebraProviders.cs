namespace RateDeck.LinearAlgebra;

/// <summary>
/// Chooses the linear-algebra provider: the native LAPACK/BLAS one when the system library loads and
/// passes its self-check, else the managed one, with the reason recorded either way. A choice of
/// "auto", "native" or "managed" (from the command line, or else from the environment variable
/// <see cref="EnvironmentVariable"/>) forces one; forcing native where it is unusable is an error.
/// </summary>
public static class LinearAlgebraProviders
{
    /// <summary>The environment variable read when no explicit choice is given.</summary>
    public const string EnvironmentVariable = "RATEDECK_LINALG";

    /// <summary>
    /// Picks a provider from <paramref name="choice"/> ("auto", "native" or "managed", any case), or,
    /// when it is null or blank, from <see cref="EnvironmentVariable"/>, or else "auto".
    /// <paramref name="reason"/> says in plain words which provider was chosen and why.
    /// </summary>
    /// <exception cref="LinearAlgebraChoiceException">The choice is unknown, or native was asked for and is unusable.</exception>
    public static ILinearAlgebra Select(string? choice, out string reason) =>
        Select(choice, Environment.GetEnvironmentVariable(EnvironmentVariable), LoadSystemNative, out reason);

    /// <summary>The selection rule with the environment and the native loader supplied, so that tests can vary both.</summary>
    internal static ILinearAlgebra Select(
        string? choice,
        string? environmentValue,
        Func<(OpenBlasLinearAlgebra? Provider, string Reason)> loadNative,
        out string reason)
    {
        var (value, origin) = !string.IsNullOrWhiteSpace(choice)
            ? (choice.Trim(), "asked for explicitly")
            : !string.IsNullOrWhiteSpace(environmentValue)
                ? (environmentValue.Trim(), $"asked for by {EnvironmentVariable}={environmentValue.Trim()}")
                : ("auto", "the default");
        var wanted = value.ToLowerInvariant();
        if (wanted == "managed")
        {
            reason = $"managed: {origin}";
            return new ManagedLinearAlgebra();
        }

        if (wanted is not ("native" or "auto"))
        {
            throw new LinearAlgebraChoiceException($"unknown linear-algebra choice '{value}' ({origin}): use auto, native or managed");
        }

        var how = wanted == "auto" ? $"auto ({origin})" : origin;
        var (native, why) = loadNative();
        if (native is not null)
        {
            reason = $"native: {how}; {why}";
            return native;
        }

        if (wanted == "native")
        {
            throw new LinearAlgebraChoiceException(
                $"native linear algebra was {origin} but is not usable: {why}. Install OpenBLAS (Debian package libopenblas0) or choose managed");
        }

        reason = $"managed: {how}, native not usable: {why}";
        return new ManagedLinearAlgebra();
    }

    private static (OpenBlasLinearAlgebra? Provider, string Reason) LoadSystemNative() =>
        OpenBlasLinearAlgebra.TryLoadSystem(out var provider, out var reason) ? (provider, reason) : (null, reason);
}

/// <summary>A linear-algebra choice that cannot be honoured; the message says what to do instead.</summary>
public sealed class LinearAlgebraChoiceException : Exception
{
    /// <summary>Creates the exception with a plain message.</summary>
    public LinearAlgebraChoiceException(string message) : base(message) { }
}
