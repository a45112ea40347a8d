using RateDeck.Cli;

namespace RateDeck.Tests.Cli;

/// <summary>Runs the <c>ratedeck</c> command in-process and captures what it prints.</summary>
internal static class CliRunner
{
    public static (int ExitCode, string Out, string Error) Run(params string[] args)
    {
        using var stdout = new StringWriter();
        using var stderr = new StringWriter();
        var code = Commands.Run(args, stdout, stderr);
        return (code, stdout.ToString(), stderr.ToString());
    }

    /// <summary>The demo deck copied beside the test assembly.</summary>
    public static string DemoDeck(string name) => Path.Combine(AppContext.BaseDirectory, "decks", name);
}
