using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;
using RateDeck.Decks;
using RateDeck.Fitting.Model;
using RateDeck.Outputs;

namespace RateDeck.Fitting.Outputs;

/// <summary>
/// Writes the fitted deck: the input deck's text with only the fitted numbers replaced, in place,
/// so that every comment, key order, blank line and layout is kept and <c>git diff</c> shows just
/// those values. Positions come from the TOML syntax tree (Tomlyn) of the deck text; a value that
/// is not written as a number in the deck (set on the command line, a measured rate in a CSV, an
/// initial state given by name) is not written and is listed instead.
/// </summary>
public static partial class FittedDeckWriter
{
    /// <summary>
    /// Writes the deck at <paramref name="deckPath"/> with <paramref name="values"/> of
    /// <paramref name="parameters"/> to <paramref name="target"/>; returns the keys it could not
    /// place, each with the reason.
    /// </summary>
    public static IReadOnlyList<string> Write(string deckPath, string target, IReadOnlyList<FreeParameter> parameters, IReadOnlyList<double> values, EnergyUnit unit)
    {
        ArgumentNullException.ThrowIfNull(parameters);
        ArgumentNullException.ThrowIfNull(values);
        var text = File.ReadAllText(deckPath, new UTF8Encoding(false, true));
        var (root, _) = TomlTree.ParseDocument(text, deckPath);
        var lineStarts = LineStarts(text);
        var edits = new List<(int Start, int Length, string Value)>();
        var skipped = new List<string>();
        for (var k = 0; k < parameters.Count; k++)
        {
            var (node, value, reason) = Locate(root, parameters[k].Target, values[k], unit);
            if (node is null || node.Span.Line <= 0)
            {
                skipped.Add($"{parameters[k].Name}: {reason ?? "set on the command line, not in the deck"}");
                continue;
            }

            var start = lineStarts[node.Span.Line - 1] + node.Span.Column - 1;
            var match = NumberToken().Match(text, start);
            if (!match.Success || match.Index != start)
            {
                skipped.Add($"{parameters[k].Name}: the deck's value at {node.Span} is not a plain number");
                continue;
            }

            edits.Add((start, match.Length, value.ToString("R", CultureInfo.InvariantCulture)));
        }

        var result = new StringBuilder(text);
        foreach (var (start, length, value) in edits.OrderByDescending(e => e.Start))
        {
            result.Remove(start, length).Insert(start, value);
        }

        AtomicFile.Write(target, writer => writer.Write(result.ToString()));
        return skipped;
    }

    private static (TomlNode? Node, double Value, string? Reason) Locate(TomlTableNode root, ParameterTarget target, double value, EnergyUnit unit)
    {
        switch (target)
        {
            case TemperatureTarget:
                var temperature = Table(root, "temperature");
                return temperature?.Find("kelvin") is { } kelvin
                    ? (kelvin.Value, value / EnergyUnits.KTFromKelvin(1.0, unit), null)
                    : (temperature?.Find("kT")?.Value, value, null);
            case DeckParameterTarget parameter:
                return (Table(root, "parameters")?.Find(parameter.Key)?.Value, value, null);
            case StateRateTarget rate:
                return (PerState(Table(root, rate.IsLoss ? "losses" : "pumping"), rate.State, rate.Key), value, $"the deck gives no number for {rate.Key} (write it in by_state or values)");
            case InitialTarget initial:
                return (PerState(Table(root, "initial"), initial.State, initial.Key), value, "the deck gives P(0) by state name; write [initial] values = [...] to have them written back");
            default:
                return (null, value, "a measured rate lives in the rate CSV, not in the deck");
        }
    }

    private static TomlNode? PerState(TomlTableNode? table, int state, string key)
    {
        if (table?.Find("values")?.Value is TomlArrayNode array)
        {
            return state < array.Items.Count ? array.Items[state] : null;
        }

        var label = key[(key.IndexOf('.', StringComparison.Ordinal) + 1)..];
        return (table?.Find("by_state")?.Value as TomlTableNode)?.Find(label)?.Value;
    }

    private static TomlTableNode? Table(TomlTableNode root, string name) => root.Find(name)?.Value as TomlTableNode;

    private static int[] LineStarts(string text)
    {
        var starts = new List<int> { 0 };
        for (var i = 0; i < text.Length; i++)
        {
            if (text[i] == '\n')
            {
                starts.Add(i + 1);
            }
        }

        return [.. starts];
    }

    [GeneratedRegex(@"[+-]?(inf|nan|[0-9][0-9_]*(\.[0-9_]+)?([eE][+-]?[0-9_]+)?)")]
    private static partial Regex NumberToken();
}
