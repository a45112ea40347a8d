namespace RateDeck.Propagation;

/// <summary>
/// Passes the completed fraction on to an <see cref="IProgress{T}"/> at most once per percent
/// (so at most 100 reports per run, the last one exactly 1), whatever the number of steps.
/// </summary>
internal sealed class ProgressThrottle
{
    private const int _maxReports = 100;
    private readonly IProgress<double>? _progress;
    private int _nextPercent = 1;

    /// <summary>Wraps <paramref name="progress"/>, which may be null (nothing is reported).</summary>
    public ProgressThrottle(IProgress<double>? progress) => _progress = progress;

    /// <summary>Reports <paramref name="fraction"/> if it reached the next whole percent.</summary>
    public void Report(double fraction)
    {
        if (_progress is null || _nextPercent > _maxReports || fraction * _maxReports < _nextPercent)
        {
            return;
        }

        var clamped = Math.Min(fraction, 1.0);
        _progress.Report(clamped);
        _nextPercent = Math.Max(_nextPercent + 1, (int)Math.Floor(clamped * _maxReports) + 1);
    }

    /// <summary>Reports 1 unless it was already reported.</summary>
    public void Complete()
    {
        if (_progress is not null && _nextPercent <= _maxReports)
        {
            _progress.Report(1.0);
            _nextPercent = _maxReports + 1;
        }
    }
}
