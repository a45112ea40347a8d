using RateDeck.Cli;
using Xunit;

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

    /// <summary>The checkout the tests were built from: the first folder above the test assembly holding RateDeck.sln.</summary>
    public static string RepositoryRoot()
    {
        for (var folder = new DirectoryInfo(AppContext.BaseDirectory); folder is not null; folder = folder.Parent)
        {
            if (File.Exists(Path.Combine(folder.FullName, "RateDeck.sln")))
            {
                return folder.FullName;
            }
        }

        throw new InvalidOperationException($"no RateDeck.sln above {AppContext.BaseDirectory}");
    }

    /// <summary>The verbs as the parser declares them, for theories over every verb.</summary>
    public static TheoryData<string> Verbs() => [.. Commands.Declaration().Subcommands.Select(c => c.Name)];
}
