using RateDeck.Text;

namespace RateDeck.Cli.CommandLine;

/// <summary>
/// What one verb accepts: its flags and valued options besides the deck and <c>--set</c>.
/// Parsing is deliberately small and strict: an unknown option is an error with a hint.
/// </summary>
public sealed record VerbSyntax(string Verb, string Summary, IReadOnlyList<OptionSpec> Options)
{
    /// <summary>Options every verb accepts.</summary>
    public static readonly IReadOnlyList<OptionSpec> Common =
    [
        new("--set", "KEY=VALUE", "override a deck parameter or key, or remove:KEY (repeatable)"),
        new("--json", null, "print one JSON object on stdout instead of the summary"),
        new("--linalg", "auto|native|managed", "linear-algebra provider (default auto, or RATEDECK_LINALG)"),
    ];

    /// <summary>Parses <paramref name="args"/> (the verb itself excluded).</summary>
    public ParsedArguments Parse(IReadOnlyList<string> args)
    {
        var known = Common.Concat(Options).ToDictionary(o => o.Name);
        string? deck = null;
        var overrides = new List<string>();
        var values = new Dictionary<string, string>();
        var flags = new HashSet<string>();
        for (var k = 0; k < args.Count; k++)
        {
            var arg = args[k];
            if (!arg.StartsWith("--", StringComparison.Ordinal))
            {
                deck = deck is null ? arg : throw new UsageException($"{Verb} takes one deck; '{deck}' and '{arg}' were given");
                continue;
            }

            var (name, inline) = SplitInlineValue(arg);
            if (!known.TryGetValue(name, out var option))
            {
                throw new UsageException($"{Verb} has no option '{name}'.{Suggestions.Hint(name, known.Keys)} See 'ratedeck help {Verb}'.");
            }

            if (option.ValueName is null)
            {
                flags.Add(name);
                continue;
            }

            // A value is never taken from the next word when that word is an option: `--dt --exact-only`
            // is a forgotten value, not a step named "--exact-only".
            var value = inline ?? (k + 1 < args.Count && !known.ContainsKey(SplitInlineValue(args[k + 1]).Name) ? args[++k] : null);
            if (string.IsNullOrEmpty(value))
            {
                throw new UsageException($"{name} needs a value ({option.ValueName})");
            }

            if (name == "--set")
            {
                overrides.Add(value);
            }
            else if (!values.TryAdd(name, value))
            {
                throw new UsageException($"{name} is given twice ('{values[name]}' and '{value}'); give it once");
            }
        }

        return new ParsedArguments(deck ?? throw new UsageException($"{Verb} needs a deck file: ratedeck {Verb} DECK"), overrides, values, flags);
    }

    private static (string Name, string? Value) SplitInlineValue(string arg)
    {
        var equals = arg.IndexOf('=', StringComparison.Ordinal);
        return equals < 0 ? (arg, null) : (arg[..equals], arg[(equals + 1)..]);
    }
}

/// <summary>An option: its name, the placeholder of its value (null for a flag) and its help text.</summary>
public sealed record OptionSpec(string Name, string? ValueName, string Help);
