using System.Globalization;

namespace RateDeck.Outputs;

/// <summary>
/// How numbers are written to and read from RateDeck's CSV files: invariant culture, the shortest
/// text that parses back to the identical double (format "R", which on .NET Core 3.0 and later
/// round-trips every double exactly, subnormals included; negative zero is written as 0, the sign
/// of a zero being rounding noise that readers should not see), and the non-finite
/// values as <c>inf</c>, <c>-inf</c> and <c>nan</c>, the spellings that NumPy, pandas and most
/// spreadsheet-free tools read.
/// </summary>
public static class CsvNumber
{
    /// <summary>Positive infinity as written.</summary>
    public const string PositiveInfinity = "inf";

    /// <summary>Negative infinity as written.</summary>
    public const string NegativeInfinity = "-inf";

    /// <summary>Not-a-number as written.</summary>
    public const string NotANumber = "nan";

    /// <summary>The text for <paramref name="value"/>.</summary>
    public static string Format(double value) => value switch
    {
        double.PositiveInfinity => PositiveInfinity,
        double.NegativeInfinity => NegativeInfinity,
        _ when double.IsNaN(value) => NotANumber,
        0.0 => "0",
        _ => value.ToString("R", CultureInfo.InvariantCulture),
    };

    /// <summary>
    /// Parses text written by <see cref="Format"/> (or any invariant-culture number, and the
    /// non-finite spellings in any letter case); false when it is not a number.
    /// </summary>
    public static bool TryParse(string? text, out double value)
    {
        var trimmed = text.AsSpan().Trim();
        if (trimmed.Equals(PositiveInfinity, StringComparison.OrdinalIgnoreCase) || trimmed.Equals("+inf", StringComparison.OrdinalIgnoreCase))
        {
            value = double.PositiveInfinity;
            return true;
        }
        if (trimmed.Equals(NegativeInfinity, StringComparison.OrdinalIgnoreCase))
        {
            value = double.NegativeInfinity;
            return true;
        }
        if (trimmed.Equals(NotANumber, StringComparison.OrdinalIgnoreCase))
        {
            value = double.NaN;
            return true;
        }
        return double.TryParse(trimmed, NumberStyles.Float, CultureInfo.InvariantCulture, out value);
    }
}
