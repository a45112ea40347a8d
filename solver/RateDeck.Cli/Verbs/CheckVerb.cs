using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
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
    // The options of check, declared once here.
    private readonly Option<string?> _out = VerbOptions.Folder("output folder for mechanics.csv of a deck with a Lagrangian (default ratedeck-out/<deck name>)");
    private readonly Option<bool> _fullSpectrum = VerbOptions.FullSpectrum();

    /// <summary>Declares the verb and its options.</summary>
    public CheckVerb() => Command = DeckOptions.Command("check", "assemble the rate matrix and check it: conservation, positivity, detailed balance, classes, null space", _out, _fullSpectrum);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var loaded = VerbSupport.Load(args);
        var report = new DeckRun(loaded, new RunOptions { FullSpectrum = args.Has(_fullSpectrum) }).Check;
        var mechanics = loaded.Mechanics is { } derived ? new MechanicsTable(loaded, derived) : null;
        var mechanicsFile = mechanics?.WriteCsv(VerbSupport.OutputFolder(args.Value(_out), loaded.Deck));
        if (args.Json)
        {
            var fields = VerbSupport.JsonFields(loaded);
            fields["ok"] = report.Ok;
            fields["conservation_error"] = report.ConservationError;
            fields["negative_off_diagonals"] = report.NegativeOffDiagonalCount;
            fields["detailed_balance_violation"] = DetailedBalanceViolation(report.Balance);
            fields["detailed_balance_holds"] = report.Balance.Holds;
            fields["one_way_edges"] = report.Balance.OneWayCount;
            fields["worst_cycle"] = report.Balance.WorstCycle;
            fields["closed_classes"] = report.Classes.Closed.Select(c => c.Labels).ToArray();
            fields["transient_states"] = report.Classes.TransientLabels;
            fields["null_space_dimension"] = report.Spectrum?.NullDimension;
            fields["expected_null_space_dimension"] = report.ExpectedNullDimension;
            fields["zero_tolerance"] = report.Spectrum?.ZeroTolerance;
            fields["spectrum_path"] = report.Spectrum?.PathReason;
            fields["spectrum_coverage"] = report.Spectrum?.Coverage;
            fields["equilibrium_agreement"] = report.EquilibriumAgreement.Select(a => a.MaxDifference).ToArray();
            fields["equilibrium_compared_with"] = MatrixChecks.ClaimedEquilibrium(loaded.Rates);
            fields["stationary_laws"] = report.EquilibriumAgreement.Select(a => a.StationaryLaw).ToArray();
            fields["large_completed_rates"] = LargeCompletedRates.Find(loaded.Rates, loaded.Deck.Coupling).Count;
            fields["large_completed_rates_note"] = LargeCompletedRates.Note(loaded.Rates, loaded.Deck.Coupling, loaded.Deck.TimeUnit);
            fields["checks"] = report.Checks.Select(c => new Dictionary<string, object?> { ["name"] = c.Name, ["passed"] = c.Passed, ["detail"] = c.Detail }).ToArray();
            fields["mechanics"] = mechanics?.Json(mechanicsFile!);
            JsonSummary.Write(context.Out, fields);
            context.Out.WriteLine();
        }
        else if (args.Quiet)
        {
            var failed = report.Checks.Where(c => !c.Passed).Select(c => c.Name).ToList();
            context.Out.WriteLine(failed.Count == 0
                ? $"check {loaded.Deck.SourcePath}: ok, {report.Checks.Count} checks passed, {loaded.States.Count} states"
                : $"check {loaded.Deck.SourcePath}: FAIL ({string.Join(", ", failed)}), {loaded.States.Count} states");
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

    private static void WriteSummary(TextWriter output, LoadedDeck loaded, CheckReport report, MechanicsTable? mechanics, string? mechanicsFile)
    {
        VerbSupport.WriteDeckLine(output, loaded);
        if (report.Spectrum is { } spectrum)
        {
            output.WriteLine($"spectrum     {spectrum.PathReason}");
            if (spectrum.SlowModeLine is { } slowModes)
            {
                output.WriteLine($"slow modes   {slowModes}");
            }
        }

        output.WriteLine();
        foreach (var check in report.Checks)
        {
            output.WriteLine($"  {(check.Passed ? "ok  " : "FAIL")}  {check.Name,-22} {check.Detail}");
        }

        if (LargeCompletedRates.Note(loaded.Rates, loaded.Deck.Coupling, loaded.Deck.TimeUnit) is { } note)
        {
            output.WriteLine($"  NOTE  {"completed rates",-22} {note}");
        }

        output.WriteLine();
        var classes = report.Classes;
        output.WriteLine($"closed classes: {classes.Closed.Count}");
        for (var k = 0; k < classes.Closed.Count; k++)
        {
            var closed = classes.Closed[k];
            var loss = closed.HasLoss ? ", with loss" : "";
            output.WriteLine($"  class {k + 1} ({closed.Labels.Length} states{loss}): {Format.Labels(closed.Labels)}");
            if (MatrixChecks.ClaimedEquilibrium(loaded.Rates) is null && k < report.EquilibriumAgreement.Count && report.EquilibriumAgreement[k].StationaryLaw is { } law)
            {
                output.WriteLine($"    stationary law (null vector): {Format.Labels([.. closed.Labels.Zip(law, (label, p) => $"{label} {Format.Number(p)}")])}");
            }
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
