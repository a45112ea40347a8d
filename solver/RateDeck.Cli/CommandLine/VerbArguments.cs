using System.CommandLine;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// A verb's command line after parsing: the typed value of every option it declared, and the
/// deck, overrides and output switches that every deck verb shares (<see cref="DeckOptions"/>).
/// </summary>
public sealed class VerbArguments
{
    private readonly ParseResult _parse;

    internal VerbArguments(ParseResult parse) => _parse = parse;

    /// <summary>The deck file.</summary>
    public string DeckPath => _parse.GetRequiredValue<string>(DeckOptions.Deck);

    /// <summary>The <c>--set key=value</c> overrides, in order.</summary>
    public IReadOnlyList<string> Overrides => _parse.GetValue<string[]>(DeckOptions.Set) ?? [];

    /// <summary>True with <c>--json</c>: one JSON object on stdout.</summary>
    public bool Json => _parse.GetValue<bool>(DeckOptions.Json);

    /// <summary>True with <c>--quiet</c>: one summary line on stdout.</summary>
    public bool Quiet => _parse.GetValue<bool>(DeckOptions.Quiet);

    /// <summary>The provider asked for with <c>--linalg</c> (auto, native or managed), or null when absent.</summary>
    public string? LinearAlgebra => _parse.GetValue<string?>(DeckOptions.Linalg);

    /// <summary>The value of <paramref name="option"/> (its default when absent).</summary>
    public T? Value<T>(Option<T> option) => _parse.GetValue(option);

    /// <summary>The value of <paramref name="argument"/>.</summary>
    public T? Value<T>(Argument<T> argument) => _parse.GetValue(argument);

    /// <summary>True when <paramref name="option"/> was given.</summary>
    public bool Has(Option<bool> option) => _parse.GetValue(option);
}
