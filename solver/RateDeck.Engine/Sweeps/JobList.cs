using System.Globalization;
using System.Text;
using System.Text.RegularExpressions;
using RateDeck.Outputs;

namespace RateDeck.Sweeps;

/// <summary>
/// A sweep handed to existing batch engines instead of run in one process: <c>jobs.txt</c>, one
/// shell command line per point (a complete <c>ratedeck run --quiet</c>, or <c>fit</c>, that writes the point's folder and
/// status file exactly as the in-process sweep does), for GNU parallel
/// (<c>parallel --jobs 8 &lt; DIR/jobs.txt</c>), and <c>slurm-array.sh</c>, a Slurm job-array
/// script whose task k runs line k + 1. Paths are written as given, relative to the folder the
/// sweep was started in: run the jobs from there (the Slurm script changes to the submission folder).
/// </summary>
public static partial class JobList
{
    /// <summary>The job list file name.</summary>
    public const string JobsName = "jobs.txt";

    /// <summary>The Slurm script file name.</summary>
    public const string SlurmName = "slurm-array.sh";

    /// <summary>The command the job lines start with: the <c>ratedeck</c> command on PATH.</summary>
    public const string Command = "ratedeck";

    /// <summary>The command line of one point.</summary>
    public static string Line(SweepManifest manifest, SweepFolder folder, ManifestPoint point)
    {
        ArgumentNullException.ThrowIfNull(manifest);
        ArgumentNullException.ThrowIfNull(folder);
        ArgumentNullException.ThrowIfNull(point);
        var words = new List<string> { Command, manifest.Verb, manifest.Deck };
        foreach (var setting in manifest.Overrides.Concat(point.Set))
        {
            words.Add("--set");
            words.Add(setting);
        }

        words.AddRange(manifest.RunArguments);
        // One summary line per job: GNU parallel's output and Slurm's logs stay readable for
        // hundreds of points, and collect reads every result from the point's folder anyway.
        words.Add("--quiet");
        words.AddRange(["--out", folder.PointPath(point.Name), "--status-file", folder.StatusPath(point.Name)]);
        return string.Join(' ', words.Select(Quote));
    }

    /// <summary>Writes <see cref="JobsName"/> and <see cref="SlurmName"/> into the sweep folder.</summary>
    public static void Write(SweepManifest manifest, SweepFolder folder)
    {
        ArgumentNullException.ThrowIfNull(manifest);
        ArgumentNullException.ThrowIfNull(folder);
        var jobs = Path.Combine(folder.Path, JobsName);
        AtomicFile.Write(jobs, writer =>
        {
            foreach (var point in manifest.Points)
            {
                writer.WriteLine(Line(manifest, folder, point));
            }
        });
        var last = (manifest.Points.Count - 1).ToString(CultureInfo.InvariantCulture);
        var script = new StringBuilder()
            .Append("#!/bin/bash\n")
            .Append("#SBATCH --job-name=ratedeck-sweep\n")
            .Append(CultureInfo.InvariantCulture, $"#SBATCH --array=0-{last}\n")
            .Append("# One sweep point per array task: task k runs line k + 1 of the job list.\n")
            .Append(CultureInfo.InvariantCulture, $"# Submit from the folder the sweep was made in: sbatch {Quote(Path.Combine(folder.Path, SlurmName))}\n")
            .Append(CultureInfo.InvariantCulture, $"# When every task has ended: ratedeck collect {Quote(folder.Path)}\n")
            .Append("set -euo pipefail\n")
            .Append("cd \"${SLURM_SUBMIT_DIR:-.}\"\n")
            .Append(CultureInfo.InvariantCulture, $"line=$(sed -n \"$((SLURM_ARRAY_TASK_ID + 1))p\" {Quote(jobs)})\n")
            .Append("exec bash -c \"$line\"\n")
            .ToString();
        AtomicFile.Write(Path.Combine(folder.Path, SlurmName), writer => writer.Write(script));
    }

    /// <summary>A word as the shell reads it back unchanged: as it is when plain, else in single quotes.</summary>
    public static string Quote(string word)
    {
        ArgumentNullException.ThrowIfNull(word);
        return word.Length > 0 && PlainWord().IsMatch(word) ? word : "'" + word.Replace("'", "'\\''", StringComparison.Ordinal) + "'";
    }

    [GeneratedRegex("^[A-Za-z0-9_./=:+,@%-]+$")]
    private static partial Regex PlainWord();
}
