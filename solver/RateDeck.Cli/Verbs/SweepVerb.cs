using System.CommandLine;
using System.Runtime.ExceptionServices;
using RateDeck.Cli.CommandLine;
using RateDeck.Decks;
using RateDeck.Outputs;
using RateDeck.Sweeps;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck sweep DECK --vary key=start:stop:count[:log] ...</c>: runs the deck at every point of
/// a grid of override values, in parallel in this process (each point a typed override of the deck
/// read once), one <c>run</c> output folder per point and a summary table with one row per point;
/// or, with <c>--emit-jobs DIR</c>, writes the points as command lines for GNU parallel and a Slurm
/// job array, to be merged by <c>ratedeck collect</c> into the same table.
/// </summary>
public sealed class SweepVerb : IVerb
{
    // Enough failing points on stderr to see the pattern; the table has them all.
    private const int _problemsShown = 10;

    private readonly Option<string[]> _vary = VerbOptions.Repeated("--vary", "KEY=START:STOP:COUNT[:log]", "vary a deck key (as --set names it) over COUNT values from START to STOP, evenly spaced or geometric (:log); repeatable: the points are every combination");
    private readonly Option<bool> _zip = VerbOptions.Switch("--zip", "walk the --vary axes together (equal counts) instead of taking every combination");
    private readonly Option<int?> _jobs = VerbOptions.WholeNumber("--jobs", "N", "points run at once in this process (default: the number of processors)", 1);
    private readonly Option<string?> _out = VerbOptions.Folder("sweep folder: one subfolder per point, summary.csv, sweep.json (default: ratedeck-out/<deck name>-sweep)");
    private readonly Option<string?> _emitJobs = VerbOptions.Single<string?>("--emit-jobs", "DIR", "run nothing: write the sweep folder DIR with jobs.txt (one run command per point, for GNU parallel) and slurm-array.sh (sbatch --array); merge with ratedeck collect DIR", text => text);
    private readonly Option<bool> _exactOnly = VerbOptions.Switch("--exact-only", "run every point with run --exact-only");
    private readonly Option<bool> _plots = VerbOptions.Switch("--plots", "also draw each point's PNG plots (off by default: a sweep would draw four per point)");
    private readonly Option<bool> _fit = VerbOptions.Switch("--fit", "fit at every point instead of running (the deck's [fit] table): the summary has each point's estimates, standard errors, RSS and convergence");

    /// <summary>Declares the verb and its options.</summary>
    public SweepVerb() => Command = DeckOptions.Command("sweep", "run the deck over a grid of values of deck keys, in parallel; one run folder per point and a summary table",
        _vary, _zip, _jobs, _out, _emitJobs, _exactOnly, _plots, _fit);

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        SweepPlan plan;
        try
        {
            plan = SweepPlan.Create([.. (args.Value(_vary) ?? []).Select(SweepAxis.Parse)], args.Has(_zip));
        }
        catch (SweepSpecException e)
        {
            throw new UsageException(e.Message);
        }

        var emit = args.Value(_emitJobs);
        if (emit is not null && args.Value(_out) is not null)
        {
            throw new UsageException("--emit-jobs DIR names the sweep folder; leave out --out");
        }

        var fit = args.Has(_fit);
        if (fit && args.Has(_exactOnly))
        {
            throw new UsageException("--exact-only is an option of run; a fit keeps the exact path its trials need, so leave it out with --fit");
        }

        var loaded = VerbSupport.Load(args);
        foreach (var axis in plan.Axes)
        {
            loaded.Deck.CheckOverrideKey(axis.Key, SourceSpan.None("--vary " + axis));
        }

        if (fit)
        {
            // A deck without a usable [fit] table fails here once, located, not at every point.
            _ = Fitting.Setup.FitSpecReader.Read(args.DeckPath, args.Overrides);
        }

        string[] pointArguments = [.. args.Has(_plots) ? [] : new[] { "--no-plots" }, .. args.Has(_exactOnly) ? ["--exact-only"] : Array.Empty<string>(),
            .. args.LinearAlgebra is { } provider ? ["--linalg", provider] : Array.Empty<string>()];
        var manifest = SweepManifest.Create(plan, fit ? "fit" : "run", loaded.Deck.SourcePath, loaded.Deck.Sha256, loaded.Deck.Overrides, pointArguments);
        var folder = new SweepFolder(emit ?? args.Value(_out) ?? Path.Combine("ratedeck-out", Path.GetFileNameWithoutExtension(loaded.Deck.SourcePath) + "-sweep"));
        Begin(folder, manifest);
        if (emit is not null)
        {
            JobList.Write(manifest, folder);
            return Report(context, args.Json, folder, manifest, null, 0, emitted: true, args.Quiet);
        }

        var pending = manifest.Points.Zip(plan.Points()).Where(p => !folder.IsComplete(manifest, p.First)).Select(p => p.Second).ToArray();
        var runSettings = new RunSettings(null, null, null, args.Has(_exactOnly), null, false, false, false, args.Has(_plots), false, false, false, false);
        var fitSettings = new FitSettings(null, null, null, args.Has(_plots), false, false);
        try
        {
            Parallel.ForEach(pending, new ParallelOptions { MaxDegreeOfParallelism = args.Value(_jobs) ?? Environment.ProcessorCount }, point =>
                RunVerb.WithStatus(manifest.Verb, folder.StatusPath(point.Name), new VerbContext(TextWriter.Null, TextWriter.Null), recorded => fit
                    ? FitVerb.Execute(args.DeckPath, [.. args.Overrides, .. point.Overrides.Select(o => o.ToString())], loaded.Algebra, fitSettings with { Out = folder.PointPath(point.Name) }, recorded)
                    : RunVerb.Execute(loaded.With(point.Overrides), runSettings with { Out = folder.PointPath(point.Name) }, recorded)));
        }
        catch (AggregateException e)
        {
            // A status file that cannot be written stops the sweep (exit 5), as a run's output would.
            ExceptionDispatchInfo.Capture(e.InnerExceptions[0]).Throw();
        }

        var tally = folder.WriteSummary(manifest);
        return Report(context, args.Json, folder, manifest, tally, manifest.Points.Count - pending.Length, emitted: false, args.Quiet);
    }

    // A new folder gets the manifest; a folder holding this very sweep is resumed; another sweep's folder is refused.
    private static void Begin(SweepFolder folder, SweepManifest manifest)
    {
        var text = manifest.Text();
        if (File.Exists(folder.ManifestPath))
        {
            if (File.ReadAllText(folder.ManifestPath) != text)
            {
                throw new UsageException($"{folder.Path} holds another sweep (its {SweepManifest.FileName} names another deck, overrides, axes, options or program version); give another folder, or remove it");
            }

            return;
        }

        Directory.CreateDirectory(folder.Path);
        AtomicFile.Write(folder.ManifestPath, writer => writer.Write(text));
    }

    /// <summary>The summary line (or JSON) of a sweep or a collect, and the exit code its tally calls for.</summary>
    internal static int Report(VerbContext context, bool json, SweepFolder folder, SweepManifest manifest, SweepTally? tally, int skipped, bool emitted, bool quiet = false)
    {
        var jobs = Path.Combine(folder.Path, JobList.JobsName);
        if (json)
        {
            JsonSummary.Write(context.Out, new Dictionary<string, object?>
            {
                ["tool_version"] = ToolInfo.Version,
                ["deck"] = manifest.Deck,
                ["deck_sha256"] = manifest.DeckSha256,
                ["points"] = manifest.Points.Count,
                ["ok"] = tally?.Ok,
                ["failed"] = tally?.Failed,
                ["missing"] = tally?.Missing,
                ["skipped_complete"] = emitted ? null : skipped,
                ["folder"] = folder.Path,
                ["summary"] = tally is null ? null : folder.SummaryPath,
                ["jobs"] = emitted ? jobs : null,
                ["slurm_script"] = emitted ? Path.Combine(folder.Path, JobList.SlurmName) : null,
            });
        }
        else if (tally is null)
        {
            context.Out.WriteLine($"wrote {manifest.Points.Count} job lines to {jobs} and the job-array script {Path.Combine(folder.Path, JobList.SlurmName)}");
            if (!quiet)
            {
                context.Out.WriteLine($"run them from this folder with GNU parallel (parallel --jobs 4 < {JobList.Quote(jobs)}) or Slurm (sbatch {JobList.Quote(Path.Combine(folder.Path, JobList.SlurmName))}), then: ratedeck collect {JobList.Quote(folder.Path)}");
            }
        }
        else
        {
            var earlier = skipped > 0 ? $" ({skipped} complete from an earlier sweep, not run again)" : "";
            context.Out.WriteLine($"{manifest.Points.Count} points{earlier}: {tally.Ok} ok, {tally.Failed} failed, {tally.Missing} missing; table {folder.SummaryPath}");
        }

        if (tally is { Failed: 0, Missing: 0 } || tally is null)
        {
            return ExitCodes.Success;
        }

        context.Error.WriteLine($"ratedeck: {tally.Failed + tally.Missing} of {manifest.Points.Count} points have no results; their rows in {folder.SummaryPath} say why (status and message columns)");
        foreach (var problem in tally.Problems.Take(_problemsShown))
        {
            context.Error.WriteLine("  " + problem);
        }

        if (tally.Problems.Count > _problemsShown)
        {
            context.Error.WriteLine($"  ... and {tally.Problems.Count - _problemsShown} more");
        }

        return ExitCodes.PointsFailed;
    }
}
