using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Sweeps;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck collect DIR</c>: merges the per-point results of a sweep folder (made by
/// <c>sweep --emit-jobs DIR</c> and filled by its jobs, or by an in-process sweep) into
/// <c>DIR/summary.csv</c>, the same table byte for byte as the in-process sweep writes.
/// </summary>
public sealed class CollectVerb : IVerb
{
    private readonly Argument<string> _folder = new("DIR") { Description = "a sweep folder (it holds sweep.json)" };

    /// <summary>Declares the verb and its options.</summary>
    public CollectVerb() => Command = new Command("collect", "merge the point results of a sweep folder into its summary table")
    {
        _folder,
        VerbOptions.Switch(DeckOptions.Json, "print one JSON object on stdout instead of the summary"),
    };

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var folder = new SweepFolder(args.Value(_folder)!);
        SweepManifest manifest;
        try
        {
            manifest = SweepManifest.Read(folder.Path);
        }
        catch (SweepFolderException e)
        {
            throw new UsageException(e.Message);
        }

        return SweepVerb.Report(context, args.Json, folder, manifest, folder.WriteSummary(manifest), 0, emitted: false);
    }
}
