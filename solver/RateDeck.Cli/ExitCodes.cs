namespace RateDeck.Cli;

/// <summary>
/// The documented exit codes of every verb (docs/cli.md). Scripts rely on them: keep them stable.
/// </summary>
public static class ExitCodes
{
    /// <summary>Finished; every check asked for passed.</summary>
    public const int Success = 0;

    /// <summary>An internal error: a bug in RateDeck. The message asks for a report.</summary>
    public const int InternalError = 1;

    /// <summary>A bad deck, CSV file, override or command line.</summary>
    public const int BadInput = 2;

    /// <summary>The explicit time step is above a stability or positivity limit.</summary>
    public const int UnsafeTimeStep = 3;

    /// <summary>The deck is well formed but its rate matrix fails a sanity check, or has no steady state.</summary>
    public const int CheckFailed = 4;

    /// <summary>An output file or folder could not be written.</summary>
    public const int OutputFailed = 5;

    /// <summary><c>ratedeck fit</c> stopped without converging (iteration limit, or no step reduces the RSS); the report is still printed.</summary>
    public const int NotConverged = 6;

    /// <summary><c>ratedeck sweep</c> and <c>collect</c>: the summary is written, and some points failed or have no results yet (its status column says which).</summary>
    public const int PointsFailed = 7;

    /// <summary>
    /// The implicit integrator, as the exact path (the one the deck needs, or <c>--exact implicit</c>),
    /// gave up at its step limit before the last output or data time: no number of it is printed or
    /// written. Not a bug: fewer or earlier output (or data) times need fewer steps.
    /// </summary>
    public const int IntegrationGaveUp = 8;

    /// <summary>Stopped by SIGINT (Ctrl-C): 128 + 2, as shells report it. Temporary files were removed; the output folder holds the earlier run's files or all of this run's, never a mix.</summary>
    public const int Interrupted = 130;

    /// <summary>Stopped by SIGTERM: 128 + 15, as shells report it. Temporary files were removed; the output folder holds the earlier run's files or all of this run's, never a mix.</summary>
    public const int Terminated = 143;
}
