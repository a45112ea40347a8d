using System.Globalization;
using System.Numerics;

namespace RateDeck.Decks;

/// <summary>
/// The time units a deck may name and the conversions between them. Each unit is a whole number
/// of seconds times a power of ten: the SI prefixes femto to milli (10^-15 .. 10^-3, SI Brochure,
/// 9th ed., table 7), the second, and the minute and hour (60 s and 3600 s, SI Brochure table 8,
/// units accepted for use with the SI).
/// </summary>
public static class TimeUnits
{
    private static readonly (string Name, int PowerOfTen, int Multiple)[] _units =
    [
        ("fs", -15, 1),
        ("ps", -12, 1),
        ("ns", -9, 1),
        ("us", -6, 1),
        ("ms", -3, 1),
        ("s", 0, 1),
        ("min", 0, 60),
        ("h", 0, 3600),
    ];

    /// <summary>The names a deck may write for <c>[units] time</c> and <c>output_time</c>, shortest unit first.</summary>
    public static IReadOnlyList<string> Names { get; } = [.. _units.Select(u => u.Name)];

    /// <summary>True when <paramref name="name"/> is one of <see cref="Names"/> (exact match: <c>ms</c>, not <c>MS</c>).</summary>
    public static bool IsKnown(string name) => _units.Any(u => u.Name == name);

    /// <summary>
    /// <paramref name="value"/> given in <paramref name="from"/> expressed in <paramref name="to"/>:
    /// the shortest decimal that reads back as <paramref name="value"/> (what the deck says) is
    /// shifted by the power of ten exactly and multiplied by 60 or 3600 exactly, then rounded once to
    /// the nearest double; only a division by 60 or 3600 (minutes or hours out) rounds a second time.
    /// So <c>t_end = 1e-4</c> in s is exactly <c>100</c> in us, never 100.00000000000001.
    /// </summary>
    /// <exception cref="ArgumentException">A unit is not one of <see cref="Names"/>.</exception>
    public static double ConvertTime(double value, string from, string to)
    {
        var (fromPower, fromMultiple) = Find(from);
        var (toPower, toMultiple) = Find(to);
        if (from == to || value == 0 || !double.IsFinite(value))
        {
            return value;
        }

        var common = (int)BigInteger.GreatestCommonDivisor(fromMultiple, toMultiple);
        var (mantissa, exponent) = Decimal(value);
        mantissa *= fromMultiple / common;
        var divisor = toMultiple / common;
        if (mantissa % divisor == 0)
        {
            (mantissa, divisor) = (mantissa / divisor, 1);
        }

        var shifted = double.Parse(string.Create(CultureInfo.InvariantCulture, $"{mantissa}E{exponent + fromPower - toPower}"), NumberStyles.Float, CultureInfo.InvariantCulture);
        return shifted / divisor;
    }

    /// <summary>
    /// The factor that turns a rate per <paramref name="from"/> into a rate per <paramref name="to"/>
    /// (seconds in <paramref name="to"/> over seconds in <paramref name="from"/>), applied as one
    /// multiplication or division by a whole number that a double holds exactly, so each converted
    /// rate is the correctly rounded value of the given double times the exact factor.
    /// </summary>
    /// <exception cref="ArgumentException">A unit is not one of <see cref="Names"/>.</exception>
    public static RateConversion RateFactor(string from, string to)
    {
        var (fromPower, fromMultiple) = Find(from);
        var (toPower, toMultiple) = Find(to);
        // rate per `to` = rate per `from` x (toMultiple 10^toPower) / (fromMultiple 10^fromPower).
        var numerator = toMultiple * BigInteger.Pow(10, Math.Max(0, toPower - fromPower));
        var denominator = fromMultiple * BigInteger.Pow(10, Math.Max(0, fromPower - toPower));
        var common = BigInteger.GreatestCommonDivisor(numerator, denominator);
        return new RateConversion((double)(numerator / common), (double)(denominator / common));
    }

    private static (int PowerOfTen, int Multiple) Find(string name)
    {
        foreach (var (unit, power, multiple) in _units)
        {
            if (unit == name)
            {
                return (power, multiple);
            }
        }

        throw new ArgumentException($"unknown time unit \"{name}\"; known units: {string.Join(", ", Names)}", nameof(name));
    }

    /// <summary>The shortest round-trip decimal of <paramref name="value"/> as digits and a power of ten: 2.5e-3 is (25, -4).</summary>
    private static (BigInteger Mantissa, int Exponent) Decimal(double value)
    {
        // "R" is the shortest text that reads back as the same double ("0.0001", "2.5E-15").
        var parts = value.ToString("R", CultureInfo.InvariantCulture).Split('E');
        var exponent = parts.Length > 1 ? int.Parse(parts[1], NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture) : 0;
        var digits = parts[0];
        var point = digits.IndexOf('.', StringComparison.Ordinal);
        if (point >= 0)
        {
            exponent -= digits.Length - point - 1;
            digits = digits.Remove(point, 1);
        }

        return (BigInteger.Parse(digits, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture), exponent);
    }
}

/// <summary>
/// Converts rates from one time unit to another: multiplies by <see cref="Multiplier"/> or divides
/// by <see cref="Divisor"/> (one of them is 1; both are whole numbers held exactly).
/// </summary>
/// <param name="Multiplier">The whole-number factor when the new unit is longer.</param>
/// <param name="Divisor">The whole-number divisor when the new unit is shorter.</param>
public readonly record struct RateConversion(double Multiplier, double Divisor)
{
    /// <summary>No conversion.</summary>
    public static RateConversion None { get; } = new(1, 1);

    /// <summary>True when rates are converted at all.</summary>
    public bool Changes => Multiplier != 1 || Divisor != 1;

    /// <summary>The rate per the new unit: one correctly rounded operation.</summary>
    public double Apply(double rate) => Divisor == 1 ? rate * Multiplier : rate / Divisor;
}
