using System.CommandLine;
using System.Reflection;
using System.Text.RegularExpressions;
using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// docs/cli.md and the parser cannot drift apart (issue 9 §9): every verb the parser declares has a
/// section `## `ratedeck VERB`` whose option table lists every option the verb declares (or the
/// table of options every deck verb takes lists it), every documented option exists, and every exit
/// code in ExitCodes is in the exit-code table and the other way round. The verbs and options are
/// read from the parser's own declarations, so options added later are checked too.
/// </summary>
public sealed partial class CliDocumentationTests
{
    private const string _sharedHeading = "## Options every deck verb takes";

    private static readonly Lazy<string[]> _page = new(() => File.ReadAllLines(Path.Combine(CliRunner.RepositoryRoot(), "docs", "cli.md")));

    [Theory]
    [MemberData(nameof(CliRunner.Verbs), MemberType = typeof(CliRunner))]
    public void EveryOptionAVerbDeclares_IsDocumentedUnderThatVerb(string verb)
    {
        var declared = Declared(verb);
        var documented = DocumentedOptions(Section($"## `ratedeck {verb}`")).Union(SharedOptionsOf(verb));

        Assert.Empty(declared.Except(documented));
    }

    [Theory]
    [MemberData(nameof(CliRunner.Verbs), MemberType = typeof(CliRunner))]
    public void EveryOptionDocumentedUnderAVerb_IsDeclaredByIt(string verb)
    {
        Assert.Empty(DocumentedOptions(Section($"## `ratedeck {verb}`")).Except(Declared(verb)));
    }

    [Fact]
    public void EveryOptionDocumentedForEveryDeckVerb_IsDeclaredByEach()
    {
        var shared = DocumentedOptions(Section(_sharedHeading));
        var deckVerbs = Commands.Declaration().Subcommands.Where(RunsTheEngine).ToList();

        Assert.NotEmpty(shared);
        Assert.All(deckVerbs, verb => Assert.Empty(shared.Except(Declared(verb.Name))));
    }

    [Fact]
    public void EveryVerbSection_NamesAVerbTheParserDeclares()
    {
        var sections = _page.Value.Select(line => VerbHeading().Match(line)).Where(m => m.Success).Select(m => m.Groups[1].Value);

        Assert.Equal(Commands.Declaration().Subcommands.Select(c => c.Name).Order(), sections.Order());
    }

    [Fact]
    public void ExitCodeTable_ListsExactlyTheCodesOfExitCodes()
    {
        var codes = typeof(ExitCodes).GetFields(BindingFlags.Public | BindingFlags.Static).Where(f => f.IsLiteral).Select(f => (int)f.GetRawConstantValue()!);
        var documented = Section("## Exit codes").Select(line => ExitCodeRow().Match(line)).Where(m => m.Success).Select(m => int.Parse(m.Groups[1].Value, System.Globalization.CultureInfo.InvariantCulture));

        Assert.Equal(codes.Order(), documented.Order());
    }

    // The verbs that run the engine on a deck choose a linear-algebra provider; they take the shared options.
    private static bool RunsTheEngine(Command verb) => verb.Options.Any(o => o.Name == "--linalg");

    private static IEnumerable<string> SharedOptionsOf(string verb) =>
        RunsTheEngine(Commands.Declaration().Subcommands.Single(c => c.Name == verb)) ? DocumentedOptions(Section(_sharedHeading)) : [];

    // The options of a verb as the parser declares them, without the help option every command has.
    private static string[] Declared(string verb) =>
        [.. Commands.Declaration().Subcommands.Single(c => c.Name == verb).Options.Where(o => !o.Hidden && o.Name != "--help").Select(o => o.Name)];

    // The lines from a heading to the next heading of the same or a higher level (subsections included).
    private static string[] Section(string heading)
    {
        var lines = _page.Value;
        var start = Array.FindIndex(lines, line => line == heading || line.StartsWith(heading + " ", StringComparison.Ordinal));
        Assert.True(start >= 0, $"docs/cli.md has no section {heading}");
        var end = Array.FindIndex(lines, start + 1, line => line.StartsWith("## ", StringComparison.Ordinal));
        return lines[(start + 1)..(end < 0 ? lines.Length : end)];
    }

    // The first cell of each option row of a table: | `--out DIR` | ... |
    private static string[] DocumentedOptions(IEnumerable<string> lines) =>
        [.. lines.Select(line => OptionRow().Match(line)).Where(m => m.Success).Select(m => m.Groups[1].Value)];

    [GeneratedRegex(@"^\| `(--[a-z0-9-]+)")]
    private static partial Regex OptionRow();

    [GeneratedRegex(@"^## `ratedeck ([a-z-]+)`$")]
    private static partial Regex VerbHeading();

    [GeneratedRegex(@"^\| ([0-9]+) \|")]
    private static partial Regex ExitCodeRow();
}
