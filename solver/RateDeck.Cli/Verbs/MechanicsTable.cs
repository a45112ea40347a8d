using System.Globalization;
using RateDeck.Decks;
using RateDeck.Mechanics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// What the mechanics stage derived for a deck with a Lagrangian, per state: energy, action J,
/// period T, weight g = T / h, turning points and the estimated relative error of J and T. Shown
/// as a compact table, written to <c>mechanics.csv</c> and given to the JSON summary.
/// </summary>
internal sealed class MechanicsTable(LoadedDeck loaded, MechanicsResult result)
{
    /// <summary>The name of the CSV file in the output folder.</summary>
    public const string FileName = "mechanics.csv";

    /// <summary>Every state is listed up to this many; beyond it, the first and last few.</summary>
    private const int _fullListLimit = 40;

    private const int _endRows = 5;

    private Deck Deck => loaded.Deck;

    private double[] Energies => loaded.States.Energies;

    /// <summary>Writes <see cref="FileName"/> into <paramref name="folder"/> (created if need be) and returns its path.</summary>
    public string WriteCsv(string folder)
    {
        Directory.CreateDirectory(folder);
        var path = Path.Combine(folder, FileName);
        var (energy, time) = (EnergyUnits.Name(Deck.EnergyUnit), MechanicsTimeUnit);
        ResultCsv.WritePerStateTable(path, OutputHeader.For(Deck), loaded.States.Labels,
        [
            new CsvColumn("energy", Energies, energy),
            new CsvColumn("action", result.Actions, $"{energy}*{time}"),
            new CsvColumn("period", result.Periods, time),
            new CsvColumn("weight", result.Weights, $"1/{energy}"),
            new CsvColumn("turning_point_low", result.TurningPointsLow),
            new CsvColumn("turning_point_high", result.TurningPointsHigh),
            new CsvColumn("relative_error", result.RelativeErrors),
        ]);
        return path;
    }

    /// <summary>The lines of the human summary: what was derived, the table, and where the CSV went.</summary>
    public void WriteSummary(TextWriter output, string csvPath)
    {
        var spec = Deck.Mechanics!;
        var use = Deck.Weights is MechanicsWeights ? "the deck's weights" : "not used as weights (the deck gives its own)";
        output.WriteLine(string.Create(CultureInfo.InvariantCulture, $"mechanics    L(q, v) = {spec.Lagrangian}, h = {spec.Planck:G6}; g = T/h is {use}"));
        output.WriteLine($"  {"state",-10} {"energy",13} {"action J",13} {"period T",13} {"weight g",13} {"est. error",11}");
        var count = Energies.Length;
        foreach (var i in ShownRows(count))
        {
            if (count > _fullListLimit && i == count - _endRows)
            {
                output.WriteLine($"  ... {count - 2 * _endRows} more states ...");
            }

            output.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"  {loaded.States.Labels[i],-10} {Energies[i],13:G6} {result.Actions[i],13:G6} {result.Periods[i],13:G6} {result.Weights[i],13:G6} {Format.Number(result.RelativeErrors[i]),11}"));
        }

        output.WriteLine($"  units: energy {EnergyUnits.Name(Deck.EnergyUnit)}, time {MechanicsTimeUnit}; every state in {csvPath}");
    }

    /// <summary>Periods and actions are in the unit of the deck's Planck constant: the deck's given time unit, not the output unit.</summary>
    private string MechanicsTimeUnit => Deck.GivenTimeUnit ?? Deck.TimeUnit;

    /// <summary>Every state up to <see cref="_fullListLimit"/>; beyond, the first and the last <see cref="_endRows"/>.</summary>
    private static IEnumerable<int> ShownRows(int count) => count <= _fullListLimit
        ? Enumerable.Range(0, count)
        : Enumerable.Range(0, _endRows).Concat(Enumerable.Range(count - _endRows, _endRows));

    /// <summary>The <c>mechanics</c> object of the JSON summary: arrays in state order, and the CSV path.</summary>
    public Dictionary<string, object?> Json(string csvPath) => new()
    {
        ["lagrangian"] = Deck.Mechanics!.Lagrangian,
        ["planck"] = Deck.Mechanics.Planck,
        ["weights_from_mechanics"] = Deck.Weights is MechanicsWeights,
        ["file"] = csvPath,
        ["labels"] = loaded.States.Labels,
        ["energies"] = Energies,
        ["actions"] = result.Actions,
        ["periods"] = result.Periods,
        ["weights"] = result.Weights,
        ["turning_points_low"] = result.TurningPointsLow,
        ["turning_points_high"] = result.TurningPointsHigh,
        ["relative_errors"] = result.RelativeErrors,
    };
}
