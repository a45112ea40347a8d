using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Text;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck steady DECK</c>: the steady state the deck's initial state settles into: the
/// projection onto the null space per closed class when undriven, P = -K^(-1) s when driven, with
/// the residual and the approach time. Exit 4 when no steady state exists.
/// </summary>
public sealed class SteadyVerb : IVerb
{
    private const int _listedStates = 12;

    // The options of steady, declared once here.
    private readonly Option<string?> _out = VerbOptions.Folder("output folder for steady-state.csv (default: ratedeck-out/<deck name>)");

    /// <summary>Declares the verb and its options.</summary>
    public SteadyVerb() => Command = DeckOptions.Command("steady", "the steady state reached from the deck's initial state, its residual and approach time", _out);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var loaded = VerbSupport.Load(args);
        var steady = new DeckRun(loaded).Steady;
        var folder = VerbSupport.OutputFolder(args.Value(_out), loaded.Deck);
        string? file = null;
        if (steady.Populations is { } populations)
        {
            Directory.CreateDirectory(folder);
            file = Path.Combine(folder, "steady-state.csv");
            ResultCsv.WriteSteadyState(file, OutputHeader.For(loaded.Deck), loaded.States.Labels, loaded.States.Coordinates, populations, loaded.States.LogEquilibrium);
        }

        if (args.Json)
        {
            var fields = VerbSupport.JsonFields(loaded);
            fields["kind"] = steady.Kind.ToString().ToLowerInvariant();
            fields["exists"] = steady.Exists;
            fields["residual"] = steady.Residual;
            fields["approach_time"] = steady.ApproachTime;
            fields["total_population"] = steady.Populations?.Sum();
            fields["lost_mass"] = steady.LostMass;
            fields["class_masses"] = steady.ClassMasses.Select(c => new Dictionary<string, object?> { ["states"] = c.Class.Labels, ["mass"] = c.Mass }).ToArray();
            fields["labels"] = loaded.States.Labels;
            fields["populations"] = steady.Populations;
            fields["message"] = steady.Message;
            fields["file"] = file;
            JsonSummary.Write(context.Out, fields);
            context.Out.WriteLine();
        }
        else if (args.Quiet)
        {
            context.Out.WriteLine(steady.Exists
                ? $"steady {loaded.Deck.SourcePath}: {steady.Kind.ToString().ToLowerInvariant()} steady state, residual {Format.Number(steady.Residual ?? double.NaN)}, approach time {Format.Number(steady.ApproachTime)} {loaded.Deck.TimeUnit}; wrote {file}"
                : $"steady {loaded.Deck.SourcePath}: none: {steady.Message}");
        }
        else
        {
            WriteSummary(context.Out, loaded, steady, file);
        }

        return steady.Exists ? ExitCodes.Success : ExitCodes.CheckFailed;
    }

    private static void WriteSummary(TextWriter output, LoadedDeck loaded, SteadyStateResult steady, string? file)
    {
        VerbSupport.WriteDeckLine(output, loaded);
        output.WriteLine($"steady state {steady.Message}");
        if (steady.Populations is not { } populations)
        {
            return;
        }

        // Without a decaying mode the approach time is infinite; the line above says why in words.
        var approach = double.IsFinite(steady.ApproachTime) ? $", approach time {Format.Time(steady.ApproachTime, loaded.Deck.TimeUnit)}" : "";
        output.WriteLine($"  residual |K P + s| = {Format.Rate(steady.Residual ?? double.NaN, loaded.Deck.TimeUnit)}{approach}, total population {Format.Number(populations.Sum())}");
        output.WriteLine();
        var labels = loaded.States.Labels;
        var shown = labels.Length <= _listedStates ? Enumerable.Range(0, labels.Length) : Enumerable.Range(0, labels.Length).OrderByDescending(i => populations[i]).Take(_listedStates).Order();
        output.WriteLine(labels.Length <= _listedStates ? "  state        population" : $"  state        population   (the {_listedStates} most populated of {labels.Length}; all in the CSV)");
        foreach (var i in shown)
        {
            output.WriteLine($"  {labels[i],-12} {Format.Number(populations[i])}");
        }

        output.WriteLine();
        output.WriteLine($"wrote {file}");
    }
}
