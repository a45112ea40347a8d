using System.Globalization;
using RateDeck.Decks;
using RateDeck.Pipeline;

namespace RateDeck.Sweeps;

/// <summary>
/// One varied deck key of a sweep, from <c>--vary key=start:stop:count[:log]</c>: <see cref="Count"/>
/// values from <see cref="Start"/> to <see cref="Stop"/> (both included), evenly spaced, or
/// geometric with <c>:log</c>. Each value between the ends is rounded to
/// <see cref="RunSetup.GridTimeDigits"/> significant digits, so that the value recorded in every
/// output (<c>--set temperature.kT=0.3</c>) is the decimal number the grid means, the one a shell
/// loop would type, and not 0.30000000000000004.
/// </summary>
/// <param name="Key">The deck key, as <c>--set</c> takes it (<c>temperature.kT</c>, <c>parameters.beta</c>, <c>run.t_end</c>).</param>
/// <param name="Start">The first value.</param>
/// <param name="Stop">The last value.</param>
/// <param name="Count">How many values, at least 1 (one value: <see cref="Start"/>, and then Stop must equal it).</param>
/// <param name="Logarithmic">Geometric spacing (both ends positive) instead of even spacing.</param>
public sealed record SweepAxis(string Key, double Start, double Stop, int Count, bool Logarithmic)
{
    /// <summary>The word that asks for geometric spacing: <c>key=1e-3:1:7:log</c>.</summary>
    public const string LogWord = "log";

    /// <summary>
    /// Reads <c>key=start:stop:count[:log]</c>; every mistake is a <see cref="SweepSpecException"/>
    /// that quotes the text and says what to write.
    /// </summary>
    public static SweepAxis Parse(string text)
    {
        ArgumentNullException.ThrowIfNull(text);
        var equals = text.IndexOf('=', StringComparison.Ordinal);
        if (equals <= 0)
        {
            throw new SweepSpecException(text, "write key=start:stop:count, or key=start:stop:count:log for geometric spacing, like temperature.kT=0.5:2:4");
        }

        var key = text[..equals].Trim();
        var parts = text[(equals + 1)..].Split(':');
        if (parts.Length is not (3 or 4))
        {
            throw new SweepSpecException(text, $"after `{key}=` give start:stop:count or start:stop:count:log ({parts.Length} part{(parts.Length == 1 ? "" : "s")} given)");
        }

        var start = Number(text, parts[0], "start");
        var stop = Number(text, parts[1], "stop");
        if (!int.TryParse(parts[2], NumberStyles.None, CultureInfo.InvariantCulture, out var count) || count < 1)
        {
            throw new SweepSpecException(text, $"the count `{parts[2]}` must be a whole number of 1 or more");
        }

        var logarithmic = parts.Length == 4;
        if (logarithmic && parts[3] != LogWord)
        {
            throw new SweepSpecException(text, $"the fourth part `{parts[3]}` may only be `{LogWord}` (geometric spacing)");
        }

        if (logarithmic && (start <= 0 || stop <= 0))
        {
            throw new SweepSpecException(text, "geometric spacing (:log) needs start and stop above 0");
        }

        if (count == 1 && start != stop)
        {
            throw new SweepSpecException(text, "one value (count 1) needs start = stop; give a count of 2 or more for a range");
        }

        return new SweepAxis(key, start, stop, count, logarithmic);
    }

    /// <summary>The values, from <see cref="Start"/> to <see cref="Stop"/>; the ends exactly as given.</summary>
    public IReadOnlyList<double> Values()
    {
        var values = new double[Count];
        values[0] = Start;
        for (var k = 1; k < Count - 1; k++)
        {
            var fraction = (double)k / (Count - 1);
            values[k] = Round(Logarithmic
                ? Math.Exp(Math.Log(Start) + (fraction * (Math.Log(Stop) - Math.Log(Start))))
                : Start + (fraction * (Stop - Start)));
        }

        values[Count - 1] = Stop;
        return values;
    }

    /// <summary>
    /// The override that sets <see cref="Key"/> to <paramref name="value"/>, typed as the <c>--set</c>
    /// text of the same value would be: a whole number below 1e15 as an integer (so that a count
    /// such as <c>run.outputs</c> can be varied), anything else as a float.
    /// </summary>
    public DeckOverride Override(double value) =>
        Math.Abs(value) < 1e15 && value == Math.Floor(value)
            ? DeckOverride.Set(Key, (long)value)
            : DeckOverride.Set(Key, value);

    /// <summary>The specification as written on the command line.</summary>
    public override string ToString() =>
        $"{Key}={Csv(Start)}:{Csv(Stop)}:{Count.ToString(CultureInfo.InvariantCulture)}{(Logarithmic ? ":" + LogWord : "")}";

    private static string Csv(double value) => Outputs.CsvNumber.Format(value);

    private static double Round(double value) =>
        double.Parse(value.ToString($"G{RunSetup.GridTimeDigits}", CultureInfo.InvariantCulture), CultureInfo.InvariantCulture);

    private static double Number(string text, string part, string name) =>
        double.TryParse(part, NumberStyles.Float, CultureInfo.InvariantCulture, out var value) && double.IsFinite(value)
            ? value
            : throw new SweepSpecException(text, $"the {name} `{part}` is not a finite number");
}

/// <summary>A <c>--vary</c> specification that cannot be read; the message quotes it and says what to write.</summary>
public sealed class SweepSpecException : Exception
{
    /// <summary>Creates the exception for <paramref name="spec"/> with what is wrong.</summary>
    public SweepSpecException(string spec, string problem)
        : base($"--vary {spec}: {problem}")
    {
    }

    /// <summary>An exception without a message.</summary>
    public SweepSpecException()
    {
    }

    /// <summary>An exception with a message and its cause.</summary>
    public SweepSpecException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
