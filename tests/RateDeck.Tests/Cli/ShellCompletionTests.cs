using System.Diagnostics;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// The bash completion function docs/cli.md gives ("Shell completion"), sourced as a user would
/// and called by bash the way Tab calls it (COMP_WORDS, COMP_CWORD), against the program (issue 9 §2).
/// </summary>
public sealed class ShellCompletionTests
{
    [Trait("Through", "program")]
    [Theory]
    [InlineData("ratedeck ch", "check")]
    [InlineData("ratedeck s", "steady stiffness sweep")]
    [InlineData("ratedeck run deck.toml --linalg ", "auto managed native")]
    [InlineData("ratedeck run deck.toml --linalg n", "native")]
    [InlineData("ratedeck stiffness deck.toml --method ", "euler rk4")]
    [InlineData("ratedeck help fi", "fit")]
    [InlineData("ratedeck sweep deck.toml --j", "--jobs --json")]
    [InlineData("ratedeck run ", "")]
    [InlineData("ratedeck run deck.toml --out ", "")]
    public void Tab_OffersVerbsOptionsAndValues_AndLeavesFileNamesToTheShell(string line, string expected)
    {
        Assert.Equal(expected.Split(' ', StringSplitOptions.RemoveEmptyEntries).Order(StringComparer.Ordinal), Complete(line).Order(StringComparer.Ordinal));
    }

    [Trait("Through", "program")]
    [Fact]
    public void Tab_AfterEveryVerb_OffersItsHelpOption()
    {
        foreach (var verb in CliRunner.Verbs())
        {
            Assert.Contains("--help", Complete($"ratedeck {verb[0]} --he"));
        }
    }

    /// <summary>What the documented function puts in COMPREPLY for <paramref name="line"/>, the cursor at its end.</summary>
    private static string[] Complete(string line)
    {
        var words = line.Split(' ');
        using var folder = new TempFolder();
        var script = folder.File("complete.sh");
        File.WriteAllText(script, $$"""
            ratedeck() { {{CliRunner.ShellCommand()}} "$@"; }
            {{DocumentedFunction()}}
            COMP_WORDS=({{string.Join(' ', words.Select(w => $"'{w}'"))}})
            COMP_CWORD={{words.Length - 1}}
            _ratedeck
            printf '%s\n' "${COMPREPLY[@]}"
            """.Replace("\r\n", "\n", StringComparison.Ordinal));
        var info = new ProcessStartInfo("bash", [script]) { RedirectStandardOutput = true, RedirectStandardError = true };
        using var bash = Process.Start(info)!;
        var stdout = bash.StandardOutput.ReadToEndAsync();
        var stderr = bash.StandardError.ReadToEnd();
        bash.WaitForExit();
        Assert.True(bash.ExitCode == 0, stderr);
        return stdout.Result.Split('\n', StringSplitOptions.RemoveEmptyEntries);
    }

    /// <summary>The bash block of docs/cli.md's "Shell completion" section, as a user copies it.</summary>
    private static string DocumentedFunction()
    {
        var text = File.ReadAllText(Path.Combine(CliRunner.RepositoryRoot(), "docs", "cli.md"));
        var section = text[text.IndexOf("## Shell completion", StringComparison.Ordinal)..];
        var start = section.IndexOf("```bash\n", StringComparison.Ordinal) + "```bash\n".Length;
        return section[start..section.IndexOf("```", start, StringComparison.Ordinal)];
    }
}
