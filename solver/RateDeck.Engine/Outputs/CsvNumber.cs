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

    /// <summary>Room for the longest text <see cref="Format"/> writes ("-2.2250738585072014E-308" is 24 characters).</summary>
    public const int MaxLength = 32;

    /// <summary>The text for <paramref name="value"/>.</summary>
    public static string Format(double value)
    {
        Span<char> text = stackalloc char[MaxLength];
        return new string(text[..Write(value, text)]);
    }

    /// <summary>Writes the text of <see cref="Format"/> into <paramref name="destination"/> (at least <see cref="MaxLength"/> long) and returns its length: no string made.</summary>
    public static int Write(double value, Span<char> destination)
    {
        var text = value switch
        {
            double.PositiveInfinity => PositiveInfinity,
            double.NegativeInfinity => NegativeInfinity,
            _ when double.IsNaN(value) => NotANumber,
            0.0 => "0",
            _ => null,
        };
        if (text is not null)
        {
            text.CopyTo(destination);
            return text.Length;
        }

        return value.TryFormat(destination, out var written, "R", CultureInfo.InvariantCulture)
            ? written
            : throw new ArgumentException($"{MaxLength} characters hold any double's text; the destination is shorter", nameof(destination));
    }

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
