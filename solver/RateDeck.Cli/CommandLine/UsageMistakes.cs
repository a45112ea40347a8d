using System.CommandLine;
using System.CommandLine.Parsing;
using RateDeck.Text;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// The first mistake on a verb's command line, said in the verb's own words: a switch given a
/// value, an option the verb does not have (with a hint), a word too many or a missing argument,
/// <c>--json</c> with <c>--quiet</c>, or what an option's own parser refused.
/// </summary>
internal static class UsageMistakes
{
    /// <summary>The mistake in <paramref name="parse"/> of <paramref name="args"/>, or null when the command line is sound.</summary>
    public static string? Find(ParseResult parse, IReadOnlyList<string> args)
    {
        var command = parse.CommandResult.Command;
        var options = command.Options.Where(o => !o.Hidden).ToList();
        var names = options.SelectMany(o => o.Aliases.Prepend(o.Name)).ToList();
        foreach (var arg in args.TakeWhile(a => a != "--"))
        {
            var equals = arg.IndexOf('=', StringComparison.Ordinal);
            if (arg.StartsWith('-') && equals > 0 && options.FirstOrDefault(o => o.Name == arg[..equals]) is { Arity.MaximumNumberOfValues: 0 } flag)
            {
                return $"{flag.Name} is a switch and takes no value ('{arg}'): give {flag.Name} alone, or leave it out";
            }
        }

        var placed = new HashSet<Token>(parse.CommandResult.Children.OfType<OptionResult>().SelectMany(r => r.Tokens), ReferenceEqualityComparer.Instance);
        var unknown = parse.Tokens
            .TakeWhile(t => t.Type != TokenType.DoubleDash)
            .FirstOrDefault(t => t.Type == TokenType.Argument && t.Value.Length > 1 && t.Value[0] == '-' && !placed.Contains(t));
        if (unknown is not null)
        {
            var name = unknown.Value.Split('=')[0];
            return $"no option '{name}'.{Suggestions.Hint(name, names)}";
        }

        if (parse.UnmatchedTokens.Count > 0)
        {
            var given = command.Arguments.Select(a => parse.GetResult(a)).OfType<ArgumentResult>().SelectMany(r => r.Tokens).Select(t => $"'{t.Value}'");
            var what = command.Arguments.Count == 1 ? $"one {command.Arguments[0].Name}" : "no more words";
            return $"takes {what}; {string.Join(" and ", given.Concat(parse.UnmatchedTokens.Select(t => $"'{t}'")))} were given";
        }

        if (parse.CommandResult.Children.OfType<OptionResult>().FirstOrDefault(r => r.Tokens.Count == 0 && r.Option.Arity.MinimumNumberOfValues > 0) is { } empty)
        {
            return $"{empty.Option.Name} needs a value ({empty.Option.HelpName})";
        }

        if (command.Arguments.FirstOrDefault(a => a.Arity.MinimumNumberOfValues > 0 && parse.GetResult(a) is not { Tokens.Count: > 0 }) is { } missing)
        {
            return $"needs {missing.Description}";
        }

        if (options.Any(o => o.Name == DeckOptions.Json) && parse.GetValue<bool>(DeckOptions.Json) && parse.GetValue<bool>(DeckOptions.Quiet))
        {
            return $"{DeckOptions.Json} and {DeckOptions.Quiet} ask for two different outputs: give one of them";
        }

        return parse.Errors.Count > 0 ? parse.Errors[0].Message : null;
    }
}
