using System.CommandLine;
using System.CommandLine.Help;
using RateDeck.Cli.CommandLine;
using RateDeck.Cli.Verbs;
using RateDeck.Decks;
using RateDeck.Outputs;
using RateDeck.Text;

namespace RateDeck.Cli;

/// <summary>
/// Parses the command line (System.CommandLine: docs/cli.md says why), hands it to the verb named
/// first, and maps every failure to a plain message and a documented exit code.
/// </summary>
public static class Commands
{
    private const string _helpVerb = "help";
    private const string _versionOption = "--version";
    private const int _helpWidth = 100;

    // Response files (@FILE) are off: a deck path starting with @ is a path, not a list of arguments.
    private static readonly ParserConfiguration _parserConfiguration = new() { ResponseFileTokenReplacer = null };

    /// <summary>
    /// The whole command line as the parser declares it: the root command <c>ratedeck</c> with one
    /// subcommand per verb and <c>help</c>. Built anew on every call (the parser's symbols are not
    /// shared between threads).
    /// </summary>
    public static Command Declaration() => Root(Verbs());

    /// <summary>Runs the verb named by the first argument.</summary>
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        var verbs = Verbs();
        var root = Root(verbs);
        if (args.Length == 0)
        {
            WriteHelp(root, root, stderr);
            return ExitCodes.BadInput;
        }

        if (args[0] == CompleteWord)
        {
            return Complete(root, args[1..], stdout);
        }

        var parse = root.Parse(args, _parserConfiguration);
        var command = parse.CommandResult.Command;
        if (parse.Action is HelpAction)
        {
            WriteHelp(root, command, stdout);
            return ExitCodes.Success;
        }

        if (verbs.FirstOrDefault(v => ReferenceEquals(v.Command, command)) is not { } verb)
        {
            return RootCommand(parse, root, stdout, stderr);
        }

        if (UsageMistakes.Find(parse, args) is { } mistake)
        {
            stderr.WriteLine($"ratedeck {command.Name}: {mistake}");
            stderr.WriteLine($"usage: ratedeck {command.Name} {string.Join(" ", command.Arguments.Select(Usage))} [options]; 'ratedeck {command.Name} --help' lists them");
            return ExitCodes.BadInput;
        }

        return Execute(verb, new VerbArguments(parse), new VerbContext(stdout, stderr));
    }

    /// <summary>
    /// The first argument that asks for shell completion instead of a run: <c>ratedeck [complete]
    /// WORD... CURRENT</c> prints, one per line, what may stand in place of CURRENT (the word being
    /// typed, possibly empty) after the WORDs: verbs and an option's values, or options once CURRENT
    /// starts with '-'. The bash function in docs/cli.md calls it; when nothing is printed (a deck
    /// path, say) the shell completes file names.
    /// </summary>
    public const string CompleteWord = "[complete]";

    private static int Complete(Command root, string[] words, TextWriter stdout)
    {
        var current = words.Length > 0 ? words[^1] : "";
        var before = words.Length > 0 ? words[..^1] : [];
        // The parser completes the word at the end of the line it is given: the words before, then
        // the current one, or a trailing space when the current word is still empty.
        var line = string.Join(' ', before.Select(Quote).Append(current.Length == 0 ? "" : Quote(current)));
        var parse = root.Parse(line, _parserConfiguration);
        var offered = parse.GetCompletions(line.Length).Select(c => c.Label)
            .Where(label => label.StartsWith(current, StringComparison.Ordinal))
            .Where(label => label.StartsWith('-') == current.StartsWith('-'))
            .Where(label => label != "-?" && !label.StartsWith('/'))   // of the help option's aliases, --help and -h are offered
            .Distinct(StringComparer.Ordinal);
        foreach (var completion in offered)
        {
            stdout.WriteLine(completion);
        }

        return ExitCodes.Success;

        static string Quote(string word) => word.Contains(' ', StringComparison.Ordinal) ? $"\"{word}\"" : word;
    }

    private static string Usage(Argument argument) => argument.Arity.MinimumNumberOfValues > 0 ? argument.Name : $"[{argument.Name}]";

    private static IVerb[] Verbs() => [new CheckVerb(), new StiffnessVerb(), new RunVerb(), new SteadyVerb(), new FitVerb(), new SweepVerb(), new CollectVerb(), new InitVerb(), new ResolveVerb()];

    private static Command Root(IVerb[] verbs)
    {
        var root = new Command(ToolInfo.Name, "Solves and fits kinetic master equations dP/dt = K P + s described by TOML decks.")
        {
            new HelpOption { Action = new HelpAction { MaxWidth = _helpWidth } },
            VerbOptions.Switch(_versionOption, "print the program version"),
        };
        foreach (var verb in verbs)
        {
            root.Subcommands.Add(verb.Command);
        }

        var described = new Argument<string?>("VERB") { Description = "the verb to describe", Arity = ArgumentArity.ZeroOrOne };
        described.CompletionSources.Add([.. verbs.Select(v => v.Command.Name)]);
        root.Subcommands.Add(new Command(_helpVerb, "show the verbs, or one verb's options") { described });

        return root;
    }

    // The root itself: --version, help [VERB], or a word that is not a verb.
    private static int RootCommand(ParseResult parse, Command root, TextWriter stdout, TextWriter stderr)
    {
        var verbNames = root.Subcommands.Select(c => c.Name).ToList();
        if (parse.CommandResult.Command.Name == _helpVerb && parse.Errors.Count == 0)
        {
            var asked = parse.CommandResult.Tokens.FirstOrDefault()?.Value;
            if (asked is null)
            {
                WriteHelp(root, root, stdout);
                return ExitCodes.Success;
            }

            if (root.Subcommands.FirstOrDefault(c => c.Name == asked) is { } described)
            {
                WriteHelp(root, described, stdout);
                return ExitCodes.Success;
            }

            stderr.WriteLine($"ratedeck help: no verb '{asked}'.{Suggestions.Hint(asked, verbNames)} The verbs are {string.Join(", ", verbNames)}");
            return ExitCodes.BadInput;
        }

        if (parse.UnmatchedTokens.Count == 0 && parse.GetResult(_versionOption) is not null)
        {
            stdout.WriteLine($"{ToolInfo.Name} {ToolInfo.Version}");
            return ExitCodes.Success;
        }

        var word = parse.UnmatchedTokens.FirstOrDefault() ?? "";
        stderr.WriteLine(word.StartsWith('-')
            ? $"ratedeck: no option '{word}' before the verb. See 'ratedeck --help'."
            : $"ratedeck: no verb '{word}'.{Suggestions.Hint(word, verbNames)} The verbs are {string.Join(", ", verbNames)}");
        return ExitCodes.BadInput;
    }

    // The parser's own help for a verb (or for the root, with the exit codes after it), at a fixed
    // width so that it reads the same in a terminal, a pipe and a test.
    private static void WriteHelp(Command root, Command command, TextWriter output)
    {
        string[] args = ReferenceEquals(command, root) ? ["--help"] : [command.Name, "--help"];
        root.Parse(args, _parserConfiguration).Invoke(new InvocationConfiguration { Output = output, Error = output, EnableDefaultExceptionHandler = false, ProcessTerminationTimeout = null });
        if (ReferenceEquals(command, root))
        {
            output.WriteLine("Exit codes: 0 ok, 1 internal error, 2 bad deck or command line, 3 unsafe time step, 4 check failed,");
            output.WriteLine("5 output not written, 6 fit not converged, 7 sweep points failed or missing, 8 integrator gave up (step limit),");
            output.WriteLine("130 stopped by SIGINT, 143 by SIGTERM (docs/cli.md).");
        }
    }

    private static int Execute(IVerb verb, VerbArguments args, VerbContext context) =>
        Guard(verb.Command.Name, context.Error, () => verb.Execute(args, context));

    /// <summary>
    /// Runs <paramref name="body"/> of verb <paramref name="name"/> and turns every failure into its
    /// documented exit code and one plain message on <paramref name="stderr"/>; the same for a
    /// verb on the command line and for each point of a sweep.
    /// </summary>
    internal static int Guard(string name, TextWriter stderr, Func<int> body)
    {
        try
        {
            return body();
        }
        catch (UsageException e)
        {
            stderr.WriteLine($"ratedeck {name}: {e.Message}");
            return ExitCodes.BadInput;
        }
        catch (Pipeline.UnsafeStepException e)
        {
            stderr.WriteLine($"ratedeck {name}: {e.Message}");
            return ExitCodes.UnsafeTimeStep;
        }
        catch (DeckException e)
        {
            stderr.WriteLine(e.Message);
            return ExitCodes.BadInput;
        }
        catch (LinearAlgebra.DenseStorageException e)
        {
            stderr.WriteLine($"ratedeck {name}: {e.Message}");
            return ExitCodes.BadInput;
        }
        catch (Propagation.IntegrationGaveUpException e)
        {
            stderr.WriteLine($"ratedeck {name}: {e.Message}; no result was written: fewer output or data times, or an earlier last one, need fewer steps");
            return ExitCodes.IntegrationGaveUp;
        }
        catch (IOException e)
        {
            stderr.WriteLine($"ratedeck {name}: could not write output: {e.Message}");
            return ExitCodes.OutputFailed;
        }
        catch (UnauthorizedAccessException e)
        {
            stderr.WriteLine($"ratedeck {name}: could not write output: {e.Message}");
            return ExitCodes.OutputFailed;
        }
#pragma warning disable CA1031 // The last line of defence: a bug must still give one plain line, not a stack trace.
        catch (Exception e)
#pragma warning restore CA1031
        {
            stderr.WriteLine($"ratedeck {name}: internal error ({e.GetType().Name}: {e.Message}); please report it with the deck. Set RATEDECK_TRACE=1 for details.");
            if (Environment.GetEnvironmentVariable("RATEDECK_TRACE") == "1")
            {
                stderr.WriteLine(e);
            }

            return ExitCodes.InternalError;
        }
    }
}
