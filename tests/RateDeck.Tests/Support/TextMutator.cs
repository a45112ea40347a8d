using System.Text;
using System.Text.RegularExpressions;

namespace RateDeck.Tests.Support;

/// <summary>
/// Mutates a deck or CSV text the way a hurried user, a broken editor or a damaged disk would:
/// values swapped for extreme or wrong ones, keys misspelt, lines dropped, repeated or swapped,
/// stray characters and invalid bytes, the file cut short. Every choice comes from the
/// <see cref="Random"/> given, so a seed reproduces a case exactly.
/// </summary>
internal sealed partial class TextMutator(Random random)
{
    /// <summary>Values that sit on or beyond some limit: zero, signs, overflow, underflow, NaN, wrong kinds.</summary>
    private static readonly string[] _numbers =
    [
        "0", "-0", "-1", "1", "2", "0.5", "1e308", "-1e308", "1e-308", "5e-324", "1e-300", "1e300", "nan", "inf", "-inf", "+inf",
        "1e999", "99999999999999999999", "9223372036854775808", "-2147483649", "1_000", "0x10", "1.", ".5", "1e", "--1", "\"3\"",
        "[]", "[1, 2]", "true", "{ }", "1979-05-27", "3.0e-16", "1e6", "1e-12",
    ];

    /// <summary>String values a deck key might be given by mistake.</summary>
    private static readonly string[] _strings =
    [
        "", " ", "auto", "log", "linear", "none", "eV", "K", "toward_smaller", "toward_larger", "kernel", "one_way", "full",
        "x", "y", "q", "v", "kT", "s1", "k1", "ground", "x^1e308", "exp(1e308*x)", "1/0", "0/0", "log(0)", "sqrt(-1)", "x/(x-x)",
        "((((x))))", "max(x)", "min()", "x +", "abs(v)^0.5", "0.5*v^2 - q^2", "1e308*1e308", "-x", "nan", "rates.csv",
        "/dev/null", "/dev/zero", ".", "missing.csv", "a\\u0000b", "\\uD800", "é", "\\\\", "x,y", "2e3\\u0000",
    ];

    /// <summary>Characters that break TOML, CSV or expression syntax in different ways.</summary>
    private const string _strayCharacters = "[]{}\"'=#,.\n\t-+eE0123456789 \\x_^*/()é\u00a0\u0000\u0001";

    /// <summary>The mutated text as UTF-8 bytes (occasionally made invalid), and what was done.</summary>
    public (byte[] Bytes, string Description) Mutate(string text)
    {
        var steps = new List<string>();
        var count = 1 + random.Next(3);
        for (var k = 0; k < count; k++)
        {
            text = MutateOnce(text, steps);
        }

        var bytes = Encoding.UTF8.GetBytes(text);
        if (random.Next(40) == 0 && bytes.Length > 0)
        {
            var at = random.Next(bytes.Length);
            bytes[at] = (byte)(0x80 + random.Next(0x80));
            steps.Add($"byte {at} set to 0x{bytes[at]:X2}");
        }

        return (bytes, string.Join("; ", steps));
    }

    private string MutateOnce(string text, List<string> steps)
    {
        switch (random.Next(10))
        {
            case 0:
            case 1:
                return ReplaceMatch(text, NumberPattern(), _numbers, "number", steps);
            case 2:
                return ReplaceMatch(text, StringPattern(), _strings.Select(s => $"\"{s}\"").ToArray(), "string", steps);
            case 3:
                return ReplaceMatch(text, KeyPattern(), [.. KeyPattern().Matches(text).Select(m => m.Value), "", "x", "count", "kind", "csv"], "key", steps, misspell: true);
            case 4:
                return EditLines(text, steps);
            case 5:
                {
                    var at = random.Next(text.Length + 1);
                    var inserted = _strayCharacters[random.Next(_strayCharacters.Length)];
                    steps.Add($"inserted U+{(int)inserted:X4} at {at}");
                    return text.Insert(at, inserted.ToString());
                }

            case 6:
                {
                    var at = random.Next(text.Length + 1);
                    var length = Math.Min(text.Length - at, 1 + random.Next(20));
                    steps.Add($"deleted {length} characters at {at}");
                    return text.Remove(at, length);
                }

            case 7:
                {
                    var at = random.Next(text.Length + 1);
                    steps.Add($"cut at {at}");
                    return text[..at];
                }

            case 8:
                return ReplaceMatch(text, NumberPattern(), [.. NumberPattern().Matches(text).Select(m => ScaleDigits(m.Value))], "digits", steps);
            default:
                {
                    // A line copied to another place: a repeated key, a table header out of place, a second data row.
                    var lines = text.Split('\n').ToList();
                    var line = lines[random.Next(lines.Count)];
                    var at = random.Next(lines.Count + 1);
                    lines.Insert(at, line);
                    steps.Add($"line '{Shorten(line)}' copied to line {at + 1}");
                    return string.Join('\n', lines);
                }
        }
    }

    private string ReplaceMatch(string text, Regex pattern, string[] choices, string what, List<string> steps, bool misspell = false)
    {
        var matches = pattern.Matches(text);
        if (matches.Count == 0 || choices.Length == 0)
        {
            return text;
        }

        var match = matches[random.Next(matches.Count)];
        var replacement = misspell && random.Next(2) == 0 ? Misspell(match.Value) : choices[random.Next(choices.Length)];
        steps.Add($"{what} '{Shorten(match.Value)}' at {match.Index} -> '{Shorten(replacement)}'");
        return string.Concat(text.AsSpan(0, match.Index), replacement, text.AsSpan(match.Index + match.Length));
    }

    private string EditLines(string text, List<string> steps)
    {
        var lines = text.Split('\n').ToList();
        var a = random.Next(lines.Count);
        var b = random.Next(lines.Count);
        if (random.Next(2) == 0)
        {
            steps.Add($"line {a + 1} deleted");
            lines.RemoveAt(a);
        }
        else
        {
            steps.Add($"lines {a + 1} and {b + 1} swapped");
            (lines[a], lines[b]) = (lines[b], lines[a]);
        }

        return string.Join('\n', lines);
    }

    /// <summary>A number with a digit added or dropped: 48 becomes 448 or 4, as a slip of the finger would.</summary>
    private string ScaleDigits(string number)
    {
        var at = random.Next(number.Length + 1);
        return random.Next(2) == 0 || number.Length == 1
            ? number.Insert(at, random.Next(10).ToString(System.Globalization.CultureInfo.InvariantCulture))
            : number.Remove(Math.Min(at, number.Length - 1), 1);
    }

    private string Misspell(string word)
    {
        if (word.Length == 0)
        {
            return "x";
        }

        var at = random.Next(word.Length);
        return random.Next(3) switch
        {
            0 => word.Remove(at, 1),
            1 => word.Insert(at, word[at].ToString()),
            _ => string.Concat(word.AsSpan(0, at), char.ToUpperInvariant(word[at]).ToString(), word.AsSpan(at + 1)),
        };
    }

    private static string Shorten(string text) => (text.Length > 40 ? text[..40] + "..." : text).Replace("\n", "\\n", StringComparison.Ordinal);

    [GeneratedRegex(@"[-+]?\d[\d_]*(\.\d*)?([eE][-+]?\d+)?")]
    private static partial Regex NumberPattern();

    [GeneratedRegex("\"[^\"\n]*\"")]
    private static partial Regex StringPattern();

    [GeneratedRegex(@"(?m)^[A-Za-z_][A-Za-z0-9_.]*(?=\s*=)|(?<=\[)[A-Za-z_][A-Za-z0-9_.]*(?=\])")]
    private static partial Regex KeyPattern();
}
