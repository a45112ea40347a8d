using System.Globalization;
using RateDeck.Outputs;

namespace RateDeck.Sweeps;

/// <summary>How the points of a sweep ended, as the summary counts them.</summary>
/// <param name="Ok">Points with complete results.</param>
/// <param name="Failed">Points whose run ended with a non-zero exit code.</param>
/// <param name="Missing">Points not run yet, or stopped before they ended.</param>
/// <param name="Problems">One line per point without results, in point order: its name, values, status and message.</param>
public sealed record SweepTally(int Ok, int Failed, int Missing, IReadOnlyList<string> Problems);

/// <summary>
/// A sweep folder: <c>sweep.json</c> (<see cref="SweepManifest"/>), one output folder per point
/// (<c>point-0007/</c>, the files of a <c>run</c>), <c>status/point-0007.csv</c> (the exit code and
/// message of the point's last run, written by <c>run --status-file</c>) and <c>summary.csv</c>,
/// one row per point, which <see cref="WriteSummary"/> makes from the others alone: the table is
/// the same byte for byte whether the points ran in one process, in any order, or as separate jobs.
/// </summary>
public sealed class SweepFolder(string path)
{
    /// <summary>The summary file name.</summary>
    public const string SummaryName = "summary.csv";

    /// <summary>The status subfolder name.</summary>
    public const string StatusFolderName = "status";

    private const string _missingMessage = "no results: not run yet, or stopped before it ended";

    /// <summary>The folder.</summary>
    public string Path { get; } = path;

    /// <summary>The summary file.</summary>
    public string SummaryPath => System.IO.Path.Combine(Path, SummaryName);

    /// <summary>The manifest file.</summary>
    public string ManifestPath => System.IO.Path.Combine(Path, SweepManifest.FileName);

    /// <summary>The output folder of point <paramref name="name"/>.</summary>
    public string PointPath(string name) => System.IO.Path.Combine(Path, name);

    /// <summary>The status file of point <paramref name="name"/>.</summary>
    public string StatusPath(string name) => System.IO.Path.Combine(Path, StatusFolderName, name + ".csv");

    /// <summary>Writes the status file of a point's run: its exit code and its diagnostics (empty when there were none).</summary>
    public static void WriteStatus(string path, int exitCode, string message)
    {
        ArgumentNullException.ThrowIfNull(message);
        var folder = System.IO.Path.GetDirectoryName(System.IO.Path.GetFullPath(path))!;
        Directory.CreateDirectory(folder);
        ResultCsv.WriteRecords(path, null, [], ["exit_code", "message"], [[exitCode.ToString(CultureInfo.InvariantCulture), OneLine(message)]]);
    }

    /// <summary>
    /// True when point <paramref name="point"/> ended well and its folder holds all of that run's
    /// files: the status says exit 0, the folder's run list names <see cref="RunResultsFile.Name"/>
    /// and every file it lists exists, and the results' provenance is this sweep's deck, hash and
    /// overrides. A resumed sweep skips exactly these points.
    /// </summary>
    public bool IsComplete(SweepManifest manifest, ManifestPoint point) =>
        ReadStatus(point.Name) is (0, _) && CompleteResults(manifest, point) is not null;

    /// <summary>Writes <see cref="SummaryName"/> from the manifest, the status files and the points' results, and counts the outcomes.</summary>
    public SweepTally WriteSummary(SweepManifest manifest)
    {
        ArgumentNullException.ThrowIfNull(manifest);
        var columns = new List<string>();
        var known = new HashSet<string>(StringComparer.Ordinal);
        var rows = new List<(ManifestPoint Point, string Status, string Code, string Message, CsvRecords? Results)>();
        string? units = null;
        foreach (var point in manifest.Points)
        {
            var status = ReadStatus(point.Name);
            var results = status is (0, _) ? CompleteResults(manifest, point) : null;
            if (results is not null)
            {
                units ??= results.Note("units");
                foreach (var column in results.Columns.Where(known.Add))
                {
                    columns.Add(column);
                }

                rows.Add((point, "ok", "0", status!.Value.Message, results));
            }
            else if (status is (var code and not 0, var message))
            {
                rows.Add((point, "failed", code.ToString(CultureInfo.InvariantCulture), message, null));
            }
            else
            {
                rows.Add((point, "missing", "", _missingMessage, null));
            }
        }

        string[] names = ["point", .. manifest.Keys, "status", "exit_code", "message", .. columns];
        var table = rows.Select(r =>
        {
            var cells = r.Results is { } found ? found.Columns.Zip(found.Rows[0]).ToDictionary(c => c.First, c => c.Second, StringComparer.Ordinal) : [];
            return (IReadOnlyList<string>)[r.Point.Name, .. r.Point.Values, r.Status, r.Code, r.Message, .. columns.Select(c => cells.GetValueOrDefault(c, ""))];
        }).ToArray();
        var notes = new List<KeyValuePair<string, string>>
        {
            new("sweep", $"{string.Join(" ", manifest.Axes)} ({(manifest.Zip ? "walked together" : "product")}, {manifest.Points.Count} points)"),
        };
        if (units is not null)
        {
            notes.Add(new("units", units));
        }

        var header = new OutputHeader(manifest.ToolVersion, manifest.Deck, manifest.DeckSha256, manifest.Overrides);
        ResultCsv.WriteRecords(SummaryPath, header, notes, names, table);
        var problems = rows.Where(r => r.Status != "ok")
            .Select(r => $"{r.Point.Name} ({string.Join(", ", r.Point.Set)}): {r.Status}{(r.Code.Length > 0 ? $" with exit code {r.Code}" : "")}: {r.Message}")
            .ToArray();
        return new SweepTally(rows.Count(r => r.Status == "ok"), rows.Count(r => r.Status == "failed"), rows.Count(r => r.Status == "missing"), problems);
    }

    private (int Code, string Message)? ReadStatus(string name)
    {
        var path = StatusPath(name);
        if (!File.Exists(path))
        {
            return null;
        }

        var status = ResultCsv.ReadRecords(path);
        return status.Rows is [[var code, var message]] && int.TryParse(code, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out var exit)
            ? (exit, message)
            : null;
    }

    // The point's results when its folder is complete and belongs to this sweep; else null.
    private CsvRecords? CompleteResults(SweepManifest manifest, ManifestPoint point)
    {
        var folder = PointPath(point.Name);
        var list = System.IO.Path.Combine(folder, StagedOutputFolder.ListName);
        if (!File.Exists(list))
        {
            return null;
        }

        var listed = File.ReadAllLines(list).Where(l => l.Length > 0).ToArray();
        if (!listed.Contains(RunResultsFile.Name) || !listed.All(name => File.Exists(System.IO.Path.Combine(folder, name))))
        {
            return null;
        }

        var results = ResultCsv.ReadRecords(System.IO.Path.Combine(folder, RunResultsFile.Name));
        var expected = new OutputHeader(manifest.ToolVersion, manifest.Deck, manifest.DeckSha256, [.. manifest.Overrides, .. point.Set]).Lines().ToArray();
        // The first header line names the program and its version; the next three (deck, hash, overrides) are notes.
        var provenance = results.Notes.Take(expected.Length - 1).Select(n => $"{OutputHeader.CommentChar} {n.Key}: {n.Value}");
        return results.Rows.Count == 1 && results.Rows[0].Length == results.Columns.Count && expected.Skip(1).SequenceEqual(provenance)
            ? results
            : null;
    }

    private static string OneLine(string text) =>
        string.Join(" / ", text.Split('\n', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries));
}
