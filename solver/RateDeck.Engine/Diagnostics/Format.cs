using System.Globalization;

namespace RateDeck.Diagnostics;

/// <summary>Number formatting for the plain-text messages of the diagnostics, invariant culture.</summary>
internal static class Format
{
    /// <summary>Three significant digits, exponent form outside [0.1, 1e5): 2.1e-3, 4.7e5, 0.125, 1000.</summary>
    public static string Number(double value)
    {
        if (!double.IsFinite(value))
        {
            return value.ToString(CultureInfo.InvariantCulture);
        }

        var magnitude = Math.Abs(value);
        return magnitude != 0 && (magnitude < 0.1 || magnitude >= 1e5)
            ? value.ToString("0.##e0", CultureInfo.InvariantCulture)
            : value.ToString("0.###", CultureInfo.InvariantCulture);
    }

    /// <summary>Labels joined for a message, at most <paramref name="limit"/> of them.</summary>
    public static string Labels(IReadOnlyList<string> labels, int limit = 10) =>
        labels.Count <= limit ? string.Join(", ", labels) : string.Join(", ", labels.Take(limit)) + $", ... ({labels.Count} states)";
}
