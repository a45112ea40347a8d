using RateDeck.Decks;
using RateDeck.Propagation;

namespace RateDeck.Pipeline;

/// <summary>
/// What a caller of <see cref="DeckRun"/> may choose beyond the deck: each null or false value
/// keeps the deck's own choice. Verbs fill it from their command line; the fitter from its trial.
/// </summary>
public sealed record RunOptions
{
    /// <summary>The explicit method; null: the deck's <c>run.explicit</c>.</summary>
    public ExplicitMethod? Method { get; init; }

    /// <summary>
    /// An explicit time step chosen by the caller (it is also the step the limits judge); null:
    /// the deck's <c>run.dt</c>, else <see cref="RunSpec.SafetyFactor"/> times the method's
    /// stability limit.
    /// </summary>
    public double? Dt { get; init; }

    /// <summary>Ignore the deck's <c>run.dt</c> and take the safety factor times the stability limit.</summary>
    public bool AutomaticDt { get; init; }

    /// <summary>The time the step counts of the limits refer to; null: the deck's <c>run.t_end</c>.</summary>
    public double? EndTime { get; init; }

    /// <summary>Output times (ascending, from 0); null: the deck's <c>[run]</c> grid.</summary>
    public IReadOnlyList<double>? Times { get; init; }

    /// <summary>No explicit trajectory: only the exact one (the fitter's trials, <c>run --exact-only</c>).</summary>
    public bool ExactOnly { get; init; }

    /// <summary>An exact path asked for instead of the automatic choice; null: chosen from the spectrum and the horizon.</summary>
    public ExactPathRequest? ExactPath { get; init; }

    /// <summary>
    /// Compute every eigenvalue of K whatever N; otherwise a sparse tridiagonal deck above
    /// <see cref="Diagnostics.Spectrum.FullSpectrumStateLimit"/> states gets the extremes only
    /// (<see cref="Diagnostics.SpectrumExtent.Automatic"/>).
    /// </summary>
    public bool FullSpectrum { get; init; }

    /// <summary>Also integrate with the implicit integrator, beside explicit and exact, and compare it with exact.</summary>
    public bool WithImplicit { get; init; }

    /// <summary>Integrate an explicit step the limits call unsafe anyway (to watch it fail); otherwise asking for it throws <see cref="UnsafeStepException"/>.</summary>
    public bool AllowUnsafeStep { get; init; }

    /// <summary>
    /// Progress of each propagation, by label ("exact", "euler", "rk4"); null or a null result: none.
    /// A progress that is <see cref="IDisposable"/> is disposed when its propagation ends.
    /// </summary>
    public Func<string, IProgress<double>?>? Progress { get; init; }
}

/// <summary>Whether the explicit step can be trusted for a probability, and why not.</summary>
/// <param name="Safe">True when the step is within every limit that applies to the method.</param>
/// <param name="Problem">What is wrong and what to do, one line; null when safe.</param>
public sealed record StepVerdict(bool Safe, string? Problem);

/// <summary>Thrown when an explicit trajectory is asked for with a step its limits call unsafe (see <see cref="RunOptions.AllowUnsafeStep"/>).</summary>
public sealed class UnsafeStepException : Exception
{
    /// <summary>An exception carrying the verdict's problem as its message.</summary>
    public UnsafeStepException(string message)
        : base(message)
    {
    }

    /// <summary>An exception without a message.</summary>
    public UnsafeStepException()
    {
    }

    /// <summary>An exception with a message and its cause.</summary>
    public UnsafeStepException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
