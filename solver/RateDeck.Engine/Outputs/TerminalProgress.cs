using System.Globalization;

namespace RateDeck.Outputs;

/// <summary>
/// A one-line progress bar on standard error: <c>label [#####.....]  42.0%  2:13 left</c>.
/// Redrawn at most ten times a second (the last report always draws), silent when standard error
/// is redirected to a file or pipe or when disabled, so logs and shell loops stay clean.
/// Thread-safe. <see cref="Dispose"/> (or <see cref="Finish"/>) ends the line.
/// </summary>
public sealed class TerminalProgress : IProgress<double>, IDisposable
{
    private const int _barWidth = 30;
    private static readonly TimeSpan _redrawInterval = TimeSpan.FromMilliseconds(100);

    private readonly string _label;
    private readonly TextWriter? _writer;
    private readonly TimeProvider _clock;
    private readonly long _started;
    private readonly Lock _gate = new();
    private long _lastDrawn;
    private int _lastLength;
    private bool _drawn;
    private bool _finished;

    /// <summary>
    /// A bar labelled <paramref name="label"/> on <see cref="Console.Error"/>; it draws nothing when
    /// <paramref name="enabled"/> is false or standard error is redirected.
    /// </summary>
    public TerminalProgress(string label, bool enabled = true)
        : this(label, enabled && !Console.IsErrorRedirected ? Console.Error : null, TimeProvider.System)
    {
    }

    /// <summary>A bar drawn on <paramref name="writer"/> (null: silent), timed by <paramref name="clock"/>.</summary>
    internal TerminalProgress(string label, TextWriter? writer, TimeProvider clock)
    {
        _label = label;
        _writer = writer;
        _clock = clock;
        _started = clock.GetTimestamp();
    }

    /// <summary>True when the bar writes anything at all.</summary>
    public bool IsActive => _writer is not null;

    /// <summary>Takes the completed fraction; values outside [0, 1] are clamped, NaN is ignored.</summary>
    public void Report(double value)
    {
        if (_writer is null || double.IsNaN(value))
        {
            return;
        }
        var fraction = Math.Clamp(value, 0.0, 1.0);
        lock (_gate)
        {
            if (_finished)
            {
                return;
            }
            var now = _clock.GetTimestamp();
            if (_drawn && fraction < 1.0 && _clock.GetElapsedTime(_lastDrawn, now) < _redrawInterval)
            {
                return;
            }
            Draw(fraction, _clock.GetElapsedTime(_started, now));
            _lastDrawn = now;
        }
    }

    /// <summary>Ends the line if a bar was drawn; later reports are ignored.</summary>
    public void Finish()
    {
        if (_writer is null)
        {
            return;
        }
        lock (_gate)
        {
            if (_finished)
            {
                return;
            }
            _finished = true;
            if (_drawn)
            {
                _writer.Write('\n');
                _writer.Flush();
            }
        }
    }

    /// <summary>Same as <see cref="Finish"/>.</summary>
    public void Dispose() => Finish();

    private void Draw(double fraction, TimeSpan elapsed)
    {
        var filled = (int)Math.Round(fraction * _barWidth);
        var line = string.Create(CultureInfo.InvariantCulture,
            $"{_label} [{new string('#', filled)}{new string('.', _barWidth - filled)}] {fraction * 100,5:0.0}%  {Remaining(fraction, elapsed)}");
        // Carriage return and padding overwrite the previous, possibly longer, line in place.
        _writer!.Write('\r');
        _writer.Write(line.PadRight(_lastLength));
        _writer.Flush();
        _lastLength = line.Length;
        _drawn = true;
    }

    private static string Remaining(double fraction, TimeSpan elapsed)
    {
        if (fraction >= 1.0)
        {
            return $"done in {Clock(elapsed)}";
        }
        // Too early to extrapolate: the first percent is dominated by set-up time.
        if (fraction < 0.01)
        {
            return "estimating";
        }
        return $"{Clock(elapsed * ((1.0 - fraction) / fraction))} left";
    }

    private static string Clock(TimeSpan span) => span.TotalHours >= 1
        ? string.Create(CultureInfo.InvariantCulture, $"{(int)span.TotalHours}:{span.Minutes:00}:{span.Seconds:00}")
        : string.Create(CultureInfo.InvariantCulture, $"{span.Minutes}:{span.Seconds:00}");
}
