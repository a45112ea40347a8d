using RateDeck.Cli.CommandLine;
using RateDeck.Cli.Verbs;
using RateDeck.Decks;
using RateDeck.Outputs;
using RateDeck.Text;

namespace RateDeck.Cli;

/// <summary>Dispatches the first argument to a verb and maps every failure to a plain message and an exit code.</summary>
public static class Commands
{
    private static readonly IVerb[] _verbs = [new CheckVerb(), new StiffnessVerb(), new RunVerb(), new SteadyVerb(), new FitVerb()];

    /// <summary>Runs the verb named by the first argument.</summary>
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        if (args.Length == 0 || args[0] is "help" or "--help" or "-h")
        {
            return Help(args.Skip(1).FirstOrDefault(), stdout, stderr, args.Length == 0 ? ExitCodes.BadInput : ExitCodes.Success);
        }

        if (args[0] == "--version")
        {
            stdout.WriteLine($"ratedeck {ToolInfo.Version}");
            return ExitCodes.Success;
        }

        var verb = _verbs.FirstOrDefault(v => v.Syntax.Verb == args[0]);
        if (verb is null)
        {
            stderr.WriteLine($"ratedeck: no verb '{args[0]}'.{Suggestions.Hint(args[0], _verbs.Select(v => v.Syntax.Verb))} The verbs are {string.Join(", ", _verbs.Select(v => v.Syntax.Verb))}");
            return ExitCodes.BadInput;
        }

        try
        {
            var parsed = verb.Syntax.Parse(args[1..]);
            return verb.Execute(parsed, new VerbContext(stdout, stderr));
        }
        catch (UsageException e)
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: {e.Message}");
            return ExitCodes.BadInput;
        }
        catch (Pipeline.UnsafeStepException e)
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: {e.Message}");
            return ExitCodes.UnsafeTimeStep;
        }
        catch (DeckException e)
        {
            stderr.WriteLine(e.Message);
            return ExitCodes.BadInput;
        }
        catch (LinearAlgebra.DenseStorageException e)
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: {e.Message}");
            return ExitCodes.BadInput;
        }
        catch (IOException e)
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: could not write output: {e.Message}");
            return ExitCodes.OutputFailed;
        }
        catch (UnauthorizedAccessException e)
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: could not write output: {e.Message}");
            return ExitCodes.OutputFailed;
        }
#pragma warning disable CA1031 // The last line of defence: a bug must still give one plain line, not a stack trace.
        catch (Exception e)
#pragma warning restore CA1031
        {
            stderr.WriteLine($"ratedeck {verb.Syntax.Verb}: internal error ({e.GetType().Name}: {e.Message}); please report it with the deck. Set RATEDECK_TRACE=1 for details.");
            if (Environment.GetEnvironmentVariable("RATEDECK_TRACE") == "1")
            {
                stderr.WriteLine(e);
            }

            return ExitCodes.InternalError;
        }
    }

    private static int Help(string? verbName, TextWriter stdout, TextWriter stderr, int exitCode)
    {
        var writer = exitCode == ExitCodes.Success ? stdout : stderr;
        var verb = _verbs.FirstOrDefault(v => v.Syntax.Verb == verbName);
        if (verb is null)
        {
            writer.WriteLine("usage: ratedeck VERB DECK [options]");
            writer.WriteLine();
            foreach (var v in _verbs)
            {
                writer.WriteLine($"  {v.Syntax.Verb,-10} {v.Syntax.Summary}");
            }

            writer.WriteLine();
            writer.WriteLine("'ratedeck help VERB' lists a verb's options; exit codes: 0 ok, 1 internal error, 2 bad input,");
            writer.WriteLine("3 unsafe time step, 4 check failed, 5 output not written, 6 fit not converged (docs/cli.md).");
            return exitCode;
        }

        writer.WriteLine($"usage: ratedeck {verb.Syntax.Verb} DECK [options]");
        writer.WriteLine($"  {verb.Syntax.Summary}");
        writer.WriteLine();
        foreach (var option in VerbSyntax.Common.Concat(verb.Syntax.Options))
        {
            var left = option.ValueName is null ? option.Name : $"{option.Name} {option.ValueName}";
            writer.WriteLine($"  {left,-28} {option.Help}");
        }

        return exitCode;
    }
}
