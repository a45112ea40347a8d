using System.Globalization;
using System.Text;
using ScottPlot;

namespace RateDeck.Outputs;

/// <summary>
/// Ticks for an axis that shows log10 of the data (ScottPlot 5 draws log axes that way): major
/// ticks at whole decades labelled 10ⁿ, thinned to every 2nd, 5th, 10th... decade when they would
/// crowd; minor ticks at 2..9 times each decade when there is room, otherwise at the unlabelled
/// decades. When the view spans less than two decades the ticks fall on every digit times a
/// power of ten instead, labelled where they fit, else only 1, 2 and 5.
/// </summary>
internal sealed class DecadeTickGenerator : ITickGenerator
{
    private static readonly int[] _decadeSteps = [1, 2, 3, 5, 10, 20, 25, 50, 100, 200, 500, 1000];

    // Minor ticks at 2..9 x 10^n need this many pixels per decade to stay distinct.
    private const float _minPixelsPerDecadeForDigitTicks = 40;

    public Tick[] Ticks { get; set; } = [];

    public int MaxTickCount { get; set; } = 10_000;

    public void Regenerate(CoordinateRange range, Edge edge, PixelLength size, Paint paint, LabelStyle labelStyle)
    {
        var low = Math.Min(range.Value1, range.Value2);
        var high = Math.Max(range.Value1, range.Value2);
        if (!double.IsFinite(low) || !double.IsFinite(high) || high <= low)
        {
            Ticks = [];
            return;
        }
        var first = (int)Math.Ceiling(low - 1e-9);
        var last = (int)Math.Floor(high + 1e-9);
        // The longest labels sit at the ends of the range (the most digits, or a minus sign).
        var sample = new[] { DecadeLabel(first), DecadeLabel(last) }.Select(label => labelStyle.Measure(label, paint)).ToArray();
        var labelExtent = edge.IsVertical() ? sample.Max(m => m.Height) : sample.Max(m => m.Width);
        var maxLabels = Math.Max(2, (int)(size.Length / (labelExtent * (edge.IsVertical() ? 2.2 : 1.6))));
        var ticks = high - low >= 2
            ? DecadeTicks(low, high, first, last, maxLabels, size.Length / (high - low))
            : DigitTicks(low, high, maxLabels);
        Ticks = ticks.Take(MaxTickCount).ToArray();
    }

    private static List<Tick> DecadeTicks(double low, double high, int first, int last, int maxLabels, double pixelsPerDecade)
    {
        var step = _decadeSteps.FirstOrDefault(s => (last - first) / s + 1 <= maxLabels, _decadeSteps[^1]);
        var ticks = new List<Tick>();
        for (var n = first; n <= last; n++)
        {
            ticks.Add(((n % step) + step) % step == 0 ? Tick.Major(n, DecadeLabel(n)) : Tick.Minor(n));
        }
        if (step == 1 && pixelsPerDecade >= _minPixelsPerDecadeForDigitTicks)
        {
            for (var n = first - 1; n <= last; n++)
            {
                for (var digit = 2; digit <= 9; digit++)
                {
                    var position = n + Math.Log10(digit);
                    if (position >= low && position <= high)
                    {
                        ticks.Add(Tick.Minor(position));
                    }
                }
            }
        }
        return ticks;
    }

    private static List<Tick> DigitTicks(double low, double high, int maxLabels)
    {
        var candidates = new List<(double Position, int Digit, int Exponent)>();
        for (var n = (int)Math.Floor(low); n <= (int)Math.Ceiling(high); n++)
        {
            for (var digit = 1; digit <= 9; digit++)
            {
                var position = n + Math.Log10(digit);
                if (position >= low - 1e-9 && position <= high + 1e-9)
                {
                    candidates.Add((position, digit, n));
                }
            }
        }
        var labelAll = candidates.Count <= maxLabels;
        return candidates
            .Select(c => labelAll || c.Digit is 1 or 2 or 5 ? Tick.Major(c.Position, DigitLabel(c.Digit, c.Exponent)) : Tick.Minor(c.Position))
            .ToList();
    }

    /// <summary>10ⁿ with Unicode superscripts (present in DejaVu Sans and most sans fonts).</summary>
    internal static string DecadeLabel(int exponent) => "10" + Superscript(exponent);

    private static string DigitLabel(int digit, int exponent)
    {
        if (exponent is >= -3 and <= 3)
        {
            return (digit * Math.Pow(10, exponent)).ToString("G6", CultureInfo.InvariantCulture);
        }
        return digit == 1 ? DecadeLabel(exponent) : $"{digit}×{DecadeLabel(exponent)}";
    }

    private static string Superscript(int value)
    {
        const string digits = "⁰¹²³⁴⁵⁶⁷⁸⁹";
        var text = new StringBuilder();
        if (value < 0)
        {
            text.Append('⁻');
        }
        foreach (var c in Math.Abs(value).ToString(CultureInfo.InvariantCulture))
        {
            text.Append(digits[c - '0']);
        }
        return text.ToString();
    }
}
