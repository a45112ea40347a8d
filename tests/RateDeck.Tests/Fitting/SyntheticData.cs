using System.Globalization;
using RateDeck.Fitting;
using RateDeck.LinearAlgebra;

namespace RateDeck.Tests.Fitting;

/// <summary>
/// Synthetic data for a fit deck: a CSV with the right times and columns is written first (zeros),
/// the problem is prepared from the deck, the model is evaluated at the true values, and the CSV
/// is written again with those values plus seeded Gaussian noise (Box-Muller on System.Random).
/// </summary>
internal static class SyntheticData
{
    /// <summary>Writes a template CSV: header <c>t,columns...</c> and one row per time.</summary>
    public static void WriteTemplate(string path, double[] times, string[] columns)
    {
        var lines = new List<string> { "t," + string.Join(',', columns) };
        lines.AddRange(times.Select(t => t.ToString("R", CultureInfo.InvariantCulture) + string.Concat(columns.Select(_ => ",0"))));
        File.WriteAllLines(path, lines);
    }

    /// <summary>
    /// Fills every data set of the deck with the model at <paramref name="truth"/> (in [fit.free]
    /// order) plus noise of standard deviation <paramref name="noise"/>(value) drawn with <paramref name="seed"/>.
    /// </summary>
    public static void Fill(string deckPath, double[] truth, Func<double, double> noise, int seed, IReadOnlyList<string>? overrides = null)
    {
        var (_, _, problem) = Fitter.Prepare(deckPath, overrides ?? [], LinearAlgebraProviders.Select(null, out _));
        var predicted = problem.Predict(truth);
        var random = new Random(seed);
        var k = 0;
        foreach (var set in problem.DataSets)
        {
            var columns = set.Data.Series.Select(s => s.Name).ToArray();
            var times = set.Data.Series[0].Times;
            var rows = times.Select(t => new List<string> { t.ToString("R", CultureInfo.InvariantCulture) }).ToList();
            foreach (var series in set.Data.Series)
            {
                for (var row = 0; row < series.Values.Length; row++, k++)
                {
                    var value = predicted[k] + (noise(predicted[k]) * Gaussian(random));
                    rows[row].Add(value.ToString("R", CultureInfo.InvariantCulture));
                }
            }

            File.WriteAllLines(set.Spec.CsvPath, rows.Select(r => string.Join(',', r)).Prepend("t," + string.Join(',', columns)));
        }
    }

    private static double Gaussian(Random random)
    {
        var u1 = 1.0 - random.NextDouble();
        var u2 = random.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }
}
