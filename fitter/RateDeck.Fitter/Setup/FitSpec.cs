using RateDeck.Decks;

namespace RateDeck.Fitting.Setup;

/// <summary>
/// The deck's [fit] table after validation: what is free, what is observed, which data sets, and
/// how the optimizer runs (docs/fitting.md).
/// </summary>
/// <param name="Free">The free parameters, in the order they are reported.</param>
/// <param name="Observables">Named observables (expressions of populations and parameters).</param>
/// <param name="DataSets">The data sets, each with its own overrides.</param>
/// <param name="Starts">Number of starting points: the deck's values, then seeded random ones.</param>
/// <param name="Seed">Seed of the random starting points.</param>
/// <param name="MaxIterations">Iteration limit of each Levenberg-Marquardt run.</param>
/// <param name="Profile">Whether profile-likelihood intervals are computed.</param>
/// <param name="Triangle">Measured-triangle mode: every measured one-way rate is free too.</param>
/// <param name="Derivatives">How the Jacobian is formed.</param>
/// <param name="ProfileLevel">Confidence level of the profile-likelihood intervals (0 to 1).</param>
public sealed record FitSpec(
    IReadOnlyList<FreeParameterSpec> Free,
    IReadOnlyList<ObservableSpec> Observables,
    IReadOnlyList<DataSetSpec> DataSets,
    int Starts,
    int Seed,
    int MaxIterations,
    bool Profile,
    bool Triangle,
    DerivativeMode Derivatives = DerivativeMode.Auto,
    double ProfileLevel = FitSpec.DefaultProfileLevel)
{
    /// <summary>The default level of profile-likelihood intervals.</summary>
    public const double DefaultProfileLevel = 0.95;
}

/// <summary>How the fitter forms the Jacobian (<c>fit.derivatives</c>).</summary>
public enum DerivativeMode
{
    /// <summary>Analytic sensitivities where the symmetric eigen path and the deck allow them, central differences elsewhere.</summary>
    Auto,

    /// <summary>Central differences for every parameter (to compare, or to rule out the analytic path).</summary>
    Differences,
}

/// <summary>
/// One free parameter: <paramref name="Key"/> names what it sets in the deck (kT, a [parameters]
/// entry, loss.LABEL, pumping.LABEL, initial.LABEL or rate.FROM.TO); the start defaults to the
/// deck's own value.
/// </summary>
/// <param name="Key">The key as written in [fit.free].</param>
/// <param name="Start">The start value, or null for the deck's value.</param>
/// <param name="Lower">Lower bound (may be -infinity).</param>
/// <param name="Upper">Upper bound (may be +infinity).</param>
/// <param name="Log">True when the optimizer works on ln(value) (the value stays positive).</param>
/// <param name="Span">Where the key is written.</param>
public sealed record FreeParameterSpec(string Key, double? Start, double Lower, double Upper, bool Log, SourceSpan Span);

/// <summary>A named observable: an expression of P(label), the deck parameters and kT.</summary>
/// <param name="Name">The column name the data use for it.</param>
/// <param name="Expression">The expression text.</param>
/// <param name="Span">The first character of the expression inside the deck.</param>
public sealed record ObservableSpec(string Name, string Expression, SourceSpan Span);

/// <summary>One data set: a CSV of a time column and observed columns, with its own deck overrides.</summary>
/// <param name="Name">The data set's name (the key under [fit.data]).</param>
/// <param name="CsvPath">The CSV file, resolved against the deck's folder.</param>
/// <param name="TimeColumn">The name of the time column.</param>
/// <param name="Overrides">key=value overrides applied to the deck for this data set only.</param>
/// <param name="Span">Where the data set's table is written.</param>
public sealed record DataSetSpec(string Name, string CsvPath, string TimeColumn, IReadOnlyList<string> Overrides, SourceSpan Span);
