using RateDeck.Cli.CommandLine;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck check DECK</c>: assembles the rate matrix and proves it sane: conservation,
/// positivity, detailed balance, closed classes, null space and the equilibrium against the null
/// vector. For a deck with a Lagrangian it also shows what the mechanics stage derived per state
/// and writes it to <c>mechanics.csv</c> in the output folder. Exit 0 when every check passes, 4
/// when one fails.
/// </summary>
public sealed class CheckVerb : IVerb
{
    /// <inheritdoc />
    public VerbSyntax Syntax { get; } = new("check", "assemble the rate matrix and check it: conservation, positivity, detailed balance, classes, null space",
    [
        new("--out", "DIR", "output folder for mechanics.csv of a deck with a Lagrangian (default ratedeck-out/<deck name>)"),
    ]);

    /// <inheritdoc />
    public int Execute(ParsedArguments args, VerbContext context)
    {
        var loaded = VerbSupport.Load(args);
        var report = MatrixChecks.Check(loaded.Rates, loaded.Algebra);
        var labels = loaded.States.Labels;
        var mechanics = loaded.Mechanics is { } derived ? new MechanicsTable(loaded, derived) : null;
        var mechanicsFile = mechanics?.WriteCsv(VerbSupport.OutputFolder(args, loaded.Deck));
        if (args.Has("--json"))
        {
            JsonSummary.Write(context.Out, new
            {
                ok = report.Ok,
                tool_version = ToolInfo.Version,
                deck = loaded.Deck.SourcePath,
                deck_sha256 = loaded.Deck.Sha256,
                overrides = loaded.Deck.Overrides,
                linear_algebra = loaded.Algebra.Name,
                states = labels.Length,
                conservation_error = report.ConservationError,
                negative_off_diagonals = report.NegativeOffDiagonalCount,
                detailed_balance_violation = DetailedBalanceViolation(report.Balance),
                detailed_balance_holds = report.Balance.Holds,
                one_way_edges = report.Balance.OneWayCount,
                worst_cycle = report.Balance.WorstCycle,
                closed_classes = report.Classes.Closed.Select(c => c.Labels).ToArray(),
                transient_states = report.Classes.TransientLabels,
                null_space_dimension = report.Spectrum?.NullDimension,
                expected_null_space_dimension = report.ExpectedNullDimension,
                zero_tolerance = report.Spectrum?.ZeroTolerance,
                spectrum_path = report.Spectrum?.PathReason,
                equilibrium_agreement = report.EquilibriumAgreement.Select(a => a.MaxDifference).ToArray(),
                checks = report.Checks.Select(c => new { name = c.Name, passed = c.Passed, detail = c.Detail }).ToArray(),
                mechanics = mechanics?.Json(mechanicsFile!),
            });
            context.Out.WriteLine();
        }
        else
        {
            WriteSummary(context.Out, loaded, report, mechanics, mechanicsFile);
        }

        return report.Ok ? ExitCodes.Success : ExitCodes.CheckFailed;
    }

    /// <summary>The pairwise violation for completed matrices, the worst cycle's for matrices taken as given.</summary>
    private static double DetailedBalanceViolation(BalanceReport balance) =>
        balance.Origin == Rates.BalanceOrigin.TakenAsGiven && balance.CycleViolation is { } cycle ? cycle : balance.PairViolation;

    private static void WriteSummary(TextWriter output, Pipeline.LoadedDeck loaded, CheckReport report, MechanicsTable? mechanics, string? mechanicsFile)
    {
        VerbSupport.WriteDeckLine(output, loaded);
        if (report.Spectrum is { } spectrum)
        {
            output.WriteLine($"spectrum     {spectrum.PathReason}");
        }

        output.WriteLine();
        foreach (var check in report.Checks)
        {
            output.WriteLine($"  {(check.Passed ? "ok  " : "FAIL")}  {check.Name,-22} {check.Detail}");
        }

        output.WriteLine();
        var classes = report.Classes;
        output.WriteLine($"closed classes: {classes.Closed.Count}");
        for (var k = 0; k < classes.Closed.Count; k++)
        {
            var closed = classes.Closed[k];
            var loss = closed.HasLoss ? ", with loss" : "";
            output.WriteLine($"  class {k + 1} ({closed.Labels.Length} states{loss}): {Format.Labels(closed.Labels)}");
        }

        if (classes.TransientLabels.Length > 0)
        {
            output.WriteLine($"  transient ({classes.TransientLabels.Length}): {Format.Labels(classes.TransientLabels)}");
        }

        if (mechanics is not null)
        {
            output.WriteLine();
            mechanics.WriteSummary(output, mechanicsFile!);
        }

        output.WriteLine(report.Ok ? "result: every check passed" : $"result: {report.Failures.Count} check(s) failed");
    }
}
