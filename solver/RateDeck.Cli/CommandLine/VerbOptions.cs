using System.CommandLine;
using System.CommandLine.Parsing;
using System.Globalization;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// Builders for the options a verb declares. A switch takes no value; a valued option's text is
/// parsed here into its type, with a message that names the option, so that a mistake is a usage
/// error (exit 2) and never a guess: no value, an empty value, a value that is another option, a
/// second occurrence of a single option, or text that is not of the option's type.
/// </summary>
internal static class VerbOptions
{
    /// <summary>A switch: present or absent, it takes no value (<c>--json=no</c> is an error).</summary>
    public static Option<bool> Switch(string name, string description) =>
        new(name) { Description = description, Arity = ArgumentArity.Zero };

    /// <summary>--full-spectrum, shared by the verbs that compute the spectrum: every eigenvalue, whatever N.</summary>
    public static Option<bool> FullSpectrum() =>
        Switch("--full-spectrum", string.Create(System.Globalization.CultureInfo.InvariantCulture, $"compute every eigenvalue of K; above {Diagnostics.Spectrum.FullSpectrumStateLimit:N0} states a tridiagonal sparse deck otherwise gets the extremes only (spectral radius, slowest rates, zeros)"));

    /// <summary>
    /// An option given at most once with one value, turned into <typeparamref name="T"/> by
    /// <paramref name="parse"/>, which throws <see cref="UsageException"/> for text it refuses.
    /// </summary>
    public static Option<T> Single<T>(string name, string valueName, string description, Func<string, T> parse)
    {
        // OneOrMore so that a second occurrence reaches the parser below and is refused in our words.
        var option = new Option<T>(name) { Description = description, HelpName = valueName, Arity = ArgumentArity.OneOrMore, AllowMultipleArgumentsPerToken = false };
        option.CustomParser = result =>
        {
            if (result.Tokens.Count > 1)
            {
                result.AddError($"{name} is given {result.Tokens.Count} times ({string.Join(", ", result.Tokens.Select(t => $"'{t.Value}'"))}); give it once");
                return default;
            }

            return Value(result, result.Tokens[0].Value, name, valueName, parse);
        };
        return option;
    }

    /// <summary>An option that may be repeated, each occurrence with one value, kept in order.</summary>
    public static Option<string[]> Repeated(string name, string valueName, string description)
    {
        var option = new Option<string[]>(name) { Description = description, HelpName = valueName, Arity = ArgumentArity.OneOrMore, AllowMultipleArgumentsPerToken = false };
        option.CustomParser = result => [.. result.Tokens.Select(token => Value(result, token.Value, name, valueName, text => text))];
        return option;
    }

    /// <summary>An option taking one of a fixed set of words, each standing for a value.</summary>
    public static Option<T?> Choice<T>(string name, string description, params (string Word, T Value)[] choices) where T : struct
    {
        var words = choices.Select(c => c.Word).ToArray();
        return Completing(Single<T?>(name, string.Join('|', words), description, text =>
            choices.FirstOrDefault(c => c.Word == text.ToLowerInvariant()) is { Word: not null } match
                ? match.Value
                : throw new UsageException($"{name} takes {Alternatives(words)}, not '{text}'")), words);
    }

    /// <summary>An option taking one of a fixed set of words (any case), kept as the lower-case word.</summary>
    public static Option<string?> Word(string name, string description, params string[] words) =>
        Completing(Single<string?>(name, string.Join('|', words), description, text =>
            words.Contains(text.ToLowerInvariant()) ? text.ToLowerInvariant() : throw new UsageException($"{name} takes {Alternatives(words)}, not '{text}'")), words);

    /// <summary><paramref name="option"/>, offering <paramref name="words"/> to shell completion (and not an enum's member names).</summary>
    private static Option<T> Completing<T>(Option<T> option, string[] words)
    {
        option.CompletionSources.Clear();
        option.CompletionSources.Add(words);
        return option;
    }

    /// <summary>An option whose value is a positive finite number.</summary>
    public static Option<double?> PositiveNumber(string name, string valueName, string description) =>
        Single<double?>(name, valueName, description, text => ParsePositive(name, text));

    /// <summary>An option whose value is a whole number of at least <paramref name="minimum"/>.</summary>
    public static Option<int?> WholeNumber(string name, string valueName, string description, int minimum) =>
        Single<int?>(name, valueName, description, text =>
            int.TryParse(text, NumberStyles.None, CultureInfo.InvariantCulture, out var value) && value >= minimum
                ? value
                : throw new UsageException($"{name} takes a whole number{(minimum > 0 ? $" of {minimum} or more" : "")}, not '{text}'"));

    /// <summary>An output folder: any non-empty path.</summary>
    public static Option<string?> Folder(string description) =>
        Single<string?>("--out", "DIR", description, text => text);

    /// <summary>The explicit method, <c>euler</c> or <c>rk4</c>.</summary>
    public static Option<Decks.ExplicitMethod?> Method(string description) =>
        Choice("--method", description, ("euler", Decks.ExplicitMethod.Euler), ("rk4", Decks.ExplicitMethod.RungeKutta4));

    /// <summary><paramref name="text"/> as a positive finite number, or a usage error naming <paramref name="name"/>.</summary>
    public static double ParsePositive(string name, string text) =>
        double.TryParse(text, NumberStyles.Float, CultureInfo.InvariantCulture, out var number) && double.IsFinite(number) && number > 0
            ? number
            : throw new UsageException($"{name} takes a positive number, not '{text}'");

    /// <summary>"a, b or c".</summary>
    public static string Alternatives(IReadOnlyList<string> words) =>
        words.Count == 1 ? words[0] : $"{string.Join(", ", words.Take(words.Count - 1))} or {words[^1]}";

    // The parser hands a valued option the next word even when it is another option: `--dt --exact-only`
    // is a forgotten value, not a step named "--exact-only", so a value may not start with "--".
    private static T Value<T>(ArgumentResult result, string text, string name, string valueName, Func<string, T> parse)
    {
        if (text.Length == 0 || text.StartsWith("--", StringComparison.Ordinal))
        {
            result.AddError($"{name} needs a value ({valueName})");
            return default!;
        }

        try
        {
            return parse(text);
        }
        catch (UsageException e)
        {
            result.AddError(e.Message);
            return default!;
        }
    }
}
