using System.Globalization;

namespace RateDeck.Text;

/// <summary>Number formatting for the plain-text messages of the diagnostics, invariant culture.</summary>
public static class Format
{
    /// <summary>Three significant digits, exponent form outside [0.1, 1e5): 2.15e-3, 4.7e5, 0.125, 1620.</summary>
    public static string Number(double value)
    {
        var magnitude = Math.Abs(value);
        if (magnitude == 0)
        {
            return "0";
        }

        if (!double.IsFinite(value))
        {
            return value.ToString(CultureInfo.InvariantCulture);
        }

        if (magnitude < 0.1 || magnitude >= 1e5)
        {
            return value.ToString("0.##e0", CultureInfo.InvariantCulture);
        }

        var unit = Math.Pow(10, Math.Floor(Math.Log10(magnitude)) - 2);
        return (Math.Round(value / unit) * unit).ToString("0.###", CultureInfo.InvariantCulture);
    }

    /// <summary>
    /// A time with its unit, "9.15e-3 t0"; the number alone when <paramref name="unit"/> is empty
    /// (a rate matrix built in code, with no deck to name the unit).
    /// </summary>
    public static string Time(double value, string unit) => string.IsNullOrEmpty(unit) ? Number(value) : $"{Number(value)} {unit}";

    /// <summary>A rate (per unit of time) with its unit, "0.128 /t0"; "0.128 per unit time" when <paramref name="unit"/> is empty.</summary>
    public static string Rate(double value, string unit) => string.IsNullOrEmpty(unit) ? $"{Number(value)} per unit time" : $"{Number(value)} /{unit}";

    /// <summary>The unit of a rate for a table heading or a JSON field, "1/t0"; empty when <paramref name="timeUnit"/> is.</summary>
    public static string RateUnit(string timeUnit) => string.IsNullOrEmpty(timeUnit) ? "" : $"1/{timeUnit}";

    /// <summary>A whole count: exact below a million, else in exponent form (4.7e6).</summary>
    public static string Count(double count) =>
        count < 1e6 ? count.ToString("0", CultureInfo.InvariantCulture) : count.ToString("0.##e0", CultureInfo.InvariantCulture);

    /// <summary>"1 class", "2 classes".</summary>
    public static string Count(int count, string singular, string plural) =>
        $"{count.ToString(CultureInfo.InvariantCulture)} {(count == 1 ? singular : plural)}";

    /// <summary>Labels joined for a message, at most <paramref name="limit"/> of them.</summary>
    public static string Labels(IReadOnlyList<string> labels, int limit = 10) =>
        labels.Count <= limit ? string.Join(", ", labels) : string.Join(", ", labels.Take(limit)) + $", ... ({labels.Count} states)";
}
