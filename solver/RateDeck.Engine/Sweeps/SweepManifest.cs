using System.Text.Encodings.Web;
using System.Text.Json;
using System.Text.Json.Serialization;
using RateDeck.Outputs;

namespace RateDeck.Sweeps;

/// <summary>One point as the manifest records it.</summary>
/// <param name="Name">The point's folder name.</param>
/// <param name="Set">The point's overrides in <c>--set</c> form, one per axis.</param>
/// <param name="Values">The value of each axis, as written in <paramref name="Set"/>.</param>
public sealed record ManifestPoint(string Name, IReadOnlyList<string> Set, IReadOnlyList<string> Values);

/// <summary>
/// <c>sweep.json</c> in a sweep folder: what the sweep is (deck, hash, shared overrides, the options
/// of every point's run, the axes) and its points in order. Written by <c>sweep</c> before any
/// point runs; <c>collect</c> reads it to merge the points' results, and a sweep started again into
/// the same folder compares it to tell a resumed sweep from a different one.
/// </summary>
/// <param name="Format">The manifest format, <see cref="CurrentFormat"/>.</param>
/// <param name="ToolVersion">The program version that wrote it.</param>
/// <param name="Verb">What each point runs: <c>run</c>, or <c>fit</c> (<c>sweep --fit</c>).</param>
/// <param name="Deck">The deck path as given (it is recorded in every output, so jobs must name it the same way).</param>
/// <param name="DeckSha256">The SHA-256 of the deck file's bytes.</param>
/// <param name="Overrides">The <c>--set</c> overrides every point shares, before its own.</param>
/// <param name="RunArguments">The further options of <paramref name="Verb"/> every point takes (<c>--no-plots</c>, <c>--exact-only</c>, <c>--linalg P</c>).</param>
/// <param name="Axes">The <c>--vary</c> specifications, in order.</param>
/// <param name="Zip">True when the axes are walked together.</param>
/// <param name="Keys">The varied keys, in axis order: the value columns of the summary.</param>
/// <param name="Points">The points in order.</param>
public sealed record SweepManifest(int Format, string ToolVersion, string Verb, string Deck, string DeckSha256, IReadOnlyList<string> Overrides,
    IReadOnlyList<string> RunArguments, IReadOnlyList<string> Axes, bool Zip, IReadOnlyList<string> Keys, IReadOnlyList<ManifestPoint> Points)
{
    /// <summary>The file name in a sweep folder.</summary>
    public const string FileName = "sweep.json";

    /// <summary>The format this program writes and reads.</summary>
    public const int CurrentFormat = 1;

    /// <summary>The manifest of <paramref name="plan"/> run on a deck.</summary>
    public static SweepManifest Create(SweepPlan plan, string verb, string deck, string deckSha256, IReadOnlyList<string> overrides, IReadOnlyList<string> runArguments)
    {
        ArgumentNullException.ThrowIfNull(plan);
        var points = plan.Points().Select(p => new ManifestPoint(p.Name, [.. p.Overrides.Select(o => o.ToString())], [.. p.ValueTexts])).ToArray();
        return new SweepManifest(CurrentFormat, ToolInfo.Version, verb, deck, deckSha256, overrides, runArguments,
            [.. plan.Axes.Select(a => a.ToString())], plan.Zip, [.. plan.Axes.Select(a => a.Key)], points);
    }

    /// <summary>The manifest's text as written to <see cref="FileName"/>.</summary>
    public string Text() => JsonSerializer.Serialize(this, ManifestJson.Relaxed.SweepManifest) + "\n";

    /// <summary>Reads the manifest of the sweep folder <paramref name="folder"/>.</summary>
    /// <exception cref="SweepFolderException">There is none, or it cannot be read.</exception>
    public static SweepManifest Read(string folder)
    {
        var path = Path.Combine(folder, FileName);
        if (!File.Exists(path))
        {
            throw new SweepFolderException($"{folder} holds no {FileName}: it is not a sweep folder (sweep --emit-jobs DIR or sweep --out DIR makes one)");
        }

        try
        {
            var manifest = JsonSerializer.Deserialize(File.ReadAllText(path), ManifestJson.Relaxed.SweepManifest);
            return manifest is { Format: CurrentFormat, Verb: "run" or "fit", Points: not null, Keys: not null, Overrides: not null, RunArguments: not null, Axes: not null, Deck: not null, DeckSha256: not null, ToolVersion: not null }
                ? manifest
                : throw new SweepFolderException($"{path}: not a sweep manifest of format {CurrentFormat}; make it again with sweep --emit-jobs");
        }
        catch (JsonException e)
        {
            throw new SweepFolderException($"{path}: the manifest cannot be read ({e.Message}); make it again with sweep --emit-jobs");
        }
    }
}

/// <summary>
/// The manifest's JSON form, generated at build time (no reflection, so the precompiled native
/// program reads and writes it too): snake_case names, indented, non-ASCII text as is.
/// </summary>
[JsonSourceGenerationOptions(PropertyNamingPolicy = JsonKnownNamingPolicy.SnakeCaseLower, WriteIndented = true, NewLine = "\n")]
[JsonSerializable(typeof(SweepManifest))]
internal sealed partial class ManifestJson : JsonSerializerContext
{
    /// <summary>The context with the relaxed encoder, so that labels and paths keep their characters.</summary>
    public static ManifestJson Relaxed { get; } = new(new JsonSerializerOptions
    {
        PropertyNamingPolicy = JsonNamingPolicy.SnakeCaseLower,
        WriteIndented = true,
        NewLine = "\n",
        Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    });
}

/// <summary>A sweep folder that cannot be used as it is; the message says why and what to do.</summary>
public sealed class SweepFolderException : Exception
{
    /// <summary>Creates the exception with a message that says what to do.</summary>
    public SweepFolderException(string message)
        : base(message)
    {
    }

    /// <summary>An exception without a message.</summary>
    public SweepFolderException()
    {
    }

    /// <summary>An exception with a message and its cause.</summary>
    public SweepFolderException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
