using System.CommandLine;
using RateDeck.Cli.CommandLine;

namespace RateDeck.Cli.Verbs;

/// <summary>One command-line verb.</summary>
public interface IVerb
{
    /// <summary>The verb's name, one-line summary, arguments and options, as the parser and the help see them.</summary>
    Command Command { get; }

    /// <summary>Runs the verb and returns an exit code from <see cref="ExitCodes"/>.</summary>
    int Execute(VerbArguments args, VerbContext context);
}

/// <summary>Where a verb writes: the summary on stdout, diagnostics and progress on stderr.</summary>
public sealed record VerbContext(TextWriter Out, TextWriter Error);
